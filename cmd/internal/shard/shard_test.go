package shard

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/fluctus/fluctus/cmd/internal/job"
	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/scatter/material"
)

func TestParse(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want Spec
		ok   bool
	}{
		{"1/1", Spec{1, 1}, true},
		{"2/3", Spec{2, 3}, true},
		{" 3 / 3 ", Spec{3, 3}, true},
		{"0/3", Spec{}, false}, // 1-based, as Slurm's --array=1-n
		{"4/3", Spec{}, false},
		{"1/0", Spec{}, false},
		{"-1/3", Spec{}, false},
		{"2", Spec{}, false},
		{"a/b", Spec{}, false},
	} {
		got, err := Parse(tc.in)
		if (err == nil) != tc.ok || got != tc.want {
			t.Errorf("Parse(%q) = %v, %v; want %v, ok %v", tc.in, got, err, tc.want, tc.ok)
		}
		if err != nil && !strings.Contains(err.Error(), "SLURM_ARRAY_TASK_ID") {
			t.Errorf("Parse(%q): error %q does not say how to map the array task", tc.in, err)
		}
	}
}

// TestPointsPartition checks that the shards of every count split the
// sweep's points between them exactly once (round robin).
func TestPointsPartition(t *testing.T) {
	for n := 1; n <= 5; n++ {
		for points := 0; points <= 7; points++ {
			seen := make([]int, points)
			for i := 1; i <= n; i++ {
				s := Spec{i, n}
				for _, p := range s.Points(points) {
					seen[p]++
					if !s.Owns(p) || ownerOf(p, n) != s {
						t.Errorf("shard %v lists point %d but does not own it", s, p)
					}
				}
			}
			for p, k := range seen {
				if k != 1 {
					t.Errorf("%d shards, %d points: point %d in %d shards", n, points, p, k)
				}
			}
		}
	}
}

// TestStoreRoundTrip checks that saved units read back bit for bit — also
// negative zero, subnormals, infinities and NaN — after reopening, that
// nothing is written before the first unit, and that a temporary file left
// by a killed write is removed.
func TestStoreRoundTrip(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ck")
	man := NewManifest("v", "hash-a", "job.yaml", 3, nil)
	st, _, err := Open(dir, man, false)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(dir); !errors.Is(err, os.ErrNotExist) {
		t.Fatalf("Open created %s before any unit was saved", dir)
	}
	vals := []float64{-0.1234567890123456789, math.Copysign(0, -1), 5e-324, math.Inf(-1), math.NaN(), math.Nextafter(1, 2)}
	kappa := 1 / 3.0
	ranks := []scatter.BlockRank{{Rows: "a", Cols: "b", Rank: 7, Compressed: 1}}
	if err := st.Save(scatter.WorkUnit{Point: 2, Kappa: kappa, Values: vals, Ranks: ranks}); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, ".u-p00001-k0.json.123.tmp"), []byte("{"), 0o644); err != nil {
		t.Fatal(err)
	}
	st, _, err = Open(dir, man, false)
	if err != nil {
		t.Fatal(err)
	}
	u, ok := st.Load(2, kappa)
	if !ok {
		t.Fatal("the saved unit is missing after reopening")
	}
	if !reflect.DeepEqual(u.Ranks, ranks) {
		t.Errorf("ranks %+v, saved %+v", u.Ranks, ranks)
	}
	got := u.Values
	for i := range vals {
		if math.Float64bits(got[i]) != math.Float64bits(vals[i]) {
			t.Errorf("value %d: %v (%x), saved %v (%x)", i, got[i], math.Float64bits(got[i]), vals[i], math.Float64bits(vals[i]))
		}
	}
	if _, ok := st.Load(2, math.Nextafter(kappa, 1)); ok {
		t.Error("a unit at the next κ up was found")
	}
	if _, ok := st.Load(1, kappa); ok {
		t.Error("a unit of another point was found")
	}
	matches, _ := filepath.Glob(filepath.Join(dir, ".*.tmp"))
	if len(matches) != 0 {
		t.Errorf("temporary files left: %v", matches)
	}
}

// TestOpenMismatch checks the refusal of a checkpoint directory of another
// computation or another shard, and that discard starts it afresh.
func TestOpenMismatch(t *testing.T) {
	dir := t.TempDir()
	man := NewManifest("v", "hash-a", "job.yaml", 3, &Spec{1, 2})
	st, _, err := Open(dir, man, false)
	if err != nil {
		t.Fatal(err)
	}
	if err := st.Save(scatter.WorkUnit{Point: 0, Kappa: 1, Values: []float64{-1}}); err != nil {
		t.Fatal(err)
	}
	other := NewManifest("v", "hash-b", "other.yaml", 3, &Spec{1, 2})
	_, _, err = Open(dir, other, false)
	var mm *MismatchError
	if !errors.As(err, &mm) {
		t.Fatalf("other job: error %v, want a mismatch", err)
	}
	for _, want := range []string{dir, "different job, mesh or settings", "--checkpoint", "delete"} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("error %q lacks %q", err, want)
		}
	}
	_, _, err = Open(dir, NewManifest("v", "hash-a", "job.yaml", 3, &Spec{2, 2}), false)
	if err == nil || !strings.Contains(err.Error(), "holds shard 1/2, but this run is 2/2") {
		t.Errorf("other shard: error %v", err)
	}
	st, discarded, err := Open(dir, other, true)
	if err != nil || !discarded || st.Units() != 0 {
		t.Fatalf("discard: %v, discarded %v, %d units", err, discarded, st.Units())
	}
}

// shardDir writes a checkpoint of shard spec of a 5-point sweep with one
// unit per point, finished or not.
func shardDir(t *testing.T, root, hash string, spec Spec, finish bool) string {
	t.Helper()
	dir := filepath.Join(root, "shard-"+strings.ReplaceAll(spec.String(), "/", "-of-"))
	st, _, err := Open(filepath.Join(dir, "checkpoint"), NewManifest("v", hash, "job.yaml", 5, &spec), false)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range spec.Points(5) {
		if err := st.Save(scatter.WorkUnit{Point: p, Kappa: 0.5, Values: []float64{-float64(p)}}); err != nil {
			t.Fatal(err)
		}
	}
	if finish {
		if err := st.Finish(); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

func combine(t *testing.T, dirs ...string) (*Union, error) {
	t.Helper()
	var cps []*Checkpoint
	for _, d := range dirs {
		c, err := Read(d)
		if err != nil {
			t.Fatal(err)
		}
		cps = append(cps, c)
	}
	return Combine(cps)
}

// TestCombine checks the merge of a complete set and its refusals, with the
// error text that names what is missing and which shard should make it.
func TestCombine(t *testing.T) {
	root := t.TempDir()
	s1 := shardDir(t, root, "hash-a", Spec{1, 3}, true)
	s2 := shardDir(t, root, "hash-a", Spec{2, 3}, true)
	s3 := shardDir(t, root, "hash-a", Spec{3, 3}, true)
	u, err := combine(t, s1, s2, s3)
	if err != nil {
		t.Fatal(err)
	}
	for p := 0; p < 5; p++ {
		if v, ok := u.Load(p, 0.5); !ok || !reflect.DeepEqual(v.Values, []float64{-float64(p)}) {
			t.Errorf("point %d: %v, %v", p, v, ok)
		}
	}
	if err := u.Save(scatter.WorkUnit{Point: 1, Kappa: 2}); err == nil || !strings.Contains(err.Error(), "point 2 at κ = 2") {
		t.Errorf("saving into the union: %v", err)
	}
	other := shardDir(t, t.TempDir(), "hash-b", Spec{3, 3}, true)
	unfinished := shardDir(t, t.TempDir(), "hash-a", Spec{3, 3}, false)
	for _, tc := range []struct {
		name string
		dirs []string
		want []string
	}{
		{"different job", []string{s1, s2, other}, []string{"different jobs, meshes or settings", "shard 3/3 in " + other, "fingerprint hash-b"}},
		{"missing shard", []string{s1, s3}, []string{"missing sweep points", "points 2, 5 belong to shard 2/3, whose directory was not given"}},
		{"unfinished shard", []string{s1, s2, unfinished}, []string{"points 3 of shard 3/3 in " + unfinished, "not finished (1 units saved so far)", "run that shard again"}},
		{"same shard twice", []string{s1, s2, s3, s1}, []string{"given twice"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := combine(t, tc.dirs...)
			if err == nil {
				t.Fatal("merged")
			}
			for _, w := range tc.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q lacks %q", err, w)
				}
			}
		})
	}
	if _, err := Read(root); err == nil || !strings.Contains(err.Error(), "holds no checkpoint") {
		t.Errorf("reading a directory without a checkpoint: %v", err)
	}
}

const hashJob = `unit: um
accuracy: 1e-3
bodies:
  - name: a
    shape: {sphere: {radius: 1}}
    mesh_size: 0.7
    position: [0, 0, 0]
  - name: b
    shape: {sphere: {radius: 1}}
    mesh_size: 0.7
    position: [0, 0, 4]
sweep:
  body: b
  direction: [0, 0, -1]
  gaps: [2, 1]
`

// TestHash checks that the fingerprint ignores where the job file is, its
// comments and layout, and the threads, but follows the job's content, the
// meshes and the settings.
func TestHash(t *testing.T) {
	hash := func(path, src string, edit func(*scatter.Settings)) string {
		t.Helper()
		j, err := job.Decode(path, []byte(src))
		if err != nil {
			t.Fatal(err)
		}
		s, err := j.Build()
		if err != nil {
			t.Fatal(err)
		}
		set := scatter.Settings{Accuracy: j.Accuracy, Forces: j.Forces, Stiffness: j.Forces, Threads: 1}
		if edit != nil {
			edit(&set)
		}
		h, err := Hash(s, set, "v1")
		if err != nil {
			t.Fatal(err)
		}
		return h
	}
	base := hash("a/job.yaml", hashJob, nil)
	// Materials enter by their permittivity (a model built in the scene,
	// as Build does from the job's material key).
	withMaterial := func(m material.Model) string {
		t.Helper()
		j, err := job.Decode("a/job.yaml", []byte(hashJob))
		if err != nil {
			t.Fatal(err)
		}
		s, err := j.Build()
		if err != nil {
			t.Fatal(err)
		}
		s.Bodies[0].Material = m
		h, err := Hash(s, scatter.Settings{Accuracy: j.Accuracy, Forces: true, Stiffness: true}, "v1")
		if err != nil {
			t.Fatal(err)
		}
		return h
	}
	gold, gold2, other := withMaterial(material.Drude{PlasmaEV: 9, DampingEV: 0.035}), withMaterial(material.Drude{PlasmaEV: 9, DampingEV: 0.035}), withMaterial(material.Drude{PlasmaEV: 9, DampingEV: 0.03})
	if gold == base || gold != gold2 || gold == other {
		t.Errorf("material fingerprints: perfect %.8s, Drude %.8s and again %.8s, other damping %.8s", base, gold, gold2, other)
	}
	if h := hash("b/other.yaml", "# a comment\n"+strings.ReplaceAll(hashJob, "accuracy: 1e-3", "accuracy:   0.001"), func(s *scatter.Settings) { s.Threads = 8 }); h != base {
		t.Error("the fingerprint changed with the path, a comment, number layout or threads")
	}
	for _, tc := range []struct {
		name string
		src  string
		edit func(*scatter.Settings)
	}{
		{"accuracy", strings.ReplaceAll(hashJob, "1e-3", "1e-4"), nil},
		{"mesh", strings.Replace(hashJob, "mesh_size: 0.7", "mesh_size: 0.6", 1), nil},
		{"gap", strings.ReplaceAll(hashJob, "[2, 1]", "[2, 1.1]"), nil},
		{"temperature", hashJob, func(s *scatter.Settings) { s.ThermalWavenumber = 1 }},
		{"forces", hashJob, func(s *scatter.Settings) { s.Forces, s.Stiffness = false, false }},
	} {
		if h := hash("a/job.yaml", tc.src, tc.edit); h == base {
			t.Errorf("%s: the fingerprint did not change", tc.name)
		}
	}
}
