package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// checkpointJob is a small job (two coarse spheres, two gaps, no forces)
// that the real solver finishes in a few seconds.
const checkpointJob = `unit: um
forces: false
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
  gaps: [2, 1.4]
`

// buildFluctus builds the command into a temporary directory.
func buildFluctus(t *testing.T) string {
	t.Helper()
	goTool, err := exec.LookPath("go")
	if err != nil {
		t.Skipf("no go command to build the binary: %v", err)
	}
	bin := filepath.Join(t.TempDir(), "fluctus")
	if out, err := exec.Command(goTool, "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	return bin
}

// fluctusIn runs the binary in dir and returns its stdout and error output.
func fluctusIn(t *testing.T, bin, dir string, args ...string) (string, string, error) {
	t.Helper()
	cmd := exec.Command(bin, args...)
	cmd.Dir = dir
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	err := cmd.Run()
	return stdout.String(), stderr.String(), err
}

// sameResults fails the test unless dirs a and b hold byte-identical
// result.json and result.csv.
func sameResults(t *testing.T, a, b string) {
	t.Helper()
	for _, name := range []string{"result.json", "result.csv"} {
		x, err := os.ReadFile(filepath.Join(a, name))
		if err != nil {
			t.Fatal(err)
		}
		y, err := os.ReadFile(filepath.Join(b, name))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(x, y) {
			lx, ly := strings.Split(string(x), "\n"), strings.Split(string(y), "\n")
			for i := 0; i < min(len(lx), len(ly)); i++ {
				if lx[i] != ly[i] {
					t.Errorf("%s differs between %s and %s, first at line %d:\n%s\n%s", name, a, b, i+1, lx[i], ly[i])
					break
				}
			}
		}
	}
}

// TestKilledRunResumesAndShardsMerge runs the real binary on a small job
// (about 20 s on a busy 2-core machine): a run killed with SIGKILL in the
// middle and started again, and the merge of two shards, must both give
// result files identical byte for byte to an uninterrupted run (the same κ
// nodes and the bit-exact values: common practice for checkpointing, and
// what the checkpoint format promises). One assembly thread, since the
// force reduction's order depends on the schedule (here forces are off
// anyway). It also checks the refusals: an incomplete set of shards, a
// checkpoint of another job, and shards merged against a changed job.
func TestKilledRunResumesAndShardsMerge(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the binary and runs the solver")
	}
	bin := buildFluctus(t)
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "job.yaml"), []byte(checkpointJob), 0o644); err != nil {
		t.Fatal(err)
	}
	run := func(args ...string) string {
		t.Helper()
		out, errOut, err := fluctusIn(t, bin, dir, append([]string{"run", "job.yaml", "-q", "--threads", "1"}, args...)...)
		if err != nil {
			t.Fatalf("fluctus run %v: %v\n%s%s", args, err, out, errOut)
		}
		return out
	}
	run("--out", "whole")
	if _, err := os.Stat(filepath.Join(dir, "whole", checkpointName)); !os.IsNotExist(err) {
		t.Errorf("the default checkpoint is left after a finished run (%v)", err)
	}

	// Killed part-way, then resumed.
	killed := filepath.Join(dir, "killed")
	cmd := exec.Command(bin, "run", "job.yaml", "-q", "--threads", "1", "--out", "killed")
	cmd.Dir = dir
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	exited := make(chan error, 1)
	go func() { exited <- cmd.Wait() }()
	units := func() int {
		m, _ := filepath.Glob(filepath.Join(killed, checkpointName, "u-*.json"))
		return len(m)
	}
	deadline := time.Now().Add(60 * time.Second)
	for units() < 4 && time.Now().Before(deadline) {
		select {
		case err := <-exited:
			t.Fatalf("the run ended (%v) before it could be killed", err)
		case <-time.After(20 * time.Millisecond):
		}
	}
	if err := cmd.Process.Kill(); err != nil {
		t.Fatal(err)
	}
	<-exited
	before := units()
	if before < 4 {
		t.Fatalf("only %d units after 60 s", before)
	}
	if _, err := os.Stat(filepath.Join(killed, "result.json")); !os.IsNotExist(err) {
		t.Fatalf("a killed run left result.json (%v)", err)
	}
	out := run("--out", "killed")
	if !strings.Contains(out, "resuming: ") {
		t.Errorf("the rerun did not resume:\n%s", out)
	}
	sameResults(t, filepath.Join(dir, "whole"), killed)
	t.Logf("killed after %d units", before)

	// Two shards and their merge.
	run("--shard", "1/2", "--out", "s1")
	run("--shard", "2/2", "--out", "s2")
	if _, err := os.Stat(filepath.Join(dir, "s1", "result.json")); !os.IsNotExist(err) {
		t.Errorf("a shard wrote result.json (%v)", err)
	}
	_, errOut, err := fluctusIn(t, bin, dir, "merge", "s1", "--out", "merged", "-q")
	if err == nil || !strings.Contains(errOut, "points 2 belong to shard 2/2, whose directory was not given") {
		t.Errorf("merging one of two shards: %v\n%s", err, errOut)
	}
	if _, err := os.Stat(filepath.Join(dir, "merged", "result.json")); !os.IsNotExist(err) {
		t.Errorf("a refused merge wrote result.json (%v)", err)
	}
	if out, errOut, err := fluctusIn(t, bin, dir, "merge", "s1", "s2", "--out", "merged", "-q"); err != nil {
		t.Fatalf("merge: %v\n%s%s", err, out, errOut)
	}
	sameResults(t, filepath.Join(dir, "whole"), filepath.Join(dir, "merged"))

	// The job changes: its old checkpoints are refused.
	changed := strings.Replace(checkpointJob, "forces: false", "forces: false\naccuracy: 1e-4", 1)
	if err := os.WriteFile(filepath.Join(dir, "job.yaml"), []byte(changed), 0o644); err != nil {
		t.Fatal(err)
	}
	_, errOut, err = fluctusIn(t, bin, dir, "merge", "s1", "s2", "--out", "merged2", "-q")
	if err == nil || !strings.Contains(errOut, "the shards were computed for another version of") {
		t.Errorf("merging against a changed job: %v\n%s", err, errOut)
	}
	_, errOut, err = fluctusIn(t, bin, dir, "run", "job.yaml", "-q", "--shard", "1/2", "--out", "s1")
	if err == nil || !strings.Contains(errOut, "belongs to a different job, mesh or settings") {
		t.Errorf("a shard of a changed job over its old checkpoint: %v\n%s", err, errOut)
	}
}

// TestReadmeArrayScript checks that the job-array script shown in README.md
// is the file .ci/slurm-check submits, so the documented script is the
// tested one.
func TestReadmeArrayScript(t *testing.T) {
	readme, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	script, err := os.ReadFile(filepath.Join("..", "..", "testdata", "slurm", "array.sh"))
	if err != nil {
		t.Fatal(err)
	}
	_, section, ok := strings.Cut(string(readme), "\n## Cluster runs\n")
	if !ok {
		t.Fatal("README.md has no Cluster runs section")
	}
	_, block, ok := strings.Cut(section, "```bash\n")
	if !ok {
		t.Fatal("the Cluster runs section shows no bash script")
	}
	block, _, _ = strings.Cut(block, "```")
	if block != string(script) {
		t.Errorf("the script in README.md differs from testdata/slurm/array.sh:\n%s", block)
	}
}
