package bem

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
)

func surfaceOf(t testing.TB, m *mesh.Mesh) *Surface {
	t.Helper()
	b, err := mesh.NewBasis(m)
	if err != nil {
		t.Fatal(err)
	}
	s, err := NewSurface(b)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// TestCrossGradientFiniteDifference checks the analytic derivatives of
// Σ H_ab M_ab under translation and rotation of the second body against
// central differences of the assembled block (step 1e-4, truncation ~1e-8).
// Both sides use one fixed product rule (collapsed 6×6 for every pair), since
// the default selection switches rules as panels move, which finite
// differences cannot follow. Tolerance 1e-6 of the largest component.
func TestCrossGradientFiniteDifference(t *testing.T) {
	ma, err := mesh.SphereLevel(1, 2)
	if err != nil {
		t.Fatal(err)
	}
	box, err := mesh.Box(r3.Vec{X: 1.2, Y: 0.9, Z: 0.7}, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	mb := box.Rotate(r3.Vec{X: 1, Y: 1}, 0.4, r3.Vec{}).Translate(r3.Vec{X: 0.3, Y: -0.2, Z: 2.2})
	a, b := surfaceOf(t, ma), surfaceOf(t, mb)
	rng := rand.New(rand.NewPCG(1, 2))
	h := mat.NewDense(a.Len(), b.Len(), nil)
	for i := 0; i < a.Len(); i++ {
		for j := 0; j < b.Len(); j++ {
			h.Set(i, j, rng.NormFloat64())
		}
	}
	centre := r3.Vec{X: 0.1, Y: 0.3, Z: 2.0}
	ctx := context.Background()
	for _, kappa := range []float64{0.05, 1.5} {
		op, _ := NewEFIE(kappa)
		op.Quad = &Quadrature{Near: 0, Far: []float64{0, 0, 0, 0}, Decay: []float64{0, 0, 0, 0}}
		as := Assembler{}
		got, err := as.CrossGradient(ctx, h, op, a, b, centre)
		if err != nil {
			t.Fatal(err)
		}
		contract := func(m *mesh.Mesh) float64 {
			blk := mat.NewDense(a.Len(), b.Len(), nil)
			if err := as.Cross(ctx, blk, op, a, surfaceOf(t, m)); err != nil {
				t.Fatal(err)
			}
			return mat.Sum(mulElem(blk, h))
		}
		const eps = 1e-4
		axes := []r3.Vec{{X: 1}, {Y: 1}, {Z: 1}}
		var fdT, fdR r3.Vec
		comps := func(v *r3.Vec, i int, val float64) {
			switch i {
			case 0:
				v.X = val
			case 1:
				v.Y = val
			default:
				v.Z = val
			}
		}
		for i, ax := range axes {
			comps(&fdT, i, (contract(mb.Translate(r3.Scale(eps, ax)))-contract(mb.Translate(r3.Scale(-eps, ax))))/(2*eps))
			comps(&fdR, i, (contract(mb.Rotate(ax, eps, centre))-contract(mb.Rotate(ax, -eps, centre)))/(2*eps))
		}
		scale := math.Max(r3.Norm(fdT), r3.Norm(fdR))
		if d := r3.Norm(r3.Sub(got.Translation, fdT)); d > 1e-6*scale {
			t.Errorf("κ=%g translation: analytic %v, finite difference %v", kappa, got.Translation, fdT)
		}
		if d := r3.Norm(r3.Sub(got.Rotation, fdR)); d > 1e-6*scale {
			t.Errorf("κ=%g rotation: analytic %v, finite difference %v", kappa, got.Rotation, fdR)
		}
	}
}

func mulElem(a, b *mat.Dense) *mat.Dense {
	var c mat.Dense
	c.MulElem(a, b)
	return &c
}

// TestCrossGradientNearPairs checks the subdivision of near pairs of two
// bodies against a reference that subdivides them until the sub-triangles are
// six sizes apart instead of three, with a 4×4 collapsed rule on them instead
// of the 7-point one (converged to about 1e-8); far pairs use
// the same rule on both sides. The box sits 0.4 above the sphere with panels
// of 0.3 to 0.6, so many pairs are near. Tolerance 1e-4 of the largest component:
// the default aims at 1e-5 per pair.
func TestCrossGradientNearPairs(t *testing.T) {
	ma, err := mesh.SphereLevel(1, 2)
	if err != nil {
		t.Fatal(err)
	}
	box, err := mesh.Box(r3.Vec{X: 0.8, Y: 0.6, Z: 0.6}, 0.3)
	if err != nil {
		t.Fatal(err)
	}
	a, b := surfaceOf(t, ma), surfaceOf(t, box.Translate(r3.Vec{Z: 1.7}))
	rng := rand.New(rand.NewPCG(3, 4))
	h := mat.NewDense(a.Len(), b.Len(), nil)
	for i := 0; i < a.Len(); i++ {
		for j := 0; j < b.Len(); j++ {
			h.Set(i, j, rng.NormFloat64())
		}
	}
	centre := r3.Vec{Z: 1.2}
	op, _ := NewEFIE(2)
	got, err := (Assembler{}).CrossGradient(context.Background(), h, op, a, b, centre)
	if err != nil {
		t.Fatal(err)
	}
	raw := h.RawMatrix()
	var ref Motion
	for s := range a.Panels {
		for tt := range b.Panels {
			if lv, _ := op.Quad.level(op.Kernel, &a.Panels[s], &b.Panels[tt]); lv >= 0 {
				gradPair(&ref, raw.Data, raw.Stride, op, a, s, b, tt, centre)
				continue
			}
			off := [3]int{a.edge[s][0] * raw.Stride, a.edge[s][1] * raw.Stride, a.edge[s][2] * raw.Stride}
			pp := collapse(raw.Data, off, b.edge[tt], op.Kappa, a, s, b, tt, centre)
			pp.sep, pp.leaf = 6, mustCollapsed(4)
			pp.subdivide(a.Panels[s].V, a.Panels[s].Centroid, b.Panels[tt].V, b.Panels[tt].Centroid, 0)
			ref.Translation = r3.Add(ref.Translation, pp.force)
			ref.Rotation = r3.Add(ref.Rotation, pp.torque)
		}
	}
	scale := math.Max(r3.Norm(ref.Translation), r3.Norm(ref.Rotation))
	if d := r3.Norm(r3.Sub(got.Translation, ref.Translation)); d > 1e-4*scale {
		t.Errorf("translation: default %v, reference %v (rel %.2g)", got.Translation, ref.Translation, d/scale)
	}
	if d := r3.Norm(r3.Sub(got.Rotation, ref.Rotation)); d > 1e-4*scale {
		t.Errorf("rotation: default %v, reference %v (rel %.2g)", got.Rotation, ref.Rotation, d/scale)
	}
}

// TestCrossGradientSparse checks that the sparse contraction, given a weight
// that vanishes outside a few rows and columns, equals the full one: the
// skipped pairs carry zero weight, so the sums agree bit for bit (tolerance
// 0), and an index out of range is an error.
func TestCrossGradientSparse(t *testing.T) {
	ma, err := mesh.SphereLevel(1, 2)
	if err != nil {
		t.Fatal(err)
	}
	a := surfaceOf(t, ma)
	b := a.Translate(r3.Vec{X: 0.4, Z: 2.6})
	rows, cols := []int{3, 17, 40}, []int{0, 25, 26, 61}
	rng := rand.New(rand.NewPCG(3, 4))
	h := mat.NewDense(a.Len(), b.Len(), nil)
	for _, i := range rows {
		for j := 0; j < b.Len(); j++ {
			h.Set(i, j, rng.NormFloat64())
		}
	}
	for _, j := range cols {
		for i := 0; i < a.Len(); i++ {
			h.Set(i, j, rng.NormFloat64())
		}
	}
	ctx := context.Background()
	centre := r3.Vec{X: 0.4, Z: 2.5}
	for _, kappa := range []float64{0.1, 3} {
		op, _ := NewEFIE(kappa)
		as := Assembler{Threads: 2}
		full, err := as.CrossGradient(ctx, h, op, a, b, centre)
		if err != nil {
			t.Fatal(err)
		}
		sparse, err := as.CrossGradientSparse(ctx, h, op, a, b, centre, rows, cols)
		if err != nil {
			t.Fatal(err)
		}
		if full != sparse {
			t.Errorf("κ=%g: sparse %+v, full %+v", kappa, sparse, full)
		}
	}
	op, _ := NewEFIE(1)
	if _, err := (Assembler{}).CrossGradientSparse(ctx, h, op, a, b, centre, []int{a.Len()}, nil); err == nil {
		t.Error("row out of range accepted")
	}
}

// TestCrossGradientBlock checks the contraction of a weight on a sub-block
// against the full contraction of the same weight placed in a zero matrix:
// the skipped pairs carry no weight, so the two agree to rounding
// (relative 1e-12: the pairs are summed in another grouping), and a row
// listed twice is an error.
func TestCrossGradientBlock(t *testing.T) {
	ma, err := mesh.SphereLevel(1, 2)
	if err != nil {
		t.Fatal(err)
	}
	a := surfaceOf(t, ma)
	b := a.Translate(r3.Vec{X: 0.4, Z: 2.6})
	rows, cols := []int{40, 3, 17, 18}, []int{61, 0, 25}
	rng := rand.New(rand.NewPCG(5, 6))
	hb := make([]float64, len(rows)*len(cols))
	h := mat.NewDense(a.Len(), b.Len(), nil)
	for k, i := range rows {
		for l, j := range cols {
			hb[k*len(cols)+l] = rng.NormFloat64()
			h.Set(i, j, hb[k*len(cols)+l])
		}
	}
	ctx := context.Background()
	centre := r3.Vec{X: 0.4, Z: 2.5}
	for _, kappa := range []float64{0.1, 3} {
		op, _ := NewEFIE(kappa)
		as := Assembler{Threads: 2}
		full, err := as.CrossGradient(ctx, h, op, a, b, centre)
		if err != nil {
			t.Fatal(err)
		}
		blk, err := as.CrossGradientBlock(ctx, hb, op, a, b, centre, rows, cols)
		if err != nil {
			t.Fatal(err)
		}
		scale := math.Max(r3.Norm(full.Translation), r3.Norm(full.Rotation))
		if d := math.Max(r3.Norm(r3.Sub(full.Translation, blk.Translation)), r3.Norm(r3.Sub(full.Rotation, blk.Rotation))); d > 1e-12*scale {
			t.Errorf("κ=%g: block %+v, full %+v", kappa, blk, full)
		}
	}
	op, _ := NewEFIE(1)
	if _, err := (Assembler{}).CrossGradientBlock(ctx, make([]float64, 2), op, a, b, centre, []int{3, 3}, []int{0}); err == nil {
		t.Error("row listed twice accepted")
	}
}
