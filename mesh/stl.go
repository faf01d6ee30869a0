package mesh

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"github.com/hschendel/stl"
	"gonum.org/v1/gonum/spatial/r3"
)

// Binary STL layout: an 80-byte header, a little-endian uint32 triangle
// count, then 50 bytes per triangle (normal, three vertices as float32 and a
// uint16 attribute).
const (
	stlHeaderSize   = 84
	stlTriangleSize = 50
)

// WeldTolerance is the relative welding tolerance used by Load and Read:
// vertices closer than WeldTolerance × (bounding-box diagonal) are merged.
const WeldTolerance = 1e-6

// Load reads the binary or ASCII STL file at path (the format is detected)
// into a mesh named path. STL stores every triangle with its own three
// vertices, so Load welds vertices closer than 1e-6 × the bounding-box
// diagonal (WeldTolerance) with Weld. Triangles keep their vertex order; the
// facet normals stored in the file are ignored. Load does not check the
// topology: call Check or Validate on the result.
//
// The error names the file and says what to do when it is missing or
// unreadable, empty, truncated, a binary file whose triangle count disagrees
// with its size, an ASCII file that does not parse, or when a coordinate is
// not finite (naming the triangle).
func Load(path string) (*Mesh, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("mesh: cannot open STL file: %w (check the path and permissions)", err)
	}
	defer f.Close()
	return Read(f, path)
}

// Read reads a binary or ASCII STL stream like Load; name labels the mesh and
// the error messages.
func Read(r io.Reader, name string) (*Mesh, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("mesh: reading STL %s: %w", name, err)
	}
	raw, err := decodeSTL(data, name)
	if err != nil {
		return nil, err
	}
	m, _ := Weld(raw, WeldTolerance*raw.diagonal())
	return m, nil
}

// decodeSTL parses STL bytes into an unwelded mesh (three vertices per
// triangle).
func decodeSTL(data []byte, name string) (*Mesh, error) {
	if len(data) == 0 {
		return nil, fmt.Errorf("mesh: STL %s is empty (0 bytes): export the body again as an STL solid", name)
	}
	binaryOK := false
	var count uint32
	if len(data) >= stlHeaderSize {
		count = binary.LittleEndian.Uint32(data[80:84])
		binaryOK = int64(len(data)) == stlHeaderSize+stlTriangleSize*int64(count)
	}
	var solid stl.Solid
	switch {
	case binaryOK:
		if count == 0 {
			return nil, fmt.Errorf("mesh: binary STL %s contains no triangles: export the body again as an STL solid", name)
		}
		if err := stl.CopyAll(bytes.NewReader(data), &solid); err != nil {
			return nil, fmt.Errorf("mesh: binary STL %s: %w (the file may be damaged: export it again)", name, err)
		}
	case looksASCII(data):
		text := normaliseASCII(data)
		err := stl.CopyAll(bytes.NewReader(text), &solid)
		if err == nil && !solid.IsAscii {
			// The cleaned text happened to match the binary size rule.
			err = errors.New("not a valid ASCII STL")
		}
		if err != nil {
			return nil, asciiError(name, text, err)
		}
		if len(solid.Triangles) == 0 {
			return nil, fmt.Errorf("mesh: ASCII STL %s contains no triangles (no \"facet\" blocks): export the body again as an STL solid", name)
		}
	case len(data) < stlHeaderSize:
		return nil, fmt.Errorf("mesh: STL %s is truncated: %d bytes is shorter than the 84-byte binary header and it is not ASCII STL (it does not start with \"solid\"): export the file again", name, len(data))
	default:
		body := int64(len(data)) - stlHeaderSize
		want := stlHeaderSize + stlTriangleSize*int64(count)
		if body%stlTriangleSize != 0 && int64(len(data)) < want {
			return nil, fmt.Errorf("mesh: binary STL %s is truncated: its header declares %d triangles (%d bytes) but the file has %d bytes and ends partway through triangle %d: copy or export the file again",
				name, count, want, len(data), body/stlTriangleSize)
		}
		return nil, fmt.Errorf("mesh: binary STL %s: its header declares %d triangles (%d bytes) but the file has %d bytes (room for %.1f triangles): the file is truncated or its header is wrong; copy or export the file again",
			name, count, want, len(data), float64(body)/stlTriangleSize)
	}
	m := &Mesh{Name: name, Vertices: make([]r3.Vec, 0, 3*len(solid.Triangles)), Triangles: make([][3]int, len(solid.Triangles))}
	bad, firstBad := 0, -1
	for t, tri := range solid.Triangles {
		ok := true
		for k, v := range tri.Vertices {
			p := r3.Vec{X: float64(v[0]), Y: float64(v[1]), Z: float64(v[2])}
			ok = ok && finite(p)
			m.Triangles[t][k] = len(m.Vertices)
			m.Vertices = append(m.Vertices, p)
		}
		if !ok {
			if firstBad < 0 {
				firstBad = t
			}
			bad++
		}
	}
	if bad > 0 {
		a, b, c := m.Corners(firstBad)
		return nil, fmt.Errorf("mesh: STL %s: triangle %d (counting from 0) has a non-finite coordinate (NaN or Inf) among %s, %s, %s; %d triangle(s) in all: fix the model or export it again",
			name, firstBad, fmtPoint(a), fmtPoint(b), fmtPoint(c), bad)
	}
	return m, nil
}

// looksASCII reports whether data starts like an ASCII STL ("solid", after
// optional white space) and its first bytes are text. Binary files may also
// begin with "solid" in their header, so the text test matters.
func looksASCII(data []byte) bool {
	d := bytes.TrimLeft(data, " \t\r\n")
	if !bytes.HasPrefix(d, []byte("solid")) {
		return false
	}
	n := min(len(d), 512)
	for _, c := range d[:n] {
		if c == 0 || c >= 0x80 || (c < 0x20 && c != '\n' && c != '\r' && c != '\t' && c != '\f' && c != '\v') {
			return false
		}
	}
	return true
}

// normaliseASCII removes leading white space and makes the first line read
// "solid <name>", as the parser requires a space after "solid".
func normaliseASCII(data []byte) []byte {
	d := bytes.TrimLeft(data, " \t\r\n")
	rest := d[len("solid"):]
	if len(rest) > 0 && rest[0] == ' ' {
		return d
	}
	out := make([]byte, 0, len(d)+1)
	out = append(out, "solid "...)
	return append(out, rest...)
}

// asciiError turns the parser's message into one that names the file and
// says what to do.
func asciiError(name string, text []byte, err error) error {
	var lines []string
	for _, l := range strings.Split(err.Error(), "\n") {
		l = strings.TrimSpace(l)
		if l == "" || strings.HasPrefix(l, "Triangles had to be skipped") {
			continue
		}
		lines = append(lines, "line "+l)
	}
	if len(lines) > 3 {
		lines = append(lines[:3], fmt.Sprintf("and %d more", len(lines)-3))
	}
	hint := "the file is not valid ASCII STL: export it again"
	if !bytes.Contains(text, []byte("endsolid")) {
		hint = "the file is truncated (no \"endsolid\"): copy or export it again"
	}
	return fmt.Errorf("mesh: ASCII STL %s: %s: %s", name, strings.Join(lines, "; "), hint)
}

// Write writes m to w as binary STL. Each facet normal is the unit right-hand
// normal of the triangle's vertex order (zero for a degenerate triangle);
// coordinates are rounded to float32 as the format requires. The 80-byte
// header holds the mesh name (never starting with "solid", which would make
// readers take the file for ASCII).
func Write(w io.Writer, m *Mesh) error {
	if int64(len(m.Triangles)) > math.MaxUint32 {
		return fmt.Errorf("mesh %s: %d triangles do not fit in binary STL", m.Name, len(m.Triangles))
	}
	nv := len(m.Vertices)
	for t, tri := range m.Triangles {
		for _, i := range tri {
			if i < 0 || i >= nv {
				return fmt.Errorf("mesh %s: triangle %d refers to vertex %d of %d: cannot write it", m.Name, t, i, nv)
			}
		}
	}
	header := make([]byte, stlHeaderSize)
	title := m.Name
	if strings.HasPrefix(strings.ToLower(title), "solid") {
		title = "mesh " + title
	}
	copy(header[:80], title)
	binary.LittleEndian.PutUint32(header[80:], uint32(len(m.Triangles)))
	bw := bufio.NewWriter(w)
	if _, err := bw.Write(header); err != nil {
		return fmt.Errorf("mesh %s: writing STL: %w", m.Name, err)
	}
	var rec [stlTriangleSize]byte
	put := func(off int, v r3.Vec) {
		binary.LittleEndian.PutUint32(rec[off:], math.Float32bits(float32(v.X)))
		binary.LittleEndian.PutUint32(rec[off+4:], math.Float32bits(float32(v.Y)))
		binary.LittleEndian.PutUint32(rec[off+8:], math.Float32bits(float32(v.Z)))
	}
	for t := range m.Triangles {
		a, b, c := m.Corners(t)
		put(0, m.Normal(t))
		put(12, a)
		put(24, b)
		put(36, c)
		if _, err := bw.Write(rec[:]); err != nil {
			return fmt.Errorf("mesh %s: writing STL: %w", m.Name, err)
		}
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("mesh %s: writing STL: %w", m.Name, err)
	}
	return nil
}

// Save writes m as binary STL (see Write) to path atomically: it writes a
// temporary file in the same directory and renames it over path, so readers
// never see a partial file.
func Save(path string, m *Mesh) (err error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	tmp, err := os.CreateTemp(dir, "."+base+".tmp*")
	if err != nil {
		return fmt.Errorf("mesh: saving %s: %w (check that the directory exists and is writable)", path, err)
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	if err = Write(tmp, m); err != nil {
		return fmt.Errorf("mesh: saving %s: %w", path, err)
	}
	if err = tmp.Sync(); err != nil {
		return fmt.Errorf("mesh: saving %s: %w", path, err)
	}
	if err = tmp.Chmod(0o644); err != nil {
		return fmt.Errorf("mesh: saving %s: %w", path, err)
	}
	if err = tmp.Close(); err != nil {
		return fmt.Errorf("mesh: saving %s: %w", path, err)
	}
	if err = os.Rename(tmp.Name(), path); err != nil {
		return fmt.Errorf("mesh: saving %s: %w", path, err)
	}
	return nil
}
