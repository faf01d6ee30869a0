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
	"github.com/fluctus/fluctus/scatter/material"
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

// boolean reads true or false.
func (d *decoder) boolean(n *yaml.Node, key string) (bool, error) {
	n = resolve(n)
	if n.Kind != yaml.ScalarNode || n.ShortTag() != "!!bool" {
		return false, d.errorf(n, key, "want true or false, got %s", describe(n))
	}
	var b bool
	if err := n.Decode(&b); err != nil {
		return false, d.errorf(n, key, "cannot read %s as true or false", describe(n))
	}
	return b, nil
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

var topKeys = []string{"unit", "temperature", "accuracy", "forces", "torque_about", "substrate", "bodies", "sweep", "spring"}

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

	j.Forces = DefaultForces
	if f, ok := fields["forces"]; ok {
		if j.Forces, err = d.boolean(f.value, "forces"); err != nil {
			return err
		}
	}
	if f, ok := fields["torque_about"]; ok {
		c, err := d.vector(f.value, "torque_about")
		if err != nil {
			return err
		}
		j.TorqueAbout = &c
	}
	if f, ok := fields["substrate"]; ok {
		if j.Substrate, err = d.substrate(f.value); err != nil {
			return err
		}
	}

	n, err = d.require(fields, root, "", "bodies", "a list of at least two bodies (one over a substrate), each with a name and a shape or a file")
	if err != nil {
		return err
	}
	if err := d.bodies(n, j); err != nil {
		return err
	}

	n, err = d.require(fields, root, "", "sweep", "which body moves (body), along which direction (direction) and to which gaps (gaps) or offsets (offsets), or about which axis by which angles (rotate)")
	if err != nil {
		return err
	}
	if err := d.sweep(n, j); err != nil {
		return err
	}
	if f, ok := fields["torque_about"]; ok && j.Sweep.Rotate != nil {
		return d.errorf(resolve(f.key), "torque_about", "an angle sweep takes torques about its rotation point (sweep.rotate.point); remove torque_about, or move the rotation point")
	}
	if f, ok := fields["spring"]; ok {
		if j.Spring, err = d.spring(f.value, j); err != nil {
			return err
		}
		if !j.Forces {
			return d.errorf(resolve(fields["forces"].value), "forces", "the spring's sticking analysis needs the forces: remove forces: false, or remove the spring")
		}
	}
	return nil
}

func (d *decoder) substrate(n *yaml.Node) (*Substrate, error) {
	n = resolve(n)
	const key = "substrate"
	fields, err := d.mapping(n, key, "point", "normal")
	if err != nil {
		return nil, err
	}
	s := &Substrate{Line: n.Line}
	v, err := d.require(fields, n, key, "point", "a point [x, y, z] of the plane")
	if err != nil {
		return nil, err
	}
	if s.Point, err = d.vector(v, key+".point"); err != nil {
		return nil, err
	}
	v, err = d.require(fields, n, key, "normal", "the plane's normal [x, y, z], pointing to the side of the bodies")
	if err != nil {
		return nil, err
	}
	normal, err := d.nonZero(v, key+".normal", "the plane's normal, pointing to the side of the bodies")
	if err != nil {
		return nil, err
	}
	s.Normal = r3.Unit(normal)
	return s, nil
}

var bodyKeys = []string{"name", "shape", "file", "mesh_size", "position", "rotation", "material"}

func (d *decoder) bodies(n *yaml.Node, j *Job) error {
	n = resolve(n)
	if n.Kind != yaml.SequenceNode {
		return d.errorf(n, "bodies", "want a list of bodies (each entry starting with '- name: ...'), got %s", describe(n))
	}
	switch {
	case len(n.Content) == 0:
		return d.errorf(n, "bodies", "the list is empty; give at least one body over a substrate, or two bodies")
	case len(n.Content) < 2 && j.Substrate == nil:
		return d.errorf(n, "bodies", "a Casimir energy needs at least two bodies, got %d; add the body the moving one interacts with, or a substrate", len(n.Content))
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

// grading reads a mesh size range {near, far}.
func (d *decoder) grading(n *yaml.Node, key string) (*Grading, error) {
	n = resolve(n)
	fields, err := d.mapping(n, key, "near", "far")
	if err != nil {
		return nil, err
	}
	g := &Grading{}
	v, err := d.require(fields, n, key, "near", "the triangle edge at the closest approach (at most half the smallest gap)")
	if err != nil {
		return nil, err
	}
	if g.Near, err = d.positive(v, join(key, "near"), "the triangle edge at the closest approach"); err != nil {
		return nil, err
	}
	v, err = d.require(fields, n, key, "far", "the triangle edge far from the other bodies")
	if err != nil {
		return nil, err
	}
	if g.Far, err = d.positive(v, join(key, "far"), "the triangle edge far from the other bodies"); err != nil {
		return nil, err
	}
	if g.Far < g.Near {
		return nil, d.errorf(resolve(v), join(key, "far"), "far %g is below near %g: far is the coarse size away from the closest approach, so give far ≥ near", g.Far, g.Near)
	}
	return g, nil
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
			return b, d.errorf(resolve(shape.key), join(key, "mesh_size"), "missing: body %q is a generated shape and needs mesh_size, the target triangle edge length (well below the smallest gap), or a range {near: ..., far: ...}", b.Name)
		}
		if resolve(ms.value).Kind == yaml.MappingNode {
			if b.Grading, err = d.grading(ms.value, join(key, "mesh_size")); err != nil {
				return b, err
			}
		} else if b.MeshSize, err = d.positive(ms.value, join(key, "mesh_size"), "the target triangle edge length, or a range {near: ..., far: ...}"); err != nil {
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
			if resolve(ms.value).Kind != yaml.MappingNode {
				return b, d.errorf(resolve(ms.key), join(key, "mesh_size"), "a single size applies to generated shapes only; body %q is read from a file, which is used as is: remove mesh_size, or give a range {near: ..., far: ...} to refine the file near the closest approach", b.Name)
			}
			if b.Grading, err = d.grading(ms.value, join(key, "mesh_size")); err != nil {
				return b, err
			}
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
	if f, ok := fields["material"]; ok {
		b.MaterialLine = f.key.Line
		if err := d.material(f.value, join(key, "material"), &b, dir); err != nil {
			return b, err
		}
	}
	return b, nil
}

// material reads a body's material: a library name, an inline model or
// {table: FILE} (material.Parse). A table is only checked for its form here
// (Decode reads no file); Build reads it. perfect leaves Material nil.
func (d *decoder) material(n *yaml.Node, key string, b *Body, dir string) error {
	n = resolve(n)
	var spec any
	if err := n.Decode(&spec); err != nil {
		return d.errorf(n, key, "body %q: cannot read the material: %v", b.Name, err)
	}
	if m, ok := spec.(map[string]any); ok {
		if file, ok := m["table"]; ok {
			if name, ok := file.(string); !ok || strings.TrimSpace(name) == "" {
				return d.errorf(n, key, "body %q: table: want the name of an optical-data file relative to the job file (e.g. material: {table: gold.txt}), got %v", b.Name, file)
			}
			b.materialSpec, b.materialDir = spec, dir
			return nil
		}
	}
	m, err := material.Parse(spec, dir)
	if err != nil {
		return d.errorf(n, key, "body %q: %s", b.Name, materialProblem(spec, err))
	}
	if material.KindOf(m) != material.KindPerfect {
		b.Material = m
	}
	return nil
}

// materialProblem is the text of a material error without its package
// prefix; for an unknown name that starts a library name (gold), it names
// the candidates first.
func materialProblem(spec any, err error) string {
	msg := strings.TrimPrefix(err.Error(), "material: ")
	if name, ok := spec.(string); ok {
		if c := MaterialCandidates(name); len(c) > 0 {
			return fmt.Sprintf("unknown material %q: say %s (fluctus material show --list lists every named material)", name, strings.Join(c, " or "))
		}
	}
	return msg
}

// MaterialCandidates returns the library names that extend name by a model
// suffix (gold: gold-drude, gold-plasma).
func MaterialCandidates(name string) []string {
	key := strings.ToLower(strings.TrimSpace(name))
	if key == "aluminum" {
		key = "aluminium"
	}
	var out []string
	for _, n := range material.Names() {
		if key != "" && strings.HasPrefix(n, key+"-") {
			out = append(out, n)
		}
	}
	return out
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
	fields, err := d.mapping(n, key, "body", "direction", "gaps", "offsets", "rotate")
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

	// Exactly one of gaps, offsets and rotate.
	var given []string
	for _, k := range []string{"gaps", "offsets", "rotate"} {
		if _, ok := fields[k]; ok {
			given = append(given, k)
		}
	}
	switch len(given) {
	case 0:
		return d.errorf(n, key, "has neither gaps nor offsets nor rotate: give the closest surface-to-surface distances (gaps: [0.5, 1, 2]), displacements along the direction (offsets: [...]) or a turn (rotate: {axis: [0, 1, 0], point: [0, 0, 0], degrees: [0, 1, 2]})")
	case 2, 3:
		first, second := fields[given[0]], fields[given[1]]
		return d.errorf(resolve(second.key), key, "has both %s (line %d) and %s: give exactly one of gaps, offsets and rotate", given[0], first.key.Line, given[1])
	}

	if f, ok := fields["direction"]; ok {
		dir, err := d.nonZero(f.value, key+".direction", "the direction in which the body approaches the others")
		if err != nil {
			return err
		}
		j.Sweep.Direction = r3.Unit(dir)
	} else if given[0] != "rotate" {
		return d.errorf(n, key+".direction", "missing: sweep needs direction: the direction [x, y, z] in which the body moves")
	}

	switch given[0] {
	case "gaps":
		gaps := fields["gaps"]
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
	case "offsets":
		xs, lines, err := d.list(fields["offsets"].value, key+".offsets", "offsets")
		if err != nil {
			return err
		}
		j.Sweep.Offsets, j.Sweep.Lines = xs, lines
	default:
		if j.Sweep.Rotate, j.Sweep.Lines, err = d.turning(fields["rotate"].value, key+".rotate"); err != nil {
			return err
		}
	}
	return nil
}

// turning reads the rotate entry of an angle sweep.
func (d *decoder) turning(n *yaml.Node, key string) (*Turning, []int, error) {
	n = resolve(n)
	fields, err := d.mapping(n, key, "axis", "point", "degrees")
	if err != nil {
		return nil, nil, err
	}
	t := &Turning{}
	v, err := d.require(fields, n, key, "axis", "the axis [x, y, z] to turn about (right-hand rule)")
	if err != nil {
		return nil, nil, err
	}
	axis, err := d.nonZero(v, join(key, "axis"), "the direction of the axis to turn about")
	if err != nil {
		return nil, nil, err
	}
	t.Axis = r3.Unit(axis)
	if f, ok := fields["point"]; ok {
		p, err := d.vector(f.value, join(key, "point"))
		if err != nil {
			return nil, nil, err
		}
		t.Point = &p
	}
	v, err = d.require(fields, n, key, "degrees", "the list of angles in degrees, growing towards contact (e.g. degrees: [0, 1, 2])")
	if err != nil {
		return nil, nil, err
	}
	xs, lines, err := d.list(v, join(key, "degrees"), "angles in degrees")
	if err != nil {
		return nil, nil, err
	}
	for i, a := range xs {
		if math.Abs(a) >= 180 {
			return nil, nil, &Error{File: d.file, Line: lines[i], Key: fmt.Sprintf("%s.degrees[%d]", key, i),
				Problem: fmt.Sprintf("angle %g: give angles between -180 and 180 degrees", a)}
		}
	}
	t.Degrees = xs
	return t, lines, nil
}

// springUnits maps the accepted spellings of stiffness units.
var springUnits = map[string]SpringUnit{
	"N/m":     NewtonsPerMetre,
	"N m/rad": NewtonMetresPerRadian, "N*m/rad": NewtonMetresPerRadian, "N·m/rad": NewtonMetresPerRadian, "Nm/rad": NewtonMetresPerRadian,
}

// spring reads the suspension of the moving body and checks it against the
// sweep, which must already be decoded.
func (d *decoder) spring(n *yaml.Node, j *Job) (*Spring, error) {
	n = resolve(n)
	const key = "spring"
	fields, err := d.mapping(n, key, "stiffness", "unit", "rest_gap", "rest_angle")
	if err != nil {
		return nil, err
	}
	sp := &Spring{Line: n.Line}
	angles := j.Sweep.Kind() == ByAngles
	v, err := d.require(fields, n, key, "unit", "the unit of the stiffness: N/m for a gap or offset sweep, N m/rad for an angle sweep")
	if err != nil {
		return nil, err
	}
	u, err := d.text(v, key+".unit", "N/m or N m/rad")
	if err != nil {
		return nil, err
	}
	unit, ok := springUnits[strings.Join(strings.Fields(u), " ")]
	if !ok {
		return nil, d.errorf(resolve(v), key+".unit", "unknown stiffness unit %q: say N/m (a linear spring, for gap and offset sweeps) or N m/rad (a torsional spring, for angle sweeps)", u)
	}
	sp.Unit, sp.Torsional = unit, unit == NewtonMetresPerRadian
	switch {
	case sp.Torsional && !angles:
		return nil, d.errorf(resolve(v), key+".unit", "a torsional spring (N m/rad) needs an angle sweep (sweep.rotate), but this sweep moves the body by %s: give the linear stiffness in N/m", j.Sweep.Kind())
	case !sp.Torsional && angles:
		return nil, d.errorf(resolve(v), key+".unit", "a linear spring (N/m) does not fit an angle sweep: give the torsional stiffness in N m/rad")
	}
	v, err = d.require(fields, n, key, "stiffness", "the spring constant in "+string(unit))
	if err != nil {
		return nil, err
	}
	if sp.Stiffness, err = d.positive(v, key+".stiffness", "the spring constant in "+string(unit)); err != nil {
		return nil, err
	}

	restKey, otherKey, what := "rest_gap", "rest_angle", "the gap (in "+j.Unit.Name()+") at which the spring is relaxed"
	if sp.Torsional {
		restKey, otherKey, what = "rest_angle", "rest_gap", "the sweep angle (in degrees) at which the spring is relaxed"
	}
	if f, ok := fields[otherKey]; ok {
		return nil, d.errorf(resolve(f.key), key+"."+otherKey, "does not fit this spring: a %s spring needs %s, %s", map[bool]string{true: "torsional", false: "linear"}[sp.Torsional], restKey, what)
	}
	f, ok := fields[restKey]
	if !ok {
		return nil, d.errorf(n, key+"."+restKey, "missing: the spring has no rest position; give %s, %s", restKey, what)
	}
	if sp.Rest, err = d.number(f.value, key+"."+restKey); err != nil {
		return nil, err
	}
	sp.RestLine = resolve(f.value).Line
	switch j.Sweep.Kind() {
	case ByGaps:
		if !(sp.Rest > 0) {
			return nil, d.errorf(resolve(f.value), key+"."+restKey, "rest gap %g: must be greater than zero; give %s", sp.Rest, what)
		}
		fallthrough
	case ByAngles:
		lo, hi := j.Sweep.Range()
		if sp.Rest < lo || sp.Rest > hi {
			unit := " " + j.Unit.Name()
			if sp.Torsional {
				unit = " degrees"
			}
			return nil, d.errorf(resolve(f.value), key+"."+restKey, "%s %g%s lies outside the sweep's range %g to %g%s: the analysis needs the load at the rest position, so extend the sweep to include it",
				strings.ReplaceAll(restKey, "_", " "), sp.Rest, unit, lo, hi, unit)
		}
	}
	// Offset sweeps learn their gaps only when the scene is built; Build
	// checks the rest gap against them.
	return sp, nil
}
