package validate

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
)

// TestFarFieldRefinement checks that the sphere–sphere energy at L/R = 16
// approaches the far-field series of DESIGN §8 (Feinberg & Sucher 1970
// leading term) for the nominal radius as the icosphere is refined: the
// faceted sphere is smaller than its circumsphere by O(h²), so the
// difference must fall at each refinement, roughly like h² (ratio between
// successive levels n, n' at least (n'/n)² / 2). With the volume-equivalent
// radius every level is within 1 % (tolerance: the truncated series and the
// mesh error of the polarisabilities).
func TestFarFieldRefinement(t *testing.T) {
	const L = 16
	prev := math.Inf(1)
	prevLevel := 0
	for _, level := range []int{2, 3, 4} {
		m, err := mesh.SphereLevel(1, level)
		if err != nil {
			t.Fatal(err)
		}
		e, err := pairEnergy(context.Background(), m, m.Translate(r3.Vec{Z: L}), 0, 1e-4)
		if err != nil {
			t.Fatal(err)
		}
		nominal := math.Abs(e/SphereSphereFar(1, L) - 1)
		equiv := math.Abs(e/SphereSphereFar(m.EquivalentRadius(), L) - 1)
		t.Logf("level %d (%d triangles): difference %.4f with R, %.5f with the volume-equivalent radius", level, len(m.Triangles), nominal, equiv)
		if equiv > 0.01 {
			t.Errorf("level %d: %.3g from the series with the volume-equivalent radius", level, equiv)
		}
		if prevLevel > 0 {
			want := math.Pow(float64(level)/float64(prevLevel), 2) / 2
			if prev/nominal < want {
				t.Errorf("level %d: difference %.4g fell only by %.3g from %.4g (want at least %.3g)", level, nominal, prev/nominal, prev, want)
			}
		}
		prev, prevLevel = nominal, level
	}
}
