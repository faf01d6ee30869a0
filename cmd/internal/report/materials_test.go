package report

import (
	"strings"
	"testing"

	"github.com/fluctus/fluctus/cmd/internal/job"
)

const materialJob = `unit: nm
temperature: TEMP
bodies:
  - name: ball
    shape: {sphere: {radius: 100}}
    mesh_size: 60
    MATERIAL
  - name: pad
    shape: {plate: {width: 300, depth: 300, thickness: 50}}
    mesh_size: 80
    position: [0, 0, -150]
    material: gold-plasma
sweep:
  body: ball
  direction: [0, 0, -1]
  gaps: [50]
`

// TestNoticeFor checks the idealisation notice: unchanged for perfect
// conductors; with materials it names each body's model and, at T > 0 only,
// the n = 0 treatment of each static kind.
func TestNoticeFor(t *testing.T) {
	decode := func(temp, mat string) *job.Job {
		t.Helper()
		src := strings.NewReplacer("TEMP", temp, "MATERIAL", mat).Replace(materialJob)
		if mat == "" {
			src = strings.Replace(strings.NewReplacer("TEMP", temp, "    MATERIAL\n", "").Replace(materialJob), "    material: gold-plasma\n", "", 1)
		}
		j, err := job.Decode("job.yaml", []byte(src))
		if err != nil {
			t.Fatal(err)
		}
		return j
	}
	if n := NoticeFor(decode("300", "")); n != Notice {
		t.Errorf("perfect conductors: notice %q, want the standard one", n)
	}
	cases := []struct {
		temp, mat string
		want, not []string
	}{
		{"0", "material: gold-drude", []string{"ball: gold-drude (drude); pad: gold-plasma (plasma)", "approximate the optical response"}, []string{"n = 0"}},
		{"300", "material: gold-drude", []string{"the Drude model for ball (no TE contribution)", "the plasma model for pad (TE reflection kept)"}, nil},
		{"4", "material: {permittivity: 11.7}", []string{"ball: permittivity(11.7) (dielectric)", "static permittivity eps(0) for ball"}, []string{"Drude"}},
	}
	for _, c := range cases {
		n := NoticeFor(decode(c.temp, c.mat))
		for _, w := range c.want {
			if !strings.Contains(n, w) {
				t.Errorf("T = %s K, %s: notice lacks %q: %s", c.temp, c.mat, w, n)
			}
		}
		for _, w := range c.not {
			if strings.Contains(n, w) {
				t.Errorf("T = %s K, %s: notice has %q: %s", c.temp, c.mat, w, n)
			}
		}
	}
}
