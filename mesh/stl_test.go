package mesh

import (
	"bytes"
	"encoding/binary"
	"flag"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/hschendel/stl"
	"gonum.org/v1/gonum/spatial/r3"
)

var update = flag.Bool("update", false, "rewrite the STL fixtures in testdata/mesh")

const fixtures = "../testdata/mesh"

// unitCube is the cube [0,1]³ as 12 outward triangles on 8 vertices.
func unitCube() *Mesh {
	m := &Mesh{Name: "unit cube"}
	for i := 0; i < 8; i++ {
		m.Vertices = append(m.Vertices, r3.Vec{X: float64(i & 1), Y: float64(i >> 1 & 1), Z: float64(i >> 2 & 1)})
	}
	m.Triangles = [][3]int{
		{0, 2, 1}, {1, 2, 3}, // z = 0, normal -z
		{4, 5, 6}, {5, 7, 6}, // z = 1, normal +z
		{0, 1, 4}, {1, 5, 4}, // y = 0, normal -y
		{2, 6, 3}, {3, 6, 7}, // y = 1, normal +y
		{0, 4, 2}, {2, 4, 6}, // x = 0, normal -x
		{1, 3, 5}, {3, 7, 5}, // x = 1, normal +x
	}
	return m
}

// asciiSTL renders m with the STL library's own ASCII writer.
func asciiSTL(t testing.TB, m *Mesh) []byte {
	t.Helper()
	s := stl.Solid{Name: "cube", IsAscii: true}
	for tr := range m.Triangles {
		a, b, c := m.Corners(tr)
		n := m.Normal(tr)
		f := func(v r3.Vec) stl.Vec3 { return stl.Vec3{float32(v.X), float32(v.Y), float32(v.Z)} }
		s.Triangles = append(s.Triangles, stl.Triangle{Normal: f(n), Vertices: [3]stl.Vec3{f(a), f(b), f(c)}})
	}
	var buf bytes.Buffer
	if err := s.WriteAll(&buf); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

func binarySTL(t testing.TB, m *Mesh) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := Write(&buf, m); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// fixtureFiles returns the contents of every fixture, generated from the
// unit cube.
func fixtureFiles(t testing.TB) map[string][]byte {
	cube := unitCube()
	bin := binarySTL(t, cube)
	asc := asciiSTL(t, cube)
	mismatch := append([]byte(nil), bin...)
	binary.LittleEndian.PutUint32(mismatch[80:], 20) // 12 triangles stored
	nan := append([]byte(nil), bin...)
	// Triangle 5, first vertex, y coordinate := NaN.
	binary.LittleEndian.PutUint32(nan[stlHeaderSize+5*stlTriangleSize+12+4:], math.Float32bits(float32(math.NaN())))
	noTri := append([]byte(nil), bin[:stlHeaderSize]...)
	binary.LittleEndian.PutUint32(noTri[80:], 0)
	open := unitCube()
	open.Triangles = open.Triangles[:11]
	return map[string][]byte{
		"cube_binary.stl":     bin,
		"cube_ascii.stl":      asc,
		"empty.stl":           {},
		"no_triangles.stl":    noTri,
		"truncated.stl":       bin[:len(bin)-30],
		"truncated_ascii.stl": asc[:len(asc)*2/3],
		"count_mismatch.stl":  mismatch,
		"nan.stl":             nan,
		"open_cube.stl":       binarySTL(t, open),
	}
}

// TestFixtures keeps testdata/mesh in step with the generator above; run
// with -update to rewrite the files.
func TestFixtures(t *testing.T) {
	for name, want := range fixtureFiles(t) {
		path := filepath.Join(fixtures, name)
		if *update {
			if err := os.WriteFile(path, want, 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		got, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run go test ./mesh -run TestFixtures -update)", err)
		}
		if !bytes.Equal(got, want) {
			t.Errorf("%s differs from its generator (run with -update)", path)
		}
	}
}

// sameGeometry reports whether two meshes have the same triangles (each as
// its three corner positions in order) to within tol.
func sameGeometry(a, b *Mesh, tol float64) bool {
	if len(a.Triangles) != len(b.Triangles) {
		return false
	}
	for t := range a.Triangles {
		a0, a1, a2 := a.Corners(t)
		b0, b1, b2 := b.Corners(t)
		if r3.Norm(r3.Sub(a0, b0)) > tol || r3.Norm(r3.Sub(a1, b1)) > tol || r3.Norm(r3.Sub(a2, b2)) > tol {
			return false
		}
	}
	return true
}

func TestLoadCube(t *testing.T) {
	// Both fixtures hold the unit cube as 36 unshared corners; welding must
	// give the 8 vertices and 12 triangles of the cube, which passes Check
	// with volume 1 (corners are exact in float32).
	for _, name := range []string{"cube_binary.stl", "cube_ascii.stl"} {
		path := filepath.Join(fixtures, name)
		m, err := Load(path)
		if err != nil {
			t.Fatal(err)
		}
		if m.Name != path {
			t.Errorf("name %q, want %q", m.Name, path)
		}
		if len(m.Vertices) != 8 || len(m.Triangles) != 12 {
			t.Errorf("%s: %d vertices, %d triangles; want 8, 12", name, len(m.Vertices), len(m.Triangles))
		}
		if err := m.Validate(); err != nil {
			t.Error(err)
		}
		if v := m.Volume(); v != 1 {
			t.Errorf("%s: volume %v, want 1", name, v)
		}
		if !sameGeometry(m, unitCube(), 0) {
			t.Errorf("%s: triangles differ from the cube that was written", name)
		}
	}
}

func TestWeldCounts(t *testing.T) {
	raw, err := decodeSTL(fixtureFiles(t)["cube_binary.stl"], "cube")
	if err != nil {
		t.Fatal(err)
	}
	if len(raw.Vertices) != 36 {
		t.Fatalf("unwelded: %d vertices", len(raw.Vertices))
	}
	// Jitter every vertex by a distinct amount up to 1e-7: a tolerance of 1e-6 still merges
	// the copies of one corner, a tolerance of 1e-9 merges nothing.
	jit := raw.Clone()
	for i := range jit.Vertices {
		d := 1e-7 * float64(i+1) / 36 // distinct for every copy: ≥ 2.8e-9 apart
		jit.Vertices[i] = r3.Add(jit.Vertices[i], r3.Vec{X: d, Y: -d, Z: d / 2})
	}
	for _, c := range []struct {
		name         string
		m            *Mesh
		tol          float64
		wantV, merge int
	}{
		{"exact, tol 0", raw, 0, 8, 28},
		{"exact, tol 1e-6", raw, 1e-6, 8, 28},
		{"jittered, tol 1e-6", jit, 1e-6, 8, 28},
		{"jittered, tol 1e-9", jit, 1e-9, 36, 0},
	} {
		w, n := Weld(c.m, c.tol)
		if len(w.Vertices) != c.wantV || n != c.merge || len(w.Triangles) != 12 {
			t.Errorf("%s: %d vertices, %d merged, %d triangles; want %d, %d, 12", c.name, len(w.Vertices), n, len(w.Triangles), c.wantV, c.merge)
		}
	}
	// Unused vertices are dropped and merging never removes triangles.
	m := unitCube()
	m.Vertices = append(m.Vertices, r3.Vec{X: 9})
	m.Triangles = append(m.Triangles, [3]int{0, 1, 1})
	w, _ := Weld(m, 1e-6)
	if len(w.Vertices) != 8 || len(w.Triangles) != 13 {
		t.Errorf("got %d vertices, %d triangles; want 8, 13", len(w.Vertices), len(w.Triangles))
	}
}

func TestRoundTrip(t *testing.T) {
	// Write then Read must give back the same triangles. Coordinates go
	// through float32, so positions agree to float32 rounding: relative
	// 2^-24 ≈ 6e-8 of the coordinate size, here ≤ 3, so 3e-7 absolute.
	dir := t.TempDir()
	box, _ := Box(r3.Vec{X: 1, Y: 2, Z: 0.5}, 0.3)
	sph, _ := Sphere(1.3, 0.4)
	cyl, _ := Cylinder(0.7, 1.2, 0.2)
	for _, m := range []*Mesh{box, sph, cyl, unitCube()} {
		path := filepath.Join(dir, strings.ReplaceAll(m.Name, " ", "_")+".stl")
		if err := Save(path, m); err != nil {
			t.Fatal(err)
		}
		got, err := Load(path)
		if err != nil {
			t.Fatal(err)
		}
		if len(got.Vertices) != len(m.Vertices) || !sameGeometry(got, m, 3e-7) {
			t.Errorf("%s: round trip changed the mesh (%d vertices, was %d)", m.Name, len(got.Vertices), len(m.Vertices))
		}
		if err := got.Validate(); err != nil {
			t.Error(err)
		}
		// The file holds exactly header + 50 bytes per triangle, and the
		// facet normals written are unit and outward.
		data, _ := os.ReadFile(path)
		if len(data) != stlHeaderSize+stlTriangleSize*len(m.Triangles) {
			t.Errorf("%s: %d bytes", m.Name, len(data))
		}
		var solid stl.Solid
		if err := stl.CopyAll(bytes.NewReader(data), &solid); err != nil {
			t.Fatal(err)
		}
		for i, tr := range solid.Triangles {
			n := r3.Vec{X: float64(tr.Normal[0]), Y: float64(tr.Normal[1]), Z: float64(tr.Normal[2])}
			if math.Abs(r3.Norm(n)-1) > 1e-6 || r3.Dot(n, m.Normal(i)) < 1-1e-6 {
				t.Fatalf("%s: facet %d normal %v, want %v", m.Name, i, n, m.Normal(i))
			}
		}
		// ASCII rendering of the same mesh reads back too.
		a, err := Read(bytes.NewReader(asciiSTL(t, m)), "ascii")
		if err != nil {
			t.Fatal(err)
		}
		if !sameGeometry(a, m, 3e-7) {
			t.Errorf("%s: ASCII round trip changed the mesh", m.Name)
		}
	}
	// No temporary files are left behind.
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.Contains(e.Name(), ".tmp") {
			t.Errorf("leftover %s", e.Name())
		}
	}
}

func TestSaveErrors(t *testing.T) {
	if err := Save(filepath.Join(t.TempDir(), "no", "such", "dir", "x.stl"), unitCube()); err == nil {
		t.Error("saving into a missing directory: no error")
	}
	bad := unitCube()
	bad.Triangles[3][1] = 99
	if err := Save(filepath.Join(t.TempDir(), "x.stl"), bad); err == nil || !strings.Contains(err.Error(), "triangle 3") {
		t.Errorf("invalid index: %v", err)
	}
}

func TestLoadErrors(t *testing.T) {
	// Each message must name the file and contain the given phrases.
	cases := []struct {
		file string
		want []string
	}{
		{"missing.stl", []string{"missing.stl", "cannot open", "check the path"}},
		{"empty.stl", []string{"empty.stl", "empty", "export"}},
		{"no_triangles.stl", []string{"no_triangles.stl", "no triangles"}},
		{"truncated.stl", []string{"truncated.stl", "truncated", "declares 12 triangles", "partway through triangle 11"}},
		{"truncated_ascii.stl", []string{"truncated_ascii.stl", "truncated"}},
		{"count_mismatch.stl", []string{"count_mismatch.stl", "declares 20 triangles", "room for 12.0 triangles"}},
		{"nan.stl", []string{"nan.stl", "triangle 5", "non-finite"}},
	}
	for _, c := range cases {
		path := filepath.Join(fixtures, c.file)
		m, err := Load(path)
		if err == nil {
			t.Errorf("%s: no error (%d triangles)", c.file, len(m.Triangles))
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %q does not contain %q", c.file, err, w)
			}
		}
	}
	// An open cube loads (the reader does not judge topology) and Validate
	// names its file and the problem.
	m, err := Load(filepath.Join(fixtures, "open_cube.stl"))
	if err != nil {
		t.Fatal(err)
	}
	err = m.Validate()
	if err == nil || !strings.Contains(err.Error(), "open_cube.stl") || !strings.Contains(err.Error(), "open edge") {
		t.Errorf("open cube: %v", err)
	}
}

func TestReadVariants(t *testing.T) {
	asc := string(asciiSTL(t, unitCube()))
	for _, c := range []struct {
		name string
		data string
		ok   bool
	}{
		{"leading blank lines", "\n\n  " + asc, true},
		{"bare solid keyword", "solid\n" + asc[strings.Index(asc, "\n")+1:], true},
		{"garbage", "hello world", false},
		{"solid only", "solid x\nendsolid x\n", false},
		{"bad float", strings.Replace(asc, "vertex 0 0 0", "vertex 0 zero 0", 1), false},
	} {
		_, err := Read(strings.NewReader(c.data), c.name)
		if (err == nil) != c.ok {
			t.Errorf("%s: err = %v, want ok=%v", c.name, err, c.ok)
		}
		if err != nil && !strings.Contains(err.Error(), c.name) {
			t.Errorf("%s: error %q does not name the input", c.name, err)
		}
	}
	// A binary file whose header begins with "solid" is still binary.
	bin := binarySTL(t, unitCube())
	copy(bin, "solid trap")
	m, err := Read(bytes.NewReader(bin), "solid header")
	if err != nil || len(m.Triangles) != 12 {
		t.Errorf("binary with solid header: %v", err)
	}
}
