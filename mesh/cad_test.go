package mesh

import (
	"bytes"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// cadFixtures holds STL files exported by CAD and meshing programs from the
// sources beside them (see its README.md and regenerate.sh).
const cadFixtures = "../testdata/cad"

// cadModel is one exported model with what its source script says about it.
// Lengths are in micrometres, as in the sources.
type cadModel struct {
	file      string
	triangles int // in the committed export (a guard against accidental change)
	// volume and area of the smooth model, the range [volLo, volHi] and the
	// tolerance areaTol the faceting allows (reasons in cadModels).
	volume, volLo, volHi float64
	area, areaTol        float64
	lo, hi               r3.Vec  // smooth model's bounding box
	loZTol               float64 // how far the lowest point may sit above lo.Z by faceting
}

// cadModels are the committed exports. The tolerances come from the faceting:
//
// paddle.stl (OpenSCAD, paddle.scad): a plate 8 x 8 x 0.5 with four
// hemispherical bumps of radius r = 0.3 below. The plate is exact; each bump
// is the lower half of OpenSCAD's sphere with $fn = 12 (6 latitude rings of
// 12 vertices, every vertex on the sphere). That polyhedron is convex and
// inscribed, so it lies inside the ball of radius r and contains the ball of
// radius c·r, c = cos 21.2° = 0.932: no face's vertices are further than
// 21.2° from the face's centre (a 30° x 30° quad of the equatorial band).
// Hence each bump's volume lies in [c³, 1]·(2/3)πr³, and, by the monotony of
// the boundary area of nested convex bodies (common practice), its area
// added to the plate (curved part minus its base polygon) in
// [3c² − 2, 3 − 2c²]·πr² = [0.61, 1.27]·πr², against πr² for a smooth
// hemisphere; its lowest point (the bottom ring's 12-gon) lies in
// [−r, −c·r].
//
// dimpled-pad.stl (gmsh, dimpled-pad.geo): a pad 6 x 6 x 0.5 with a spherical
// cap below, sphere radius R = 1, height h = 0.25. The flat faces are exact;
// gmsh puts the cap's vertices on the sphere, so its flat triangles lie
// inside the sphere, within the sagitta ρ²/(2R) of it for a triangle of
// circumradius ρ. The curvature setting (12 elements per 2π) keeps the cap's
// edges near 2πR/12 = 0.52, ρ ≈ 0.3, sagitta ≤ 0.05 over the cap's area
// 2πRh = 1.57: at most 0.08 of volume lost, none gained, and an area change
// below the same 0.08 (the relative area deficit of a chord triangle is of
// the order of its sagitta over R). The tip is the sphere's pole, a vertex of
// the mesh: lowest point exact up to float32 rounding.
var cadModels = []cadModel{
	func() cadModel {
		const w, t, r, c = 8.0, 0.5, 0.3, 0.932
		bumps := 4 * 2.0 / 3 * math.Pi * r * r * r
		plate := w * w * t
		return cadModel{
			file: "paddle.stl", triangles: 396,
			volume: plate + bumps, volLo: plate + c*c*c*bumps, volHi: plate + bumps + stlRound(w),
			area: 2*w*w + 4*w*t + 4*math.Pi*r*r, areaTol: 4 * (1 - (3*c*c - 2)) * math.Pi * r * r,
			lo: r3.Vec{X: -w / 2, Y: -w / 2, Z: -r}, hi: r3.Vec{X: w / 2, Y: w / 2, Z: t},
			loZTol: (1 - c) * r,
		}
	}(),
	func() cadModel {
		const w, t, R, h = 6.0, 0.5, 1.0, 0.25
		cap := math.Pi * h * h * (3*R - h) / 3 // spherical cap volume
		return cadModel{
			file: "dimpled-pad.stl", triangles: 580,
			volume: w*w*t + cap, volLo: w*w*t + cap - 0.08, volHi: w*w*t + cap + stlRound(w),
			// The cap adds 2πRh and removes its base disc π(2Rh − h²): πh² net.
			area: 2*w*w + 4*w*t + math.Pi*h*h, areaTol: 0.08,
			lo: r3.Vec{X: -w / 2, Y: -w / 2, Z: -h}, hi: r3.Vec{X: w / 2, Y: w / 2, Z: t},
			loZTol: stlRound(w),
		}
	}(),
}

// stlRound is a bound on the float32 rounding of STL coordinates up to size
// (relative 2⁻²⁴, with a factor of 4 for products in volumes and areas).
func stlRound(size float64) float64 { return 4 * size * size * size * 0x1p-24 }

// TestCADLoadAndCheck loads each export with Load and checks what the checks
// rest on: STL stores each triangle with its own corners, so before welding
// every edge is open — Check must say so — and after welding (Load does it)
// the surface is closed, consistently and outwardly oriented and manifold,
// with Euler characteristic V − E + F = 2, as for any closed surface of genus
// 0 (a fact of the trade: the pad and the paddle are solid, without holes).
func TestCADLoadAndCheck(t *testing.T) {
	for _, c := range cadModels {
		t.Run(c.file, func(t *testing.T) {
			path := filepath.Join(cadFixtures, c.file)
			data, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			raw, err := decodeSTL(data, path)
			if err != nil {
				t.Fatal(err)
			}
			if len(raw.Triangles) != c.triangles {
				t.Fatalf("%d triangles, want %d (was the file exported again? update cadModels and testdata/cad/README.md)", len(raw.Triangles), c.triangles)
			}
			// Unwelded: every edge is used by one triangle only.
			ps := raw.Check()
			if len(ps) == 0 || ps[0].Kind != OpenEdge {
				t.Fatalf("unwelded %s: Check found %v, want open edges first", c.file, ps)
			}
			if err := raw.Validate(); err == nil || !strings.Contains(err.Error(), "open edge") {
				t.Errorf("unwelded %s: Validate = %v, want an error naming open edges", c.file, err)
			} else {
				t.Logf("unwelded: %.200s...", err)
			}

			m, err := Load(path)
			if err != nil {
				t.Fatal(err)
			}
			merged := 3*len(m.Triangles) - len(m.Vertices)
			t.Logf("Load: %d triangles, %d corners welded into %d vertices (%d merged)", len(m.Triangles), 3*len(m.Triangles), len(m.Vertices), merged)
			if err := m.Validate(); err != nil {
				t.Fatalf("welded: %v", err)
			}
			s := m.Stats()
			if chi := s.Vertices - s.Edges + s.Triangles; chi != 2 {
				t.Errorf("Euler characteristic V − E + F = %d − %d + %d = %d, want 2", s.Vertices, s.Edges, s.Triangles, chi)
			}
			// A closed triangulated surface has 3F = 2E (each edge in two
			// triangles): exact.
			if 3*s.Triangles != 2*s.Edges {
				t.Errorf("3F = %d, 2E = %d: want equal", 3*s.Triangles, 2*s.Edges)
			}
		})
	}
}

// TestCADMeasures compares the volume, area and bounding box of each export
// with its smooth model, within the faceting bounds derived in cadModels.
func TestCADMeasures(t *testing.T) {
	for _, c := range cadModels {
		t.Run(c.file, func(t *testing.T) {
			m, err := Load(filepath.Join(cadFixtures, c.file))
			if err != nil {
				t.Fatal(err)
			}
			s := m.Stats()
			t.Logf("volume %.6g (smooth %.6g, %+.3g %%), area %.6g (smooth %.6g, %+.3g %%), box %v to %v",
				s.Volume, c.volume, 100*(s.Volume/c.volume-1), s.Area, c.area, 100*(s.Area/c.area-1), s.Min, s.Max)
			if s.Volume < c.volLo || s.Volume > c.volHi {
				t.Errorf("volume %.6g, want in [%.6g, %.6g] (smooth model %.6g)", s.Volume, c.volLo, c.volHi, c.volume)
			}
			if d := math.Abs(s.Area - c.area); d > c.areaTol {
				t.Errorf("area %.6g, want %.6g within %.3g (off by %.3g)", s.Area, c.area, c.areaTol, d)
			}
			// Flat faces are exact: the box's sides and top to float32
			// rounding; the lowest point within the faceting allowance.
			round := stlRound(1)
			for _, q := range []struct {
				name      string
				got, want float64
			}{
				{"min x", s.Min.X, c.lo.X}, {"min y", s.Min.Y, c.lo.Y},
				{"max x", s.Max.X, c.hi.X}, {"max y", s.Max.Y, c.hi.Y}, {"max z", s.Max.Z, c.hi.Z},
			} {
				if math.Abs(q.got-q.want) > round*math.Max(1, math.Abs(q.want)) {
					t.Errorf("%s %.9g, want %.9g (flat face: exact to float32 rounding)", q.name, q.got, q.want)
				}
			}
			if z := s.Min.Z; z < c.lo.Z-round || z > c.lo.Z+c.loZTol {
				t.Errorf("min z %.9g, want in [%.9g, %.9g]", z, c.lo.Z, c.lo.Z+c.loZTol)
			}
		})
	}
}

// cadTools are the programs regenerate.sh runs, with the versions that made
// the committed files: another version may triangulate differently.
var cadTools = []struct{ name, version string }{
	{"openscad", "OpenSCAD version 2021.01"},
	{"gmsh", "4.8.4"},
}

// TestCADRegenerate reruns testdata/cad/regenerate.sh into a temporary
// directory when OpenSCAD and gmsh (of the recorded versions) are installed,
// and checks that the fresh exports have the committed triangle counts and
// pass the checks. Without the tools it is skipped.
func TestCADRegenerate(t *testing.T) {
	if testing.Short() {
		t.Skip("short mode: not running the CAD programs")
	}
	for _, tool := range cadTools {
		if _, err := exec.LookPath(tool.name); err != nil {
			t.Skipf("%s is not installed (apt-get install openscad gmsh): the committed STL files are checked by TestCADLoadAndCheck", tool.name)
		}
		out, err := exec.Command(tool.name, "--version").CombinedOutput()
		if err != nil {
			t.Skipf("%s --version: %v", tool.name, err)
		}
		if v := strings.TrimSpace(string(out)); v != tool.version {
			t.Skipf("%s reports %q, the committed files were made with %q: its triangulation may differ", tool.name, v, tool.version)
		}
	}
	dir := t.TempDir()
	cmd := exec.Command("sh", filepath.Join(cadFixtures, "regenerate.sh"), dir)
	var log bytes.Buffer
	cmd.Stdout, cmd.Stderr = &log, &log
	if err := cmd.Run(); err != nil {
		t.Fatalf("regenerate.sh: %v\n%s", err, log.String())
	}
	for _, c := range cadModels {
		m, err := Load(filepath.Join(dir, c.file))
		if err != nil {
			t.Fatal(err)
		}
		if len(m.Triangles) != c.triangles {
			t.Errorf("fresh %s: %d triangles, committed %d", c.file, len(m.Triangles), c.triangles)
		}
		if err := m.Validate(); err != nil {
			t.Errorf("fresh %s: %v", c.file, err)
		}
	}
}
