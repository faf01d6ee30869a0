package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/pflag"

	"github.com/fluctus/fluctus/cmd/internal/job"
	"github.com/fluctus/fluctus/cmd/internal/shard"
	"github.com/fluctus/fluctus/scatter"
)

// checkpointName is the default checkpoint directory inside --out.
const checkpointName = "checkpoint"

// shardOptions are the run flags for shards and checkpoints.
type shardOptions struct {
	// shard is the --shard spec "i/n"; empty for the whole sweep.
	shard string
	// checkpoint is the --checkpoint directory; empty: OUT/checkpoint.
	checkpoint string
	// merge, when not nil, makes the run a merge: the units come from the
	// shards and none is computed.
	merge *mergeSource
}

// mergeSource is what a merge takes from the shards.
type mergeSource struct {
	units *shard.Union
	hash  string // the shards' fingerprint
}

const shardHelp = `
Shards and checkpoints: every finished unit of work (a sweep point at one
imaginary frequency) is saved in the checkpoint directory (--checkpoint,
default OUT/checkpoint), so a run that is interrupted or killed resumes where
it stopped when started again with the same command, and gives the same
result as an uninterrupted run. A run refuses a checkpoint directory given
with --checkpoint that belongs to a different job, mesh or settings; the
default one is then started afresh. After a run of the whole sweep has
written its results, the default checkpoint directory is removed.

--shard i/n (1 ≤ i ≤ n) computes only the sweep points p = i, i+n, i+2n, ...
(numbered from 1) and writes no result files, only its checkpoint (default
output directory JOB.out/shard-i-of-n); "fluctus merge" then combines the
shards into result.json and result.csv. In a Slurm job array submitted with
--array=1-n, use --shard $SLURM_ARRAY_TASK_ID/$SLURM_ARRAY_TASK_COUNT. The
sticking analysis and --plot run at the merge; --convergence and --pfa-only
do not combine with --shard.`

func (o *runOptions) addShardFlags(fs *pflag.FlagSet) {
	fs.StringVar(&o.shard, "shard", "", "compute only shard i/n of the sweep points (1 ≤ i ≤ n); combine the shards with fluctus merge")
	fs.StringVar(&o.checkpoint, "checkpoint", "", "directory of the finished units, for resuming (default: OUT/checkpoint)")
}

// shardSpec returns the parsed --shard, nil without one.
func (o *runOptions) shardSpec() (*shard.Spec, error) {
	if o.shard == "" {
		return nil, nil
	}
	s, err := shard.Parse(o.shard)
	if err != nil {
		return nil, err
	}
	return &s, nil
}

// defaultOut returns the default output directory of a run of j.
func (o *runOptions) defaultOut(j *job.Job) (string, error) {
	out := filepath.Join(j.Dir, j.Name+".out")
	spec, err := o.shardSpec()
	if err != nil || spec == nil {
		return out, err
	}
	return filepath.Join(out, fmt.Sprintf("shard-%d-of-%d", spec.Index, spec.Count)), nil
}

// checkShardOptions refuses option combinations a shard cannot run.
func (o *runOptions) checkShardOptions() error {
	spec, err := o.shardSpec()
	if err != nil || spec == nil {
		return err
	}
	switch {
	case o.convergence:
		return fmt.Errorf("--shard and --convergence: run the convergence study without --shard (its mesh levels are separate runs)")
	case o.pfaOnly:
		return fmt.Errorf("--shard and --pfa-only: the PFA estimates take no solver time; run --pfa-only without --shard")
	case o.plot:
		return fmt.Errorf("--shard and --plot: a shard writes no results to plot; give --plot to fluctus merge")
	}
	return nil
}

// checkpoint is the store of one mesh level's sweep.
type checkpoint struct {
	store  *shard.Store // nil when merging
	units  scatter.Store
	points []int // nil: every point
	spec   *shard.Spec
	// scratch: the default directory, removed after the results are
	// written.
	scratch bool
}

// apply makes the solver settings use the checkpoint.
func (ck *checkpoint) apply(set *scatter.Settings) {
	if ck == nil {
		return
	}
	set.Store, set.Points = ck.units, ck.points
}

// resumeHint tells an interrupted run how to resume.
func (ck *checkpoint) resumeHint() string {
	if ck == nil || ck.store == nil || ck.store.Units() == 0 {
		return ""
	}
	return fmt.Sprintf("; %d finished units are kept in %s: run the same command again to resume", ck.store.Units(), ck.store.Dir())
}

// openCheckpoint opens the checkpoint of mesh level i of n: the shards'
// units when merging, otherwise the run's checkpoint directory.
func (a *app) openCheckpoint(j *job.Job, lv *level, o runOptions, i, n int) (*checkpoint, error) {
	hash, err := shard.Hash(lv.scene, a.settings(j, lv.scene, o), version)
	if err != nil {
		return nil, err
	}
	if m := o.merge; m != nil {
		if hash != m.hash {
			return nil, fmt.Errorf("the shards were computed for another version of %s, its meshes or its settings (fingerprint %.12s; the job now gives %.12s): run the shards again, or give the job file they ran with (--job)",
				j.Path, m.hash, hash)
		}
		return &checkpoint{units: m.units}, nil
	}
	spec, err := o.shardSpec()
	if err != nil {
		return nil, err
	}
	dir, scratch := o.checkpoint, false
	if dir == "" {
		dir, scratch = filepath.Join(o.out, checkpointName), spec == nil
	}
	if n > 1 {
		dir = filepath.Join(dir, fmt.Sprintf("level-%d", i+1))
	}
	points := len(lv.scene.Sweep.Offsets)
	man := shard.NewManifest(version, hash, j.Path, points, spec)
	st, discarded, err := shard.Open(dir, man, scratch)
	if err != nil {
		return nil, err
	}
	if discarded {
		fmt.Fprintf(a.stderr, "warning: discarded the checkpoint in %s, left by a run of a different job, mesh or settings\n", dir)
	}
	if k := st.Units(); k > 0 {
		fmt.Fprintf(a.stdout, "resuming: %d finished units in %s\n", k, dir)
	}
	ck := &checkpoint{store: st, units: st, spec: spec, scratch: scratch}
	if spec != nil {
		ck.points = spec.Points(points)
	}
	return ck, nil
}

// finishCheckpoints records that every level's run is complete, and removes
// the scratch checkpoints of a run whose results are written.
func (a *app) finishCheckpoints(cks []*checkpoint) error {
	for _, ck := range cks {
		if ck == nil || ck.store == nil {
			continue
		}
		if !ck.scratch {
			if err := ck.store.Finish(); err != nil {
				return err
			}
			continue
		}
		if err := shard.Remove(ck.store.Dir()); err != nil {
			return err
		}
		if len(cks) > 1 {
			os.Remove(filepath.Dir(ck.store.Dir())) // the levels' parent, once empty
		}
	}
	return nil
}

// finishShard records a finished shard and says how to merge.
func (a *app) finishShard(j *job.Job, ck *checkpoint) error {
	if err := ck.store.Finish(); err != nil {
		return err
	}
	pts := make([]string, len(ck.points))
	for i, p := range ck.points {
		pts[i] = fmt.Sprint(p + 1)
	}
	what := "no sweep points (the sweep has fewer points than shards)"
	if len(pts) > 0 {
		what = "sweep points " + strings.Join(pts, ", ")
	}
	fmt.Fprintf(a.stdout, "\nshard %s finished %s of %s (%d units, %d computed by this run) in %s\n",
		ck.spec, what, j.Path, ck.store.Units(), ck.store.Saved(), ck.store.Dir())
	fmt.Fprintf(a.stdout, "when every shard has finished: fluctus merge SHARD_DIRS... --out DIR\n")
	return nil
}
