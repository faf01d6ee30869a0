package main

import (
	"bytes"
	"encoding/binary"
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/mesh"
)

// The crafted STL files in testdata/jobs are generated here, so what each
// one contains (and what is wrong with it) is written down in code. Run
// "go test ./cmd/fluctus -run TestFixtures -update" to rewrite them.
var update = flag.Bool("update", false, "rewrite the crafted STL fixtures in testdata/jobs")

// fixtureDir holds the job-file fixtures, relative to this package.
var fixtureDir = filepath.Join("..", "..", "testdata", "jobs")

// cube returns the 12 triangles of the axis-aligned cube of side 1 centred
// at c, counter-clockwise seen from outside.
func cube(c r3.Vec) [][3]r3.Vec {
	p := func(x, y, z float64) r3.Vec { return r3.Add(c, r3.Vec{X: x - 0.5, Y: y - 0.5, Z: z - 0.5}) }
	return [][3]r3.Vec{
		{p(0, 0, 0), p(0, 1, 0), p(1, 1, 0)}, {p(0, 0, 0), p(1, 1, 0), p(1, 0, 0)}, // z = 0, normal -z
		{p(0, 0, 1), p(1, 0, 1), p(1, 1, 1)}, {p(0, 0, 1), p(1, 1, 1), p(0, 1, 1)}, // z = 1, +z
		{p(0, 0, 0), p(1, 0, 0), p(1, 0, 1)}, {p(0, 0, 0), p(1, 0, 1), p(0, 0, 1)}, // y = 0, -y
		{p(0, 1, 0), p(0, 1, 1), p(1, 1, 1)}, {p(0, 1, 0), p(1, 1, 1), p(1, 1, 0)}, // y = 1, +y
		{p(0, 0, 0), p(0, 0, 1), p(0, 1, 1)}, {p(0, 0, 0), p(0, 1, 1), p(0, 1, 0)}, // x = 0, -x
		{p(1, 0, 0), p(1, 1, 0), p(1, 1, 1)}, {p(1, 0, 0), p(1, 1, 1), p(1, 0, 1)}, // x = 1, +x
	}
}

func normal(t [3]r3.Vec) r3.Vec {
	return r3.Unit(r3.Cross(r3.Sub(t[1], t[0]), r3.Sub(t[2], t[0])))
}

// binarySTL encodes triangles as binary STL (80-byte header, uint32
// count, 50 bytes per triangle) with the given count in the header.
func binarySTL(header string, count uint32, tris [][3]r3.Vec) []byte {
	var b bytes.Buffer
	h := make([]byte, 80)
	copy(h, header)
	b.Write(h)
	binary.Write(&b, binary.LittleEndian, count)
	for _, t := range tris {
		n := normal(t)
		for _, v := range []r3.Vec{n, t[0], t[1], t[2]} {
			binary.Write(&b, binary.LittleEndian, [3]float32{float32(v.X), float32(v.Y), float32(v.Z)})
		}
		binary.Write(&b, binary.LittleEndian, uint16(0))
	}
	return b.Bytes()
}

// asciiSTL encodes triangles as ASCII STL.
func asciiSTL(name string, tris [][3]r3.Vec) []byte {
	var b strings.Builder
	fmt.Fprintf(&b, "solid %s\n", name)
	for _, t := range tris {
		n := normal(t)
		fmt.Fprintf(&b, "  facet normal %g %g %g\n    outer loop\n", n.X, n.Y, n.Z)
		for _, v := range t {
			fmt.Fprintf(&b, "      vertex %g %g %g\n", v.X, v.Y, v.Z)
		}
		b.WriteString("    endloop\n  endfacet\n")
	}
	fmt.Fprintf(&b, "endsolid %s\n", name)
	return []byte(b.String())
}

// fixtures returns the crafted STL files by name.
func fixtures() map[string][]byte {
	c := cube(r3.Vec{})
	good := binarySTL("fluctus fixture: unit cube", 12, c)
	// Two unit cubes that share one edge (x = y = 0.5): four triangles
	// meet there.
	twin := append(cube(r3.Vec{}), cube(r3.Vec{X: 1, Y: 1})...)
	return map[string][]byte{
		// A closed unit cube centred at the origin, ASCII.
		"cube.stl": asciiSTL("cube", c),
		// The binary cube cut off 20 bytes before its end.
		"truncated.stl": good[:len(good)-20],
		// A complete binary cube whose header declares 13 triangles.
		"wrongcount.stl": binarySTL("fluctus fixture: header count 13, 12 stored", 13, c),
		// The cube without its last triangle: a hole with three open edges.
		"open.stl": binarySTL("fluctus fixture: cube with a missing triangle", 11, c[:11]),
		// Two cubes joined along an edge.
		"nonmanifold.stl": binarySTL("fluctus fixture: two cubes sharing an edge", 24, twin),
	}
}

func TestFixtures(t *testing.T) {
	for name, want := range fixtures() {
		path := filepath.Join(fixtureDir, name)
		if *update {
			if err := os.WriteFile(path, want, 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		got, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run with -update to create it)", err)
		}
		if !bytes.Equal(got, want) {
			t.Errorf("%s differs from its description in fixtures() (run with -update to rewrite it)", path)
		}
	}
	// The good fixtures must be what they claim: the reader and the checks
	// of package mesh find a closed unit cube (area 6, volume 1, exact in
	// float32) and a closed plate.
	m, err := mesh.Load(filepath.Join(fixtureDir, "cube.stl"))
	if err != nil {
		t.Fatal(err)
	}
	if err := m.Validate(); err != nil {
		t.Errorf("cube.stl: %v", err)
	}
	if st := m.Stats(); st.Triangles != 12 || st.Vertices != 8 || math.Abs(st.Area-6) > 1e-12 || math.Abs(st.Volume-1) > 1e-12 {
		t.Errorf("cube.stl: %+v, want 12 triangles, 8 vertices, area 6, volume 1", st)
	}
	pad, err := mesh.Load(filepath.Join(fixtureDir, "pad.stl"))
	if err != nil {
		t.Fatal(err)
	}
	if err := pad.Validate(); err != nil {
		t.Errorf("pad.stl: %v", err)
	}
}
