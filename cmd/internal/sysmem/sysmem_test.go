package sysmem

import (
	"strings"
	"testing"
)

// sample is the head of a /proc/meminfo listing in the layout documented in
// proc(5) (values in kB, meaning KiB).
const sample = `MemTotal:       24683520 kB
MemFree:        23923148 kB
MemAvailable:   24301036 kB
Buffers:            2348 kB
`

func TestParseMeminfo(t *testing.T) {
	cases := []struct {
		name, text string
		want       int64
		err        string
	}{
		{"proc(5) layout", sample, 24301036 * 1024, ""},
		{"no unit", "MemAvailable: 4096\n", 4096, ""},
		{"missing", "MemTotal: 1 kB\nMemFree: 1 kB\n", 0, "no MemAvailable"},
		{"not a number", "MemAvailable: lots kB\n", 0, "not a byte count"},
		{"unknown unit", "MemAvailable: 1 MB\n", 0, "unknown unit"},
		{"overflow", "MemAvailable: 9223372036854775807 kB\n", 0, "out of range"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := ParseMeminfo(strings.NewReader(c.text))
			if c.err != "" {
				if err == nil || !strings.Contains(err.Error(), c.err) {
					t.Fatalf("error %v, want %q", err, c.err)
				}
				return
			}
			if err != nil || got != c.want {
				t.Fatalf("got %d, %v; want %d", got, err, c.want)
			}
		})
	}
}

func TestAvailable(t *testing.T) {
	n, err := Available()
	if err != nil {
		t.Skipf("no %s on this system: %v", MeminfoPath, err)
	}
	if n <= 0 {
		t.Errorf("MemAvailable %d", n)
	}
}

func TestFormat(t *testing.T) {
	for _, c := range []struct {
		n    int64
		want string
	}{
		{0, "0 B"}, {1023, "1023 B"}, {1024, "1.0 KiB"}, {1536, "1.5 KiB"},
		{3 << 30, "3.0 GiB"}, {1 << 62, "4096.0 PiB"},
	} {
		if got := Format(c.n); got != c.want {
			t.Errorf("Format(%d) = %q, want %q", c.n, got, c.want)
		}
	}
}
