package shard

import (
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"strings"

	"github.com/fluctus/fluctus/scatter"
)

// Checkpoint is a checkpoint directory read for merging.
type Checkpoint struct {
	Dir      string
	Manifest Manifest
	// Finished is false until the run has finished all its points.
	Finished bool
	units    map[key]scatter.WorkUnit
}

// Read reads the checkpoint in dir, which is a checkpoint directory (it
// holds manifest.json) or the output directory of a run, whose checkpoint
// is dir/checkpoint.
func Read(dir string) (*Checkpoint, error) {
	for _, d := range []string{dir, filepath.Join(dir, "checkpoint")} {
		man, err := readManifest(d)
		if errors.Is(err, fs.ErrNotExist) {
			continue
		}
		if err != nil {
			return nil, err
		}
		units, err := readUnits(d)
		if err != nil {
			return nil, err
		}
		c := &Checkpoint{Dir: d, Manifest: man, units: units}
		data, err := os.ReadFile(filepath.Join(d, FinishedName))
		switch {
		case err == nil:
			var f finished
			if err := json.Unmarshal(data, &f); err != nil {
				return nil, fmt.Errorf("%s: %w: run the shard again to rewrite it", filepath.Join(d, FinishedName), err)
			}
			c.Finished = f.Hash == man.Hash
		case !errors.Is(err, fs.ErrNotExist):
			return nil, err
		}
		return c, nil
	}
	return nil, fmt.Errorf("%s holds no checkpoint (no %s in it or in %s): give the --out (or --checkpoint) directory of a shard run",
		dir, ManifestName, filepath.Join(dir, "checkpoint"))
}

// Units returns the number of units in the checkpoint.
func (c *Checkpoint) Units() int { return len(c.units) }

// label names the checkpoint in messages.
func (c *Checkpoint) label() string {
	return fmt.Sprintf("shard %s in %s", orWhole(c.Manifest.Shard), c.Dir)
}

// Union is the units of several checkpoints, as a read-only scatter.Store:
// saving a unit (which the solver does only for a unit no shard holds) is
// an error.
type Union struct {
	units map[key]scatter.WorkUnit
}

// Load implements scatter.Store.
func (u *Union) Load(point int, kappa float64) (scatter.WorkUnit, bool) {
	v, ok := u.units[key{point, math.Float64bits(kappa)}]
	return v, ok
}

// Save implements scatter.Store; it always fails.
func (u *Union) Save(w scatter.WorkUnit) error {
	return fmt.Errorf("the shards hold no unit for sweep point %d at κ = %g, though the point is finished: a unit file was removed; run its shard again", w.Point+1, w.Kappa)
}

// Combine checks that the checkpoints belong to one computation (the same
// fingerprint) and that every one of the sweep's points was finished by
// exactly one of them, and returns their units. Its errors list what is
// missing and which shard should have produced it.
func Combine(cps []*Checkpoint) (*Union, error) {
	if len(cps) == 0 {
		return nil, fmt.Errorf("no shard directories given")
	}
	seen := map[string]bool{}
	for _, c := range cps {
		if abs, err := filepath.Abs(c.Dir); err == nil && seen[abs] {
			return nil, fmt.Errorf("%s is given twice: give each shard once", c.Dir)
		} else if err == nil {
			seen[abs] = true
		}
	}
	first := cps[0]
	var bad []string
	for _, c := range cps[1:] {
		if c.Manifest.Hash != first.Manifest.Hash || c.Manifest.SweepPoints != first.Manifest.SweepPoints {
			bad = append(bad, fmt.Sprintf("%s (job %s, fluctus %s, fingerprint %.12s)", c.label(), c.Manifest.Job, c.Manifest.Version, c.Manifest.Hash))
		}
	}
	if len(bad) > 0 {
		return nil, fmt.Errorf("the shards come from different jobs, meshes or settings: %s has fingerprint %.12s (job %s, fluctus %s), but %s differ; merge only the shards of one run",
			first.label(), first.Manifest.Hash, first.Manifest.Job, first.Manifest.Version, strings.Join(bad, "; "))
	}
	n := first.Manifest.SweepPoints
	by := make([][]*Checkpoint, n) // finished shards of each point
	var problems []string
	for _, c := range cps {
		if !c.Finished {
			continue
		}
		for _, p := range c.Manifest.Points {
			if p < 1 || p > n {
				return nil, fmt.Errorf("%s: point %d outside the sweep of %d points", c.label(), p, n)
			}
			by[p-1] = append(by[p-1], c)
		}
	}
	counts := map[int]bool{}
	for _, c := range cps {
		if c.Manifest.Shard != "" {
			if s, err := Parse(c.Manifest.Shard); err == nil {
				counts[s.Count] = true
			}
		}
	}
	var missing []int
	twice := map[string][]int{} // the shards of points finished more than once
	var twiceOrder []string
	for p, cs := range by {
		switch {
		case len(cs) > 1:
			var dirs []string
			for _, c := range cs {
				dirs = append(dirs, c.label())
			}
			k := strings.Join(dirs, ", ")
			if _, ok := twice[k]; !ok {
				twiceOrder = append(twiceOrder, k)
			}
			twice[k] = append(twice[k], p)
		case len(cs) == 0:
			missing = append(missing, p)
		}
	}
	for _, k := range twiceOrder {
		problems = append(problems, fmt.Sprintf("points %s were finished by more than one shard (%s): give each point's shard once", list(twice[k]), k))
	}
	if len(missing) > 0 {
		problems = append(problems, describeMissing(missing, cps, counts))
	}
	if len(problems) > 0 {
		return nil, fmt.Errorf("cannot merge: %s", strings.Join(problems, "; "))
	}
	u := &Union{units: map[key]scatter.WorkUnit{}}
	for _, c := range cps {
		for k, v := range c.units {
			u.units[k] = v
		}
	}
	return u, nil
}

// describeMissing says which points are missing and which shard should
// have produced each: an unfinished shard that was given, or, from the
// shard count the others used, a shard that was not given.
func describeMissing(missing []int, cps []*Checkpoint, counts map[int]bool) string {
	var parts []string
	unfinished := map[*Checkpoint][]int{}
	var order []*Checkpoint
	var orphans []int
	for _, p := range missing {
		var owner *Checkpoint
		for _, c := range cps {
			if !c.Finished && contains(c.Manifest.Points, p+1) {
				owner = c
				break
			}
		}
		if owner == nil {
			orphans = append(orphans, p)
			continue
		}
		if _, ok := unfinished[owner]; !ok {
			order = append(order, owner)
		}
		unfinished[owner] = append(unfinished[owner], p)
	}
	for _, c := range order {
		parts = append(parts, fmt.Sprintf("points %s of %s are not finished (%d units saved so far): run that shard again with the same directory to complete it",
			list(unfinished[c]), c.label(), c.Units()))
	}
	if len(orphans) > 0 {
		var owners []string
		if len(counts) == 1 {
			for n := range counts {
				seen := map[Spec][]int{}
				var specs []Spec
				for _, p := range orphans {
					s := ownerOf(p, n)
					if _, ok := seen[s]; !ok {
						specs = append(specs, s)
					}
					seen[s] = append(seen[s], p)
				}
				for _, s := range specs {
					owners = append(owners, fmt.Sprintf("points %s belong to shard %s, whose directory was not given", list(seen[s]), s))
				}
			}
		} else {
			owners = append(owners, fmt.Sprintf("points %s are in none of the given shards", list(orphans)))
		}
		parts = append(parts, strings.Join(owners, "; "))
	}
	return "missing sweep points: " + strings.Join(parts, "; ")
}

func contains(xs []int, x int) bool {
	for _, y := range xs {
		if y == x {
			return true
		}
	}
	return false
}

// list formats 0-based points 1-based: "2, 5, 8".
func list(points []int) string {
	s := make([]string, len(points))
	for i, p := range sorted(points) {
		s[i] = fmt.Sprint(p + 1)
	}
	return strings.Join(s, ", ")
}
