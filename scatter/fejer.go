package scatter

import "math"

// fejerRule is Fejér's second rule on [0, 1] with n-1 interior nodes
// t_k = (1 - cos(kπ/n))/2, k = 1..n-1 (n a power of two). The rules for n and
// 2n are nested — every node of one is a node of the next — so an adaptive
// integration that doubles n reuses every integrand value (Fejér 1933;
// weights as in Waldvogel, BIT 46, 195 (2006)).
type fejerRule struct {
	n int
	t []float64 // nodes, ascending
	w []float64 // weights on [0, 1]
}

// newFejer returns the rule with n-1 nodes.
func newFejer(n int) fejerRule {
	r := fejerRule{n: n, t: make([]float64, n-1), w: make([]float64, n-1)}
	for k := 1; k < n; k++ {
		theta := float64(k) * math.Pi / float64(n)
		s := 0.0
		for j := 1; j <= n/2; j++ {
			s += math.Sin(float64(2*j-1)*theta) / float64(2*j-1)
		}
		// On [-1, 1] the weight is (4 sin θ / n) Σ; halve it for [0, 1].
		r.t[k-1] = (1 - math.Cos(theta)) / 2
		r.w[k-1] = 2 * math.Sin(theta) / float64(n) * s
	}
	return r
}

// index returns the position in the rule for 2^level·m of node k of this
// rule (nesting: node k of rule n is node 2k of rule 2n).
func nestedIndex(k, fromN, toN int) int { return (k+1)*(toN/fromN) - 1 }
