package shard

import (
	"fmt"
	"strconv"
	"strings"
)

// Spec is shard Index of Count, 1 ≤ Index ≤ Count. A Slurm job array
// submitted with --array=1-N runs shard $SLURM_ARRAY_TASK_ID of
// $SLURM_ARRAY_TASK_COUNT.
type Spec struct {
	Index, Count int
}

// Parse reads a shard spec "i/n".
func Parse(s string) (Spec, error) {
	fail := func() (Spec, error) {
		return Spec{}, fmt.Errorf("--shard %q: give i/n with 1 ≤ i ≤ n, e.g. 2/8 for the second of eight shards (in a Slurm array --array=1-8: $SLURM_ARRAY_TASK_ID/$SLURM_ARRAY_TASK_COUNT)", s)
	}
	a, b, ok := strings.Cut(strings.TrimSpace(s), "/")
	if !ok {
		return fail()
	}
	i, err1 := strconv.Atoi(strings.TrimSpace(a))
	n, err2 := strconv.Atoi(strings.TrimSpace(b))
	if err1 != nil || err2 != nil || n < 1 || i < 1 || i > n {
		return fail()
	}
	return Spec{Index: i, Count: n}, nil
}

// String returns "i/n".
func (s Spec) String() string { return fmt.Sprintf("%d/%d", s.Index, s.Count) }

// Owns reports whether the shard computes sweep point p (0-based).
func (s Spec) Owns(p int) bool { return p%s.Count == s.Index-1 }

// Points returns the 0-based sweep points of a sweep of n points that the
// shard computes, ascending (empty when the shard has none).
func (s Spec) Points(n int) []int {
	out := []int{}
	for p := s.Index - 1; p < n; p += s.Count {
		out = append(out, p)
	}
	return out
}

// ownerOf returns the shard of count shards that owns point p.
func ownerOf(p, count int) Spec { return Spec{Index: p%count + 1, Count: count} }
