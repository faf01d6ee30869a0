package shard

import (
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"sync"

	"github.com/fluctus/fluctus/cmd/internal/atomicfile"
	"github.com/fluctus/fluctus/scatter"
)

// File names in a checkpoint directory.
const (
	ManifestName = "manifest.json"
	FinishedName = "finished.json"
	unitPrefix   = "u-"
	unitSuffix   = ".json"
)

// manifestFormat is the layout version of a checkpoint directory.
const manifestFormat = 1

// Manifest describes the run that a checkpoint directory belongs to.
type Manifest struct {
	Format  int    `json:"format"`
	Version string `json:"fluctus_version"`
	// Hash is the fingerprint of the job, meshes and settings (see Hash).
	Hash string `json:"hash"`
	// Job is the job file's absolute path.
	Job string `json:"job"`
	// Shard is "i/n", or empty for a run of the whole sweep.
	Shard string `json:"shard,omitempty"`
	// SweepPoints is the number of points of the job's sweep; Points are
	// those this run computes (1-based, as the tables number them).
	SweepPoints int   `json:"sweep_points"`
	Points      []int `json:"points"`
}

// finished is the content of finished.json.
type finished struct {
	Hash   string `json:"hash"`
	Points []int  `json:"points"` // 1-based
}

// unitFile is the content of one unit's file. Floats are hexadecimal
// (strconv 'x' format), exact to the bit, NaN and infinities included.
type unitFile struct {
	Point  int                 `json:"point_index"` // 0-based
	Kappa  string              `json:"kappa"`
	Values []string            `json:"values"`
	Ranks  []scatter.BlockRank `json:"ranks,omitempty"`
}

// key identifies a unit: the point and the bits of κ.
type key struct {
	point int
	kappa uint64
}

// A MismatchError is a checkpoint directory that belongs to another
// computation.
type MismatchError struct {
	Dir       string
	Have      Manifest // in the directory
	Want      Manifest // of this run
	ShardOnly bool     // same fingerprint, other shard
}

func (e *MismatchError) Error() string {
	if e.ShardOnly {
		return fmt.Sprintf("checkpoint directory %s holds shard %s, but this run is %s: give every shard its own directory (--out or --checkpoint)",
			e.Dir, orWhole(e.Have.Shard), orWhole(e.Want.Shard))
	}
	return fmt.Sprintf("checkpoint directory %s belongs to a different job, mesh or settings (job %s, fluctus %s, fingerprint %.12s; this run: job %s, fluctus %s, fingerprint %.12s): give another directory with --checkpoint, or delete %s to start afresh",
		e.Dir, e.Have.Job, e.Have.Version, e.Have.Hash, e.Want.Job, e.Want.Version, e.Want.Hash, e.Dir)
}

func orWhole(s string) string {
	if s == "" {
		return "the whole sweep (no --shard)"
	}
	return s
}

// Store is a checkpoint directory open for a run; it implements
// scatter.Store. Its methods may be called from several goroutines.
type Store struct {
	dir string
	man Manifest

	mu       sync.Mutex
	units    map[key]scatter.WorkUnit
	manifest bool // manifest.json is on disk
	saved    int
}

// Open opens (or prepares) the checkpoint directory dir for the run man and
// loads the units it holds. A directory of a different computation is a
// *MismatchError, unless discard is set: its checkpoint files are then
// removed (and the second result is true). Nothing is created on disk until
// the first unit is saved.
func Open(dir string, man Manifest, discard bool) (*Store, bool, error) {
	man.Format = manifestFormat
	s := &Store{dir: dir, man: man, units: map[key]scatter.WorkUnit{}}
	have, err := readManifest(dir)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return s, false, nil
	case err != nil:
		return nil, false, err
	}
	if have.Hash != man.Hash || have.Shard != man.Shard {
		if !discard {
			return nil, false, &MismatchError{Dir: dir, Have: have, Want: man, ShardOnly: have.Hash == man.Hash}
		}
		if err := Remove(dir); err != nil {
			return nil, false, err
		}
		return s, true, nil
	}
	units, err := readUnits(dir)
	if err != nil {
		return nil, false, err
	}
	s.units, s.manifest = units, true
	return s, false, nil
}

// Dir returns the checkpoint directory.
func (s *Store) Dir() string { return s.dir }

// Units returns the number of units held (loaded and saved).
func (s *Store) Units() int {
	s.mu.Lock()
	defer s.mu.Unlock()
	return len(s.units)
}

// Saved returns the number of units saved by this run.
func (s *Store) Saved() int {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.saved
}

// Load implements scatter.Store.
func (s *Store) Load(point int, kappa float64) (scatter.WorkUnit, bool) {
	s.mu.Lock()
	defer s.mu.Unlock()
	v, ok := s.units[key{point, math.Float64bits(kappa)}]
	return v, ok
}

// Save implements scatter.Store: it writes the unit's file atomically
// (temporary file, fsync, rename), after the manifest if this is the first.
func (s *Store) Save(u scatter.WorkUnit) error {
	s.mu.Lock()
	defer s.mu.Unlock()
	if err := s.ensureManifest(); err != nil {
		return err
	}
	f := unitFile{Point: u.Point, Kappa: hexFloat(u.Kappa), Values: make([]string, len(u.Values)), Ranks: u.Ranks}
	for i, v := range u.Values {
		f.Values[i] = hexFloat(v)
	}
	k := key{u.Point, math.Float64bits(u.Kappa)}
	if err := writeJSON(s.dir, unitName(k), f); err != nil {
		return err
	}
	u.Values = append([]float64(nil), u.Values...)
	u.Ranks = append([]scatter.BlockRank(nil), u.Ranks...)
	s.units[k] = u
	s.saved++
	return nil
}

// Finish records that the run has finished all its points.
func (s *Store) Finish() error {
	s.mu.Lock()
	defer s.mu.Unlock()
	if err := s.ensureManifest(); err != nil {
		return err
	}
	return writeJSON(s.dir, FinishedName, finished{Hash: s.man.Hash, Points: s.man.Points})
}

func (s *Store) ensureManifest() error {
	if s.manifest {
		return nil
	}
	if err := os.MkdirAll(s.dir, 0o755); err != nil {
		return fmt.Errorf("creating the checkpoint directory: %w", err)
	}
	if err := writeJSON(s.dir, ManifestName, s.man); err != nil {
		return err
	}
	s.manifest = true
	return nil
}

// Remove deletes the checkpoint files in dir (the manifest, finished.json,
// the units and leftover temporary files), and dir itself if that leaves
// it empty. Other files are kept.
func Remove(dir string) error {
	entries, err := os.ReadDir(dir)
	if errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	if err != nil {
		return fmt.Errorf("removing the checkpoint: %w", err)
	}
	for _, e := range entries {
		n := e.Name()
		if n == ManifestName || n == FinishedName || isUnit(n) || isTemp(n) {
			if err := os.Remove(filepath.Join(dir, n)); err != nil {
				return fmt.Errorf("removing the checkpoint: %w", err)
			}
		}
	}
	os.Remove(dir) // fails, harmlessly, if other files remain
	return nil
}

func isUnit(name string) bool {
	return strings.HasPrefix(name, unitPrefix) && strings.HasSuffix(name, unitSuffix)
}

func isTemp(name string) bool { return strings.HasPrefix(name, ".") && strings.HasSuffix(name, ".tmp") }

// unitName is the file of a unit: point (0-based) and the bits of κ.
func unitName(k key) string {
	return fmt.Sprintf("%sp%05d-k%016x%s", unitPrefix, k.point, k.kappa, unitSuffix)
}

func hexFloat(x float64) string { return strconv.FormatFloat(x, 'x', -1, 64) }

// readManifest reads dir/manifest.json.
func readManifest(dir string) (Manifest, error) {
	var m Manifest
	path := filepath.Join(dir, ManifestName)
	data, err := os.ReadFile(path)
	if err != nil {
		return m, err
	}
	if err := json.Unmarshal(data, &m); err != nil {
		return m, fmt.Errorf("%s: %w: delete the checkpoint directory to start afresh", path, err)
	}
	if m.Format != manifestFormat {
		return m, fmt.Errorf("%s: checkpoint format %d, this fluctus reads %d: delete the directory to start afresh", path, m.Format, manifestFormat)
	}
	return m, nil
}

// readUnits loads every unit file of dir, and removes temporary files left
// by an interrupted write.
func readUnits(dir string) (map[key]scatter.WorkUnit, error) {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil, fmt.Errorf("reading the checkpoint: %w", err)
	}
	units := map[key]scatter.WorkUnit{}
	for _, e := range entries {
		name := e.Name()
		path := filepath.Join(dir, name)
		if isTemp(name) {
			os.Remove(path)
			continue
		}
		if !isUnit(name) {
			continue
		}
		k, u, err := readUnit(path)
		if err != nil {
			return nil, fmt.Errorf("checkpoint unit %s: %w (delete the file: the unit is then computed again)", path, err)
		}
		if unitName(k) != name {
			return nil, fmt.Errorf("checkpoint unit %s holds point %d at κ = %g, which the name does not match: delete the file", path, k.point+1, math.Float64frombits(k.kappa))
		}
		units[k] = u
	}
	return units, nil
}

func readUnit(path string) (key, scatter.WorkUnit, error) {
	var u scatter.WorkUnit
	data, err := os.ReadFile(path)
	if err != nil {
		return key{}, u, err
	}
	var f unitFile
	if err := json.Unmarshal(data, &f); err != nil {
		return key{}, u, err
	}
	kappa, err := strconv.ParseFloat(f.Kappa, 64)
	if err != nil {
		return key{}, u, fmt.Errorf("κ: %w", err)
	}
	v := make([]float64, len(f.Values))
	for i, s := range f.Values {
		if v[i], err = strconv.ParseFloat(s, 64); err != nil {
			return key{}, u, fmt.Errorf("value %d: %w", i+1, err)
		}
	}
	if f.Point < 0 || len(v) == 0 {
		return key{}, u, fmt.Errorf("no point or no values")
	}
	u = scatter.WorkUnit{Point: f.Point, Kappa: kappa, Values: v, Ranks: f.Ranks}
	return key{f.Point, math.Float64bits(kappa)}, u, nil
}

// writeJSON writes v as dir/name atomically: a temporary file in dir,
// fsync, rename, then fsync of the directory.
func writeJSON(dir, name string, v any) error {
	path := filepath.Join(dir, name)
	data, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return atomicfile.WriteBytes(path, append(data, '\n'))
}

// oneBased returns the points numbered from 1.
func oneBased(points []int) []int {
	out := make([]int, len(points))
	for i, p := range points {
		out[i] = p + 1
	}
	return out
}

// NewManifest returns the manifest of a run of the job at path over a sweep
// of n points: the whole sweep when spec is nil, else the shard's points.
func NewManifest(version, hash, path string, n int, spec *Spec) Manifest {
	m := Manifest{Version: version, Hash: hash, Job: path, SweepPoints: n}
	if abs, err := filepath.Abs(path); err == nil {
		m.Job = abs
	}
	pts := make([]int, n)
	for i := range pts {
		pts[i] = i
	}
	if spec != nil {
		m.Shard = spec.String()
		pts = spec.Points(n)
	}
	m.Points = oneBased(pts)
	return m
}

// sorted returns a sorted copy.
func sorted(xs []int) []int {
	out := slices.Clone(xs)
	slices.Sort(out)
	return out
}
