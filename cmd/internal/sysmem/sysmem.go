package sysmem

import (
	"bufio"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"
)

// MeminfoPath is where Linux publishes its memory counters.
const MeminfoPath = "/proc/meminfo"

// Available returns MemAvailable from /proc/meminfo in bytes: the kernel's
// estimate of the memory a new program can use without swapping.
func Available() (int64, error) {
	f, err := os.Open(MeminfoPath)
	if err != nil {
		return 0, fmt.Errorf("reading available memory: %w", err)
	}
	defer f.Close()
	n, err := ParseMeminfo(f)
	if err != nil {
		return 0, fmt.Errorf("reading available memory from %s: %w", MeminfoPath, err)
	}
	return n, nil
}

// ParseMeminfo returns the MemAvailable entry of a /proc/meminfo listing in
// bytes. Entries read "MemAvailable:   12345678 kB", with kB meaning KiB.
func ParseMeminfo(r io.Reader) (int64, error) {
	sc := bufio.NewScanner(r)
	for sc.Scan() {
		name, rest, ok := strings.Cut(sc.Text(), ":")
		if !ok || strings.TrimSpace(name) != "MemAvailable" {
			continue
		}
		fields := strings.Fields(rest)
		if len(fields) == 0 {
			return 0, fmt.Errorf("MemAvailable has no value")
		}
		n, err := strconv.ParseInt(fields[0], 10, 64)
		if err != nil || n < 0 {
			return 0, fmt.Errorf("MemAvailable value %q is not a byte count", fields[0])
		}
		scale := int64(1)
		if len(fields) > 1 {
			switch fields[1] {
			case "kB":
				scale = 1024
			default:
				return 0, fmt.Errorf("MemAvailable has unknown unit %q", fields[1])
			}
		}
		if n > (1<<63-1)/scale {
			return 0, fmt.Errorf("MemAvailable value %q is out of range", fields[0])
		}
		return n * scale, nil
	}
	if err := sc.Err(); err != nil {
		return 0, err
	}
	return 0, fmt.Errorf("no MemAvailable entry (kernels before 3.14 lack it)")
}

// Format writes a byte count in binary units, e.g. "1.5 GiB".
func Format(n int64) string {
	const unit = 1024
	if n < unit {
		return fmt.Sprintf("%d B", n)
	}
	x := float64(n)
	for _, u := range []string{"KiB", "MiB", "GiB", "TiB", "PiB"} {
		x /= unit
		if x < unit || u == "PiB" {
			return fmt.Sprintf("%.1f %s", x, u)
		}
	}
	return ""
}
