package multipole

import "math"

// 15-point Gauss–Kronrod rule on [-1, 1] with its embedded 7-point Gauss rule
// (the abscissae and weights of QUADPACK's qk15; Piessens, de Doncker-Kapenga,
// Überhuber & Kahaner, QUADPACK, Springer 1983). Element 7 is the centre.
var (
	gkNodes = [8]float64{
		0.991455371120812639206854697526329,
		0.949107912342758524526189684047851,
		0.864864423359769072789712788640926,
		0.741531185599394439863864773280788,
		0.586087235467691130294144845693013,
		0.405845151377397166906606412076961,
		0.207784955007898467600689403773245,
		0,
	}
	gkWeights = [8]float64{
		0.022935322010529224963732008058970,
		0.063092092629978553290700663189204,
		0.104790010322250183839876322541518,
		0.140653259715525918745189590510238,
		0.169004726639267902826583426598550,
		0.190350578064785409913256402421014,
		0.204432940075298892414161999234649,
		0.209482141084727828012999174891714,
	}
	// Gauss weights of nodes 1, 3, 5 and 7 (the centre).
	gaussWeights = [4]float64{
		0.129484966168869693270611432679082,
		0.279705391489276667901467771423780,
		0.381830050505118944950369775488975,
		0.417959183673469387755102040816327,
	}
)

// gkPoints returns the 15 abscissae of the rule mapped to [a, b].
func gkPoints(a, b float64) [15]float64 {
	c, h := 0.5*(a+b), 0.5*(b-a)
	var x [15]float64
	for i := 0; i < 7; i++ {
		x[2*i] = c - h*gkNodes[i]
		x[2*i+1] = c + h*gkNodes[i]
	}
	x[14] = c
	return x
}

// gkApply returns the Kronrod estimate of ∫_a^b f and its error estimate from
// the values f at gkPoints(a, b). The error follows QUADPACK: with the Gauss
// difference e = |K - G| and resasc ≈ ∫|f - K/(b-a)|,
// err = resasc · min(1, (200 e/resasc)^{3/2}).
func gkApply(a, b float64, f *[15]float64) (kronrod, err float64) {
	h := 0.5 * (b - a)
	var k, g float64
	for i := 0; i < 7; i++ {
		s := f[2*i] + f[2*i+1]
		k += gkWeights[i] * s
		if i%2 == 1 {
			g += gaussWeights[i/2] * s
		}
	}
	k += gkWeights[7] * f[14]
	g += gaussWeights[3] * f[14]
	mean := 0.5 * k
	resasc := gkWeights[7] * math.Abs(f[14]-mean)
	for i := 0; i < 7; i++ {
		resasc += gkWeights[i] * (math.Abs(f[2*i]-mean) + math.Abs(f[2*i+1]-mean))
	}
	k, g, resasc = k*h, g*h, resasc*math.Abs(h)
	err = math.Abs(k - g)
	if resasc != 0 && err != 0 {
		err = resasc * math.Min(1, math.Pow(200*err/resasc, 1.5))
	}
	return k, err
}
