package bem

import "math"

// expTableBits sets the table of fastExp: 2^expTableBits entries.
const expTableBits = 7

// expTable[j] is the bit pattern of 2^(j/128) minus j<<45, so that adding
// k<<45 (k = 128m + j) yields 2^(k/128) = 2^m 2^(j/128) directly: the low
// seven bits of k cancel and its high bits land in the exponent field.
var expTable = func() [1 << expTableBits]uint64 {
	var t [1 << expTableBits]uint64
	for j := range t {
		t[j] = math.Float64bits(math.Exp2(float64(j)/(1<<expTableBits))) - uint64(j)<<(52-expTableBits)
	}
	return t
}()

// Range reduction constants: x = k ln2/128 + r. ln2Hi has 32 significant
// bits, so k·ln2Hi/128 is exact for |k| < 2^21.
const (
	expN        = 1 << expTableBits
	expInvLn2N  = expN / math.Ln2
	expLn2HiN   = 6.93147180369123816490e-01 / expN
	expLn2LoN   = 1.90821492927058770002e-10 / expN
	expShifter  = 0x1.8p52 // adding it rounds to an integer held in the low mantissa bits
	expMinArg   = -708.0
	expMaxArg   = 709.0
	expPolyC2   = 1.0 / 2
	expPolyC3   = 1.0 / 6
	expPolyC4   = 1.0 / 24
	expPolyC5   = 1.0 / 120
	expMaskBits = expN - 1
)

// fastExp returns e^x to within about one unit in the last place
// (TestFastExp) at a fraction of the cost of math.Exp. The far-pair rules
// evaluate one exponential per pair of points, most of the assembly time.
// The method is the common table one: x = k ln2/128 + r with |r| ≤ ln2/256,
// e^x = 2^(k/128) e^r, e^r - 1 by its Taylor polynomial of degree 5
// (truncation below 1e-18). Arguments outside [-708, 709] and NaN go to
// math.Exp. farMomentsYukawa repeats these lines inline.
func fastExp(x float64) float64 {
	if !(x >= expMinArg && x <= expMaxArg) {
		return math.Exp(x)
	}
	kd := x*expInvLn2N + expShifter
	ki := math.Float64bits(kd)
	kd -= expShifter
	r := (x - kd*expLn2HiN) - kd*expLn2LoN
	r2 := r * r
	pm1 := r + r2*(expPolyC2+r*expPolyC3) + r2*r2*(expPolyC4+r*expPolyC5) // e^r - 1
	s := math.Float64frombits(expTable[ki&expMaskBits] + ki<<(52-expTableBits))
	return s + s*pm1
}
