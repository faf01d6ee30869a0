package job

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"
	"gopkg.in/yaml.v3"

	"github.com/fluctus/fluctus/scatter"
)

// Error is a problem with a job file. Error() reads
// "FILE:LINE: KEY: PROBLEM", with the parts that are unknown left out.
type Error struct {
	File    string
	Line    int    // 0 when the problem concerns the whole file
	Key     string // dotted path of the key, e.g. "bodies[1].shape.sphere.radius"
	Problem string // what is wrong and what to do
}

func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	b.WriteString(": ")
	if e.Key != "" {
		b.WriteString(e.Key)
		b.WriteString(": ")
	}
	b.WriteString(e.Problem)
	return b.String()
}

// Load reads and decodes the job file at path.
func Load(path string) (*Job, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("reading job file: %w", err)
	}
	return Decode(path, data)
}

// Decode parses the content of a job file. path names the file in messages,
// gives the job its name and anchors relative mesh file paths; Decode itself
// reads no file. Every error is an *Error.
func Decode(path string, data []byte) (*Job, error) {
	d := &decoder{file: path}
	root, err := d.parse(data)
	if err != nil {
		return nil, err
	}
	j := &Job{Path: path, Dir: filepath.Dir(path), Name: jobName(path)}
	if err := d.job(root, j); err != nil {
		return nil, err
	}
	return j, nil
}

// jobName is the file name of path without its extension.
func jobName(path string) string {
	base := filepath.Base(path)
	if ext := filepath.Ext(base); ext != "" && ext != base {
		base = strings.TrimSuffix(base, ext)
	}
	return base
}

// decoder walks the YAML node tree of one job file.
type decoder struct {
	file string
}

func (d *decoder) errorf(n *yaml.Node, key, format string, args ...any) error {
	line := 0
	if n != nil {
		line = n.Line
	}
	return &Error{File: d.file, Line: line, Key: key, Problem: fmt.Sprintf(format, args...)}
}

var yamlLine = regexp.MustCompile(`^yaml: line (\d+): (.*)$`)

// parse returns the top-level node of the single YAML document in data.
func (d *decoder) parse(data []byte) (root *yaml.Node, err error) {
	dec := yaml.NewDecoder(bytes.NewReader(data))
	var doc yaml.Node
	if err := dec.Decode(&doc); err != nil {
		if errors.Is(err, io.EOF) {
			return nil, d.errorf(nil, "", "the job file is empty: it needs at least unit, bodies and sweep")
		}
		return nil, d.yamlError(err)
	}
	var more yaml.Node
	if err := dec.Decode(&more); !errors.Is(err, io.EOF) {
		if err != nil {
			return nil, d.yamlError(err)
		}
		return nil, d.errorf(&more, "", "a second YAML document starts here: a job file holds one document; remove the '---' separator and what follows, or split it into two job files")
	}
	if doc.Kind != yaml.DocumentNode || len(doc.Content) != 1 {
		return nil, d.errorf(&doc, "", "the job file holds no YAML mapping: it needs at least unit, bodies and sweep")
	}
	return doc.Content[0], nil
}

// yamlError turns a YAML syntax error into a one-line *Error with the line
// number in the usual place.
func (d *decoder) yamlError(err error) error {
	msg := strings.Join(strings.Fields(err.Error()), " ")
	if m := yamlLine.FindStringSubmatch(msg); m != nil {
		var line int
		fmt.Sscan(m[1], &line)
		return &Error{File: d.file, Line: line, Problem: "invalid YAML: " + m[2] + " (check the indentation, colons and quoting)"}
	}
	return &Error{File: d.file, Problem: "invalid YAML: " + strings.TrimPrefix(msg, "yaml: ")}
}

// maxAliasHops bounds how far resolve follows aliases.
const maxAliasHops = 8

// resolve follows aliases to the node they stand for.
func resolve(n *yaml.Node) *yaml.Node {
	for i := 0; i < maxAliasHops && n != nil && n.Kind == yaml.AliasNode && n.Alias != nil; i++ {
		n = n.Alias
	}
	return n
}

// describe names what a node holds, for messages.
func describe(n *yaml.Node) string {
	switch n.Kind {
	case yaml.MappingNode:
		return "a mapping"
	case yaml.SequenceNode:
		return fmt.Sprintf("a list of %d", len(n.Content))
	case yaml.ScalarNode:
		if n.ShortTag() == "!!null" {
			return "no value"
		}
		v := n.Value
		if len(v) > 40 {
			v = v[:37] + "..."
		}
		return fmt.Sprintf("%q", v)
	case yaml.AliasNode:
		return "an alias"
	}
	return "nothing"
}

// field is one key: value pair of a mapping.
type field struct {
	key, value *yaml.Node
}

// mapping checks that n is a mapping whose keys are all among allowed, each
// at most once, and returns its entries by key.
func (d *decoder) mapping(n *yaml.Node, key string, allowed ...string) (map[string]field, error) {
	n = resolve(n)
	if n.Kind != yaml.MappingNode {
		return nil, d.errorf(n, key, "want a mapping of %s, got %s", strings.Join(allowed, ", "), describe(n))
	}
	fields := make(map[string]field, len(n.Content)/2)
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := resolve(n.Content[i]), n.Content[i+1]
		if k.Kind != yaml.ScalarNode {
			return nil, d.errorf(k, key, "a key must be a plain name, got %s", describe(k))
		}
		name := k.Value
		if !slices.Contains(allowed, name) {
			where := "at the top level"
			if key != "" {
				where = "in " + key
			}
			return nil, d.errorf(k, key, "unknown key %q %s: the known keys are %s; fix the spelling or remove it",
				name, where, strings.Join(allowed, ", "))
		}
		if prev, dup := fields[name]; dup {
			return nil, d.errorf(k, join(key, name), "given twice (first at line %d): keep one", prev.key.Line)
		}
		fields[name] = field{key: k, value: v}
	}
	return fields, nil
}

// join appends a key to a dotted key path.
func join(path, key string) string {
	if path == "" {
		return key
	}
	return path + "." + key
}

// number reads a finite number.
func (d *decoder) number(n *yaml.Node, key string) (float64, error) {
	n = resolve(n)
	tag := n.ShortTag()
	if n.Kind != yaml.ScalarNode || (tag != "!!int" && tag != "!!float") {
		if _, err := strconv.ParseFloat(n.Value, 64); n.Kind == yaml.ScalarNode && n.Style == 0 && errors.Is(err, strconv.ErrRange) {
			return 0, d.errorf(n, key, "the number %s is out of range", describe(n))
		}
		return 0, d.errorf(n, key, "want a number, got %s", describe(n))
	}
	var x float64
	if err := n.Decode(&x); err != nil {
		return 0, d.errorf(n, key, "cannot read %s as a number", describe(n))
	}
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return 0, d.errorf(n, key, "want a finite number, got %s", describe(n))
	}
	return x, nil
}

// positive reads a number > 0; what says what the number is, for the message.
func (d *decoder) positive(n *yaml.Node, key, what string) (float64, error) {
	x, err := d.number(n, key)
	if err != nil {
		return 0, err
	}
	if !(x > 0) {
		return 0, d.errorf(resolve(n), key, "must be greater than zero, got %g; give %s", x, what)
	}
	return x, nil
}

// text reads a non-empty string.
func (d *decoder) text(n *yaml.Node, key, what string) (string, error) {
	n = resolve(n)
	if n.Kind != yaml.ScalarNode || n.ShortTag() == "!!null" {
		return "", d.errorf(n, key, "want %s, got %s", what, describe(n))
	}
	if strings.TrimSpace(n.Value) == "" {
		return "", d.errorf(n, key, "is empty; give %s", what)
	}
	return n.Value, nil
}

// list reads a non-empty sequence of numbers and the line of each.
func (d *decoder) list(n *yaml.Node, key, what string) ([]float64, []int, error) {
	n = resolve(n)
	if n.Kind != yaml.SequenceNode {
		return nil, nil, d.errorf(n, key, "want a list of %s such as [0.5, 1, 2], got %s", what, describe(n))
	}
	if len(n.Content) == 0 {
		return nil, nil, d.errorf(n, key, "the list is empty; give at least one of %s", what)
	}
	xs := make([]float64, len(n.Content))
	lines := make([]int, len(n.Content))
	for i, c := range n.Content {
		x, err := d.number(c, fmt.Sprintf("%s[%d]", key, i))
		if err != nil {
			return nil, nil, err
		}
		xs[i], lines[i] = x, resolve(c).Line
	}
	return xs, lines, nil
}

// vector reads a list of three numbers [x, y, z].
func (d *decoder) vector(n *yaml.Node, key string) (r3.Vec, error) {
	n = resolve(n)
	if n.Kind != yaml.SequenceNode || len(n.Content) != 3 {
		return r3.Vec{}, d.errorf(n, key, "want three numbers [x, y, z], got %s", describe(n))
	}
	var c [3]float64
	for i, e := range n.Content {
		x, err := d.number(e, fmt.Sprintf("%s[%d]", key, i))
		if err != nil {
			return r3.Vec{}, err
		}
		c[i] = x
	}
	return r3.Vec{X: c[0], Y: c[1], Z: c[2]}, nil
}

// nonZero reads a vector that must not be zero.
func (d *decoder) nonZero(n *yaml.Node, key, what string) (r3.Vec, error) {
	v, err := d.vector(n, key)
	if err != nil {
		return v, err
	}
	if l := r3.Norm(v); l == 0 || math.IsInf(l, 0) {
		return v, d.errorf(resolve(n), key, "must be a non-zero vector of moderate size; give %s", what)
	}
	return v, nil
}

// require returns the value node of a key that must be present.
func (d *decoder) require(fields map[string]field, at *yaml.Node, path, key, what string) (*yaml.Node, error) {
	f, ok := fields[key]
	if !ok {
		where := "the job file"
		if path != "" {
			where = path
		}
		return nil, d.errorf(resolve(at), join(path, key), "missing: %s needs %s: %s", where, key, what)
	}
	return f.value, nil
}

var topKeys = []string{"unit", "temperature", "accuracy", "bodies", "sweep"}

// job decodes the top-level mapping.
func (d *decoder) job(root *yaml.Node, j *Job) error {
	fields, err := d.mapping(root, "", topKeys...)
	if err != nil {
		return err
	}

	n, err := d.require(fields, root, "", "unit", "the length unit of every size, position and gap, one of nm, um, mm, m (e.g. unit: um)")
	if err != nil {
		return err
	}
	name, err := d.text(n, "unit", "a length unit (nm, um, mm or m)")
	if err != nil {
		return err
	}
	if j.Unit, err = scatter.ParseUnit(name); err != nil {
		return d.errorf(resolve(n), "unit", "%v", err)
	}

	j.Temperature = DefaultTemperature
	if f, ok := fields["temperature"]; ok {
		t, err := d.number(f.value, "temperature")
		if err != nil {
			return err
		}
		if t < 0 {
			return d.errorf(resolve(f.value), "temperature", "must not be negative, got %g; give the temperature in kelvin (0 for the zero-temperature energy)", t)
		}
		j.Temperature = t
	}

	j.Accuracy = DefaultAccuracy
	if f, ok := fields["accuracy"]; ok {
		a, err := d.number(f.value, "accuracy")
		if err != nil {
			return err
		}
		if !(a > 0 && a < 1) {
			return d.errorf(resolve(f.value), "accuracy", "must lie between 0 and 1, got %g; give a relative target such as 1e-3", a)
		}
		j.Accuracy = a
	}

	n, err = d.require(fields, root, "", "bodies", "a list of at least two bodies, each with a name and a shape or a file")
	if err != nil {
		return err
	}
	if err := d.bodies(n, j); err != nil {
		return err
	}

	n, err = d.require(fields, root, "", "sweep", "which body moves (body), along which direction (direction) and to which gaps (gaps) or offsets (offsets)")
	if err != nil {
		return err
	}
	return d.sweep(n, j)
}

var bodyKeys = []string{"name", "shape", "file", "mesh_size", "position", "rotation"}

func (d *decoder) bodies(n *yaml.Node, j *Job) error {
	n = resolve(n)
	if n.Kind != yaml.SequenceNode {
		return d.errorf(n, "bodies", "want a list of bodies (each entry starting with '- name: ...'), got %s", describe(n))
	}
	if len(n.Content) < 2 {
		return d.errorf(n, "bodies", "a Casimir energy needs at least two bodies, got %d; add the body the moving one interacts with", len(n.Content))
	}
	lines := make(map[string]int)
	for i, e := range n.Content {
		key := fmt.Sprintf("bodies[%d]", i)
		b, err := d.body(e, key, j.Dir)
		if err != nil {
			return err
		}
		if first, dup := lines[b.Name]; dup {
			return d.errorf(resolve(e), key+".name", "the name %q is already used by the body at line %d; give every body its own name", b.Name, first)
		}
		lines[b.Name] = b.Line
		j.Bodies = append(j.Bodies, b)
	}
	return nil
}

func (d *decoder) body(n *yaml.Node, key, dir string) (Body, error) {
	n = resolve(n)
	b := Body{Line: n.Line}
	fields, err := d.mapping(n, key, bodyKeys...)
	if err != nil {
		return b, err
	}
	v, err := d.require(fields, n, key, "name", "a name that the sweep and the results refer to")
	if err != nil {
		return b, err
	}
	if b.Name, err = d.text(v, join(key, "name"), "a name for the body"); err != nil {
		return b, err
	}

	shape, hasShape := fields["shape"]
	file, hasFile := fields["file"]
	switch {
	case hasShape && hasFile:
		return b, d.errorf(resolve(file.key), key, "body %q has both shape (line %d) and file: give exactly one", b.Name, shape.key.Line)
	case !hasShape && !hasFile:
		return b, d.errorf(n, key, "body %q has neither shape nor file: give a generated shape (e.g. shape: {sphere: {radius: 1}}) or an STL file (file: part.stl)", b.Name)
	case hasShape:
		if b.Shape, err = d.shape(shape.value, join(key, "shape")); err != nil {
			return b, err
		}
		ms, ok := fields["mesh_size"]
		if !ok {
			return b, d.errorf(resolve(shape.key), join(key, "mesh_size"), "missing: body %q is a generated shape and needs mesh_size, the target triangle edge length (well below the smallest gap)", b.Name)
		}
		if b.MeshSize, err = d.positive(ms.value, join(key, "mesh_size"), "the target triangle edge length"); err != nil {
			return b, err
		}
	case hasFile:
		name, err := d.text(file.value, join(key, "file"), "the path of an STL file, relative to the job file")
		if err != nil {
			return b, err
		}
		if !filepath.IsAbs(name) {
			name = filepath.Join(dir, name)
		}
		b.File = name
		if ms, ok := fields["mesh_size"]; ok {
			return b, d.errorf(resolve(ms.key), join(key, "mesh_size"), "applies to generated shapes only; body %q is read from a file, so remove mesh_size (mesh the file as you need it)", b.Name)
		}
	}

	if f, ok := fields["position"]; ok {
		if b.Position, err = d.vector(f.value, join(key, "position")); err != nil {
			return b, err
		}
	}
	if f, ok := fields["rotation"]; ok {
		if b.Rotation, err = d.rotation(f.value, join(key, "rotation")); err != nil {
			return b, err
		}
	}
	return b, nil
}

// shapeKeys lists the parameters of each shape.
var shapeKeys = map[ShapeKind][]string{
	Sphere:   {"radius"},
	Box:      {"size"},
	Plate:    {"width", "depth", "thickness"},
	Cylinder: {"radius", "height"},
}

func (d *decoder) shape(n *yaml.Node, key string) (*Shape, error) {
	n = resolve(n)
	kinds := []string{string(Sphere), string(Box), string(Plate), string(Cylinder)}
	fields, err := d.mapping(n, key, kinds...)
	if err != nil {
		return nil, err
	}
	if len(fields) != 1 {
		return nil, d.errorf(n, key, "give exactly one of %s, got %d", strings.Join(kinds, ", "), len(fields))
	}
	var kind ShapeKind
	var f field
	for k, v := range fields {
		kind, f = ShapeKind(k), v
	}
	key = join(key, string(kind))
	params, err := d.mapping(f.value, key, shapeKeys[kind]...)
	if err != nil {
		return nil, err
	}
	s := &Shape{Kind: kind}
	// Check the parameters in a fixed order so that messages are stable.
	names := append([]string(nil), shapeKeys[kind]...)
	sort.Strings(names)
	for _, p := range names {
		v, err := d.require(params, f.value, key, p, fmt.Sprintf("the %s %s in the job's unit", kind, p))
		if err != nil {
			return nil, err
		}
		pk := join(key, p)
		if p == "size" {
			if s.Size, err = d.vector(v, pk); err != nil {
				return nil, err
			}
			if !(s.Size.X > 0 && s.Size.Y > 0 && s.Size.Z > 0) {
				return nil, d.errorf(resolve(v), pk, "every side must be greater than zero; give the box's side lengths [x, y, z]")
			}
			continue
		}
		x, err := d.positive(v, pk, fmt.Sprintf("the %s %s", kind, p))
		if err != nil {
			return nil, err
		}
		switch p {
		case "radius":
			s.Radius = x
		case "width":
			s.Width = x
		case "depth":
			s.Depth = x
		case "thickness":
			s.Thickness = x
		case "height":
			s.Height = x
		}
	}
	return s, nil
}

func (d *decoder) rotation(n *yaml.Node, key string) (*Rotation, error) {
	n = resolve(n)
	fields, err := d.mapping(n, key, "axis", "degrees")
	if err != nil {
		return nil, err
	}
	r := &Rotation{}
	v, err := d.require(fields, n, key, "axis", "the rotation axis [x, y, z] through the body's origin")
	if err != nil {
		return nil, err
	}
	if r.Axis, err = d.nonZero(v, join(key, "axis"), "the direction of the rotation axis"); err != nil {
		return nil, err
	}
	v, err = d.require(fields, n, key, "degrees", "the rotation angle in degrees (right-hand rule about the axis)")
	if err != nil {
		return nil, err
	}
	if r.Degrees, err = d.number(v, join(key, "degrees")); err != nil {
		return nil, err
	}
	return r, nil
}

func (d *decoder) sweep(n *yaml.Node, j *Job) error {
	n = resolve(n)
	const key = "sweep"
	fields, err := d.mapping(n, key, "body", "direction", "gaps", "offsets")
	if err != nil {
		return err
	}
	v, err := d.require(fields, n, key, "body", "the name of the body that moves")
	if err != nil {
		return err
	}
	name, err := d.text(v, key+".body", "the name of the body that moves")
	if err != nil {
		return err
	}
	j.Sweep.Body = -1
	var names []string
	for i, b := range j.Bodies {
		names = append(names, b.Name)
		if b.Name == name {
			j.Sweep.Body = i
		}
	}
	if j.Sweep.Body < 0 {
		return d.errorf(resolve(v), key+".body", "no body is named %q; the bodies are %s", name, strings.Join(names, ", "))
	}

	v, err = d.require(fields, n, key, "direction", "the direction [x, y, z] in which the body moves")
	if err != nil {
		return err
	}
	dir, err := d.nonZero(v, key+".direction", "the direction in which the body moves")
	if err != nil {
		return err
	}
	j.Sweep.Direction = r3.Unit(dir)

	gaps, hasGaps := fields["gaps"]
	offsets, hasOffsets := fields["offsets"]
	switch {
	case hasGaps && hasOffsets:
		return d.errorf(resolve(offsets.key), key, "has both gaps (line %d) and offsets: give exactly one", gaps.key.Line)
	case !hasGaps && !hasOffsets:
		return d.errorf(n, key, "has neither gaps nor offsets: give the closest surface-to-surface distances (gaps: [0.5, 1, 2]) or displacements along the direction (offsets: [...])")
	case hasGaps:
		xs, lines, err := d.list(gaps.value, key+".gaps", "gaps")
		if err != nil {
			return err
		}
		for i, g := range xs {
			if !(g > 0) {
				return &Error{File: d.file, Line: lines[i], Key: fmt.Sprintf("%s.gaps[%d]", key, i),
					Problem: fmt.Sprintf("gap %g: must be greater than zero (the bodies would touch or overlap); give the closest surface-to-surface distance", g)}
			}
		}
		j.Sweep.Gaps, j.Sweep.Lines = xs, lines
	default:
		xs, lines, err := d.list(offsets.value, key+".offsets", "offsets")
		if err != nil {
			return err
		}
		j.Sweep.Offsets, j.Sweep.Lines = xs, lines
	}
	return nil
}
