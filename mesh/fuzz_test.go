package mesh

import (
	"bytes"
	"testing"
)

// FuzzRead feeds arbitrary bytes to the STL reader: it must never panic, and
// whatever it accepts must be a mesh with triangles, valid indices and finite
// coordinates on which Check and Stats run.
func FuzzRead(f *testing.F) {
	cube := unitCube()
	f.Add(binarySTL(f, cube))
	f.Add(asciiSTL(f, cube))
	f.Add([]byte("solid x\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\nvertex 1 0 0\nvertex 0 1 0\nendloop\nendfacet\nendsolid x\n"))
	f.Add([]byte{})
	f.Fuzz(func(t *testing.T, data []byte) {
		m, err := Read(bytes.NewReader(data), "fuzz")
		if err != nil {
			return
		}
		if len(m.Triangles) == 0 {
			t.Fatal("accepted a mesh without triangles")
		}
		for i, tr := range m.Triangles {
			for _, v := range tr {
				if v < 0 || v >= len(m.Vertices) {
					t.Fatalf("triangle %d has index %d of %d", i, v, len(m.Vertices))
				}
			}
		}
		for i, v := range m.Vertices {
			if !finite(v) {
				t.Fatalf("vertex %d not finite: %v", i, v)
			}
		}
		_ = m.Check()
		_ = m.Stats()
		_ = m.Validate()
	})
}
