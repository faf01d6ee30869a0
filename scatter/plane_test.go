package scatter

import (
	"context"
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/bem"
	"github.com/fluctus/fluctus/mesh"
)

var floor = &Plane{Normal: r3.Vec{Z: 1}}

// TestPlaneGradientFiniteDifference checks the gradient with the substrate
// (image motions included) against central differences of the integrand at
// fixed κ, for one body and for two, with the same tolerance and reasons as
// TestGradientFiniteDifference.
func TestPlaneGradientFiniteDifference(t *testing.T) {
	ball := sphere(t, 2).Translate(r3.Vec{X: 0.2, Z: 1.6})
	box, err := mesh.Box(r3.Vec{X: 1.2, Y: 0.8, Z: 0.5}, 0.4)
	if err != nil {
		t.Fatal(err)
	}
	tilted := box.Rotate(r3.Vec{X: 1, Y: 0.5}, 0.35, r3.Vec{}).Translate(r3.Vec{X: -1.8, Y: 0.3, Z: 1.1})
	scenes := [][]Body{
		{{Name: "ball", Mesh: ball}},
		{{Name: "box", Mesh: tilted}, {Name: "ball", Mesh: ball}},
	}
	centre := r3.Vec{X: 0.3, Y: 0.1, Z: 1.4}
	for si, bodies := range scenes {
		moving := len(bodies) - 1
		sys, err := newSystem(bodies, moving, 0, floor)
		if err != nil {
			t.Fatal(err)
		}
		checkGradient(t, sys, 0.9, centre, fmt.Sprintf("scene %d", si))
	}
}

// TestPlaneInvariance: moving and turning the body and the plane together
// leaves the energy unchanged (relative 1e-6, as for free bodies), and the
// substrate attracts the body (E < 0, force towards the plane).
func TestPlaneInvariance(t *testing.T) {
	ball := sphere(t, 2).Translate(r3.Vec{Z: 1.7})
	axis, angle := r3.Vec{X: 0.3, Y: 1, Z: 0.2}, 0.7
	rot := r3.NewRotation(angle, r3.Unit(axis))
	shift := r3.Vec{X: 5, Y: -3, Z: 2}
	run := func(m *mesh.Mesh, p *Plane, dir r3.Vec) Point {
		pts, err := Energies(context.Background(), []Body{{Name: "ball", Mesh: m}},
			Sweep{Body: 0, Direction: dir, Offsets: []r3.Vec{{}}, Centre: m.Stats().Centroid}, Settings{Accuracy: 1e-4, Forces: true, Substrate: p})
		if err != nil {
			t.Fatal(err)
		}
		return pts[0]
	}
	a := run(ball, floor, r3.Vec{Z: -1})
	moved := ball.Rotate(axis, angle, r3.Vec{}).Translate(shift)
	b := run(moved, &Plane{Point: shift, Normal: rot.Rotate(r3.Vec{Z: 1})}, rot.Rotate(r3.Vec{Z: -1}))
	if math.Abs(b.Energy/a.Energy-1) > 1e-6 {
		t.Errorf("energy %.12g, moved with the plane %.12g", a.Energy, b.Energy)
	}
	if !(a.Energy < 0) || !(a.Force.Z < 0) {
		t.Errorf("energy %g, force %v: want attraction towards the plane", a.Energy, a.Force)
	}
	if d := r3.Norm(r3.Sub(rot.Rotate(a.Force), b.Force)); d > 1e-5*r3.Norm(a.Force) {
		t.Errorf("force %v does not turn with the scene: %v", a.Force, b.Force)
	}
}

// TestPlaneMatrixSymmetricPositive checks DESIGN §6 for a sphere 0.3 above
// the substrate: the self block with its image, M - M_image, is symmetric to
// the quadrature accuracy (relative 1e-5: near pairs of body and image put the
// outer rule on the body's panel, so the two triangles of the image block are
// integrated differently; the solver uses one triangle) and positive
// definite (Cholesky succeeds, smallest eigenvalue positive).
func TestPlaneMatrixSymmetricPositive(t *testing.T) {
	m := sphere(t, 3).Translate(r3.Vec{Z: 1.3})
	sys, err := newSystem([]Body{{Name: "ball", Mesh: m}}, 0, 0, floor)
	if err != nil {
		t.Fatal(err)
	}
	s, img := sys.surf[0], sys.images[0]
	n := s.Len()
	for _, kappa := range []float64{0.05, 2} {
		op, _ := bem.NewEFIE(kappa)
		self := mat.NewSymDense(n, nil)
		if err := sys.asm.Self(context.Background(), self, op, s); err != nil {
			t.Fatal(err)
		}
		im := mat.NewDense(n, n, nil)
		if err := sys.asm.Cross(context.Background(), im, op, s, img); err != nil {
			t.Fatal(err)
		}
		asym := 0.0
		for i := 0; i < n; i++ {
			for j := 0; j < i; j++ {
				asym = math.Max(asym, math.Abs(im.At(i, j)-im.At(j, i)))
			}
		}
		if scale := mat.Norm(im, math.Inf(1)); asym > 1e-5*scale {
			t.Errorf("κ=%g: image block asymmetric by %.3g (norm %.3g)", kappa, asym, scale)
		}
		plane := mat.NewSymDense(n, nil)
		for i := 0; i < n; i++ {
			for j := i; j < n; j++ {
				plane.SetSym(i, j, self.At(i, j)-(im.At(i, j)+im.At(j, i))/2)
			}
		}
		var eig mat.EigenSym
		if !eig.Factorize(plane, false) {
			t.Fatal("eigen decomposition failed")
		}
		if v := eig.Values(nil); !(v[0] > 0) {
			t.Errorf("κ=%g: smallest eigenvalue of M - M_image %g", kappa, v[0])
		}
	}
}
