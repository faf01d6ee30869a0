package job

import (
	"errors"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// overSubstrate is a valid job with every key of forces, substrates,
// graded meshes and springs; the line numbers of the cases below refer to
// it.
const overSubstrate = `unit: um
forces: true
torque_about: [0, 0, 1]
substrate: {point: [0, 0, 0], normal: [0, 0, 2]}
bodies:
  - name: ball
    shape: {sphere: {radius: 1}}
    mesh_size: {near: 0.1, far: 0.4}
    position: [0, 0, 3]
sweep:
  body: ball
  direction: [0, 0, -1]
  gaps: [0.5, 1, 2]
spring: {stiffness: 2.5, unit: N/m, rest_gap: 1}
`

// tilted is a valid angle sweep with a torsional spring.
const tilted = `unit: um
bodies:
  - name: paddle
    shape: {plate: {width: 2, depth: 1, thickness: 0.1}}
    mesh_size: 0.25
    position: [0, 0, 1]
  - name: pad
    shape: {plate: {width: 4, depth: 4, thickness: 0.2}}
    mesh_size: 0.5
sweep:
  body: paddle
  rotate: {axis: [0, 1, 0], point: [0, 0, 1], degrees: [0, 5, 10]}
spring: {stiffness: 1e-9, unit: N m/rad, rest_angle: 5}
`

func TestDecodeNewKeys(t *testing.T) {
	j, err := Decode("sub.yaml", []byte(overSubstrate))
	if err != nil {
		t.Fatal(err)
	}
	if !j.Forces || j.TorqueAbout == nil || *j.TorqueAbout != (r3.Vec{Z: 1}) {
		t.Errorf("forces %v torque_about %v", j.Forces, j.TorqueAbout)
	}
	// The normal is normalised exactly: (0, 0, 2)/2.
	if s := j.Substrate; s == nil || s.Point != (r3.Vec{}) || s.Normal != (r3.Vec{Z: 1}) || s.Line != 4 {
		t.Errorf("substrate %+v", j.Substrate)
	}
	if b := j.Bodies[0]; b.Grading == nil || *b.Grading != (Grading{Near: 0.1, Far: 0.4}) || b.MeshSize != 0 {
		t.Errorf("ball %+v grading %+v", b, b.Grading)
	}
	if got := j.Bodies[0].Source(); got != "sphere radius 1 mesh_size {near 0.1, far 0.4}" {
		t.Errorf("source %q", got)
	}
	if sp := j.Spring; sp == nil || sp.Stiffness != 2.5 || sp.Unit != NewtonsPerMetre || sp.Torsional || sp.Rest != 1 || sp.Line != 14 || sp.RestLine != 14 {
		t.Errorf("spring %+v", j.Spring)
	}
	if j.Sweep.Kind() != ByGaps {
		t.Errorf("kind %v", j.Sweep.Kind())
	}

	j, err = Decode("tilt.yaml", []byte(tilted))
	if err != nil {
		t.Fatal(err)
	}
	if !j.Forces || j.TorqueAbout != nil || j.Substrate != nil {
		t.Errorf("defaults: forces %v torque_about %v substrate %v", j.Forces, j.TorqueAbout, j.Substrate)
	}
	sw := j.Sweep
	if sw.Kind() != ByAngles || sw.Len() != 3 || sw.Direction != (r3.Vec{}) || sw.Rotate.Axis != (r3.Vec{Y: 1}) ||
		sw.Rotate.Point == nil || *sw.Rotate.Point != (r3.Vec{Z: 1}) || len(sw.Lines) != 3 || sw.Lines[0] != 12 {
		t.Errorf("sweep %+v rotate %+v", sw, sw.Rotate)
	}
	if lo, hi := sw.Range(); lo != 0 || hi != 10 {
		t.Errorf("range %g..%g", lo, hi)
	}
	if sp := j.Spring; sp == nil || !sp.Torsional || sp.Unit != NewtonMetresPerRadian || sp.Rest != 5 {
		t.Errorf("spring %+v", j.Spring)
	}

	// Spellings of the torsional unit, and forces switched off.
	for _, u := range []string{"N*m/rad", "Nm/rad", "N  m/rad"} {
		src := strings.Replace(tilted, "unit: N m/rad", "unit: "+u, 1)
		if j, err := Decode("tilt.yaml", []byte(src)); err != nil || j.Spring.Unit != NewtonMetresPerRadian {
			t.Errorf("unit %q: %v", u, err)
		}
	}
	src := strings.Replace(tilted, "spring: {stiffness: 1e-9, unit: N m/rad, rest_angle: 5}\n", "forces: false\n", 1)
	if j, err := Decode("tilt.yaml", []byte(src)); err != nil || j.Forces {
		t.Errorf("forces: false gives %v, %v", j, err)
	}
}

func TestDecodeNewKeyErrors(t *testing.T) {
	cases := []struct {
		name     string
		base     string
		old, new string
		line     int
		want     []string
	}{
		{"forces not a boolean", overSubstrate, "forces: true", "forces: 1", 2, []string{"forces: want true or false", `"1"`}},
		{"forces off with a spring", overSubstrate, "forces: true", "forces: false", 2, []string{"forces:", "needs the forces", "remove forces: false"}},
		{"short torque point", overSubstrate, "torque_about: [0, 0, 1]", "torque_about: [0, 1]", 3, []string{"torque_about: want three numbers"}},
		{"torque point on an angle sweep", tilted, "unit: um\n", "unit: um\ntorque_about: [0, 0, 1]\n", 2, []string{"torque_about:", "about its rotation point", "remove torque_about"}},
		{"substrate without normal", overSubstrate, "substrate: {point: [0, 0, 0], normal: [0, 0, 2]}", "substrate: {point: [0, 0, 0]}", 4, []string{"substrate.normal: missing"}},
		{"substrate zero normal", overSubstrate, "normal: [0, 0, 2]", "normal: [0, 0, 0]", 4, []string{"substrate.normal: must be a non-zero vector"}},
		{"substrate unknown key", overSubstrate, "normal: [0, 0, 2]}", "normal: [0, 0, 2], height: 1}", 4, []string{`unknown key "height" in substrate`}},
		{"one body without substrate", overSubstrate, "substrate: {point: [0, 0, 0], normal: [0, 0, 2]}\n", "", 5, []string{"at least two bodies, got 1", "or a substrate"}},
		{"graded size without far", overSubstrate, "{near: 0.1, far: 0.4}", "{near: 0.1}", 8, []string{"bodies[0].mesh_size.far: missing"}},
		{"graded far below near", overSubstrate, "{near: 0.1, far: 0.4}", "{near: 0.5, far: 0.4}", 8, []string{"mesh_size.far: far 0.4 is below near 0.5"}},
		{"graded zero near", overSubstrate, "{near: 0.1, far: 0.4}", "{near: 0, far: 0.4}", 8, []string{"mesh_size.near: must be greater than zero"}},
		{"graded unknown key", overSubstrate, "{near: 0.1, far: 0.4}", "{near: 0.1, far: 0.4, growth: 2}", 8, []string{`unknown key "growth" in bodies[0].mesh_size`}},
		{"rotate without axis", tilted, "axis: [0, 1, 0], ", "", 12, []string{"sweep.rotate.axis: missing"}},
		{"rotate zero axis", tilted, "axis: [0, 1, 0]", "axis: [0, 0, 0]", 12, []string{"sweep.rotate.axis: must be a non-zero vector"}},
		{"rotate without angles", tilted, ", degrees: [0, 5, 10]", "", 12, []string{"sweep.rotate.degrees: missing"}},
		{"rotate angle too large", tilted, "degrees: [0, 5, 10]", "degrees: [0, 5, 200]", 12, []string{"sweep.rotate.degrees[2]: angle 200", "between -180 and 180"}},
		{"rotate and gaps", tilted, "  rotate:", "  gaps: [1]\n  rotate:", 13, []string{"has both gaps (line 12) and rotate", "exactly one of gaps, offsets and rotate"}},
		{"gaps without direction", overSubstrate, "  direction: [0, 0, -1]\n", "", 11, []string{"sweep.direction: missing"}},
		{"spring without rest gap", overSubstrate, ", rest_gap: 1}", "}", 14, []string{"spring.rest_gap: missing", "no rest position"}},
		{"spring without rest angle", tilted, ", rest_angle: 5}", "}", 13, []string{"spring.rest_angle: missing"}},
		{"spring zero stiffness", overSubstrate, "stiffness: 2.5", "stiffness: 0", 14, []string{"spring.stiffness: must be greater than zero, got 0"}},
		{"spring negative stiffness", tilted, "stiffness: 1e-9", "stiffness: -1e-9", 13, []string{"spring.stiffness: must be greater than zero, got -1e-09"}},
		{"spring unknown unit", overSubstrate, "unit: N/m", "unit: lbf/in", 14, []string{`unknown stiffness unit "lbf/in"`, "N/m", "N m/rad"}},
		{"spring without unit", overSubstrate, "unit: N/m, ", "", 14, []string{"spring.unit: missing"}},
		{"torsional unit on a gap sweep", overSubstrate, "unit: N/m", "unit: N m/rad", 14, []string{"spring.unit: a torsional spring (N m/rad) needs an angle sweep", "by gaps"}},
		{"linear unit on an angle sweep", tilted, "unit: N m/rad", "unit: N/m", 13, []string{"spring.unit: a linear spring (N/m) does not fit an angle sweep"}},
		{"rest angle on a linear spring", overSubstrate, "rest_gap: 1", "rest_angle: 1", 14, []string{"spring.rest_angle: does not fit this spring", "needs rest_gap"}},
		{"rest gap above the sweep", overSubstrate, "rest_gap: 1", "rest_gap: 3", 14, []string{"spring.rest_gap: rest gap 3 um lies outside the sweep's range 0.5 to 2 um", "extend the sweep"}},
		{"rest gap below the sweep", overSubstrate, "rest_gap: 1", "rest_gap: 0.2", 14, []string{"rest gap 0.2 um lies outside"}},
		{"rest angle outside the sweep", tilted, "rest_angle: 5", "rest_angle: 12", 13, []string{"rest angle 12 degrees lies outside the sweep's range 0 to 10 degrees"}},
		{"spring unknown key", overSubstrate, "rest_gap: 1}", "rest_gap: 1, damping: 3}", 14, []string{`unknown key "damping" in spring`}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if strings.Count(c.base, c.old) != 1 {
				t.Fatalf("%q does not occur exactly once in the base job", c.old)
			}
			src := strings.Replace(c.base, c.old, c.new, 1)
			_, err := Decode("job.yaml", []byte(src))
			if err == nil {
				t.Fatalf("no error for\n%s", src)
			}
			var je *Error
			if !errors.As(err, &je) {
				t.Fatalf("error %T is not an *Error: %v", err, err)
			}
			msg := err.Error()
			if je.Line != c.line || !strings.HasPrefix(msg, "job.yaml:"+strconv.Itoa(c.line)+": ") {
				t.Errorf("line %d, want %d: %s", je.Line, c.line, msg)
			}
			for _, w := range c.want {
				if !strings.Contains(msg, w) {
					t.Errorf("message lacks %q: %s", w, msg)
				}
			}
			if strings.Contains(msg, "\n") {
				t.Errorf("message spans several lines: %q", msg)
			}
		})
	}
}
