package scatter

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
)

// plateEnergy is Casimir's energy per area of two parallel perfect conductors
// at distance d (Casimir 1948), in ħc/L0 per L0²: -π²/(720 d³).
func plateEnergy(d float64) float64 { return -math.Pi * math.Pi / (720 * d * d * d) }

// PFAEnergy returns the proximity-force estimate of the scene's energy
// (Derjaguin 1934; DESIGN §7) with the bodies where they are:
//
//	E_PFA = Σ_panels A_p |cos θ_p| e(d_p),  e(d) = -π²/(720 d³),
//
// where each panel that faces along ±dir casts a ray from its centroid in the
// direction it faces, d_p is the distance to the first surface of another body
// that faces back, and θ_p is the angle between the panel normal and dir. For
// each pair of bodies the estimate is taken from the panels of either body;
// FromMoving uses the moving body's panels for the pairs it belongs to,
// FromFixed the other body's, and pairs of fixed bodies enter both with the
// mean of their two sides. Energies are in ħc/L0.
//
// Over a substrate (plane not nil) each body's panels facing the plane add
// A_p |cos θ_p| e(h_p) with h_p the height of the panel centroid along the
// plane normal, in both FromMoving and FromFixed (the plane has no panels).
//
// By default e is the perfect-conductor law above for every pair. The option
// WithPlateLaw replaces it by a law of the two facing bodies' materials (for
// instance PlateTable.Energy, the Lifshitz energy per area; DESIGN §13).
func PFAEnergy(bodies []Body, moving int, dir r3.Vec, plane *Plane, opts ...PFAOption) PFA {
	var cfg pfaConfig
	for _, o := range opts {
		o(&cfg)
	}
	var est PFA
	if l := r3.Norm(dir); l > 0 {
		dir = r3.Scale(1/l, dir)
	} else if plane == nil {
		return est
	}
	meshes := make([]*mesh.Mesh, len(bodies))
	trees := make([]*mesh.Tree, len(bodies))
	for i, b := range bodies {
		meshes[i] = b.Mesh
		trees[i] = mesh.NewTree(meshes[i])
	}
	for i := range bodies {
		for j := i + 1; j < len(bodies) && dir != (r3.Vec{}); j++ {
			e := cfg.pair(i, j)
			eij := pfaFrom(meshes[i], trees[j], dir, e)
			eji := pfaFrom(meshes[j], trees[i], dir, e)
			switch moving {
			case i:
				est.FromMoving += eij
				est.FromFixed += eji
			case j:
				est.FromMoving += eji
				est.FromFixed += eij
			default:
				est.FromMoving += (eij + eji) / 2
				est.FromFixed += (eij + eji) / 2
			}
		}
	}
	if plane != nil {
		for i, m := range meshes {
			e := pfaPlane(m, plane, cfg.pair(i, SubstrateIndex))
			est.FromMoving += e
			est.FromFixed += e
		}
	}
	est.Mean = (est.FromMoving + est.FromFixed) / 2
	return est
}

// pfaPlane sums the energy per area plate(h) over the panels of m facing
// the plane.
func pfaPlane(m *mesh.Mesh, p *Plane, plate func(d float64) float64) float64 {
	n := r3.Unit(p.Normal)
	e := 0.0
	for t := range m.Triangles {
		proj := r3.Dot(m.AreaVector(t), n)
		if proj >= 0 {
			continue // faces away from the plane
		}
		if h := r3.Dot(r3.Sub(m.Centroid(t), p.Point), n); h > 0 {
			e += -proj * plate(h)
		}
	}
	return e
}

// pfaFrom sums the energy per area plate(d) over the panels of m facing the
// surface held by other along ±dir.
func pfaFrom(m *mesh.Mesh, other *mesh.Tree, dir r3.Vec, plate func(d float64) float64) float64 {
	om := other.Mesh()
	e := 0.0
	for t := range m.Triangles {
		av := m.AreaVector(t)
		proj := r3.Dot(av, dir) // A cos θ, signed
		if proj == 0 {
			continue
		}
		ray := dir
		if proj < 0 {
			ray = r3.Scale(-1, dir)
		}
		d, hit, ok := other.Ray(m.Centroid(t), ray)
		if !ok || !(d > 0) {
			continue
		}
		// The surface hit must face back towards the panel.
		if r3.Dot(om.AreaVector(hit), ray) >= 0 {
			continue
		}
		e += math.Abs(proj) * plate(d)
	}
	return e
}

// SubstrateIndex stands for the substrate plane in place of a body index in
// a PlateLaw.
const SubstrateIndex = -1

// PlateLaw returns the energy per area, in ħc/L0 per L0², of two parallel
// half-spaces at distance d (L0) made of the materials of bodies i and j
// (j = SubstrateIndex: the perfectly conducting substrate). It must be safe
// for concurrent use.
type PlateLaw func(i, j int, d float64) float64

// PFAOption modifies PFAEnergy.
type PFAOption func(*pfaConfig)

// WithPlateLaw makes PFAEnergy sum law in place of the perfect-conductor
// energy per area -π²/(720 d³); a nil law keeps the default.
func WithPlateLaw(law PlateLaw) PFAOption {
	return func(c *pfaConfig) { c.law = law }
}

// pfaConfig holds the options of PFAEnergy.
type pfaConfig struct {
	law PlateLaw // nil: perfect conductors
}

// pair returns the energy per area of the pair (i, j).
func (c *pfaConfig) pair(i, j int) func(d float64) float64 {
	if c.law == nil {
		return plateEnergy
	}
	law := c.law
	return func(d float64) float64 { return law(i, j, d) }
}
