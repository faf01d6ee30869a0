//go:build long

package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"testing"

	"github.com/fluctus/fluctus/cmd/internal/report"
)

// runReal runs fluctus with the real solver and returns the points of
// result.json.
func runReal(t *testing.T, out string, args ...string) []report.Point {
	t.Helper()
	var stdout, stderr bytes.Buffer
	root := newApp(&stdout, &stderr, false).rootCommand()
	root.SetArgs(append(args, "--out", out))
	if err := root.ExecuteContext(context.Background()); err != nil {
		t.Fatalf("%v\n%s", err, stderr.String())
	}
	t.Logf("\n%s", stdout.String())
	data, err := os.ReadFile(filepath.Join(out, report.JSONName))
	if err != nil {
		t.Fatal(err)
	}
	var res report.Result
	if err := json.Unmarshal(data, &res); err != nil {
		t.Fatal(err)
	}
	return res.Points
}

// checkSpherePlate checks physics that holds for a sphere above a plate
// with the gaps listed in falling order: the energy is negative (perfect
// conductors attract), grows in size as the gap falls, and E/E_PFA lies
// below 1 and rises as the gap falls (DESIGN §8; Bimonte, Emig, Jaffe &
// Kardar, EPL 97, 50001 (2012), for the slope at small gaps).
func checkSpherePlate(t *testing.T, ps []report.Point) {
	t.Helper()
	for i, p := range ps {
		if !(p.EnergyJ < 0) || !(p.EnergyErrorJ >= 0) || !(p.EnergyErrorJ < -p.EnergyJ) {
			t.Errorf("point %d: energy %g ± %g J", i, p.EnergyJ, p.EnergyErrorJ)
		}
		if !(p.RatioPFA > 0 && p.RatioPFA < 1) {
			t.Errorf("point %d: E/PFA %v outside (0, 1)", i, p.RatioPFA)
		}
		if len(p.Samples) == 0 {
			t.Errorf("point %d: no integrand samples", i)
		}
		if i > 0 {
			if !(p.Gap < ps[i-1].Gap) || !(p.EnergyJ < ps[i-1].EnergyJ) || !(p.RatioPFA > ps[i-1].RatioPFA) {
				t.Errorf("points %d, %d: gap %v→%v, energy %v→%v, E/PFA %v→%v", i-1, i,
					ps[i-1].Gap, p.Gap, ps[i-1].EnergyJ, p.EnergyJ, ps[i-1].RatioPFA, p.RatioPFA)
			}
		}
	}
}

func TestDemoEndToEnd(t *testing.T) {
	ps := runReal(t, t.TempDir(), "demo", "--quiet")
	var sweep []report.Point
	for _, p := range ps {
		if p.AddedFor == "" {
			sweep = append(sweep, p)
		}
	}
	if len(sweep) != 3 {
		t.Fatalf("%d sweep points, want 3", len(sweep))
	}
	checkSpherePlate(t, sweep)
	checkForces(t, ps)
}

func TestExampleEndToEnd(t *testing.T) {
	ps := runReal(t, t.TempDir(), "run", filepath.Join(fixtureDir, "example.yaml"), "--quiet")
	if len(ps) != 2 {
		t.Fatalf("%d points, want 2", len(ps))
	}
	checkSpherePlate(t, ps)
	checkForces(t, ps)
}

// TestSubstrateExample runs the README's sphere over the substrate: the
// force attracts and stiffens towards the plane, and E/E_PFA lies below 1
// and rises as the gap falls (DESIGN §8).
func TestSubstrateExample(t *testing.T) {
	ps := runReal(t, t.TempDir(), "run", filepath.Join(fixtureDir, "substrate.yaml"), "--quiet")
	if len(ps) != 2 {
		t.Fatalf("%d points, want 2", len(ps))
	}
	checkSpherePlate(t, ps)
	checkForces(t, ps)
}

// TestMirrorExample runs the README's torsional mirror: the torque turns
// the mirror towards the electrode and grows as it tilts closer.
func TestMirrorExample(t *testing.T) {
	ps := runReal(t, t.TempDir(), "run", filepath.Join(fixtureDir, "mirror.yaml"), "--quiet")
	for i, p := range ps {
		if p.TorqueAlongNm == nil || !(*p.TorqueAlongNm > 0) || p.TorsionalStiffness == nil || !(*p.TorsionalStiffness < 0) {
			t.Errorf("point %d: torque %v, torsional stiffness %v", i, p.TorqueAlongNm, p.TorsionalStiffness)
		}
	}
}

// checkForces checks the forces of perfect conductors approaching each
// other: attractive along the approach direction (F·ê > 0) and growing as
// the body advances (stiffness -d(F·ê)/ds < 0).
func checkForces(t *testing.T, ps []report.Point) {
	t.Helper()
	for i, p := range ps {
		if p.ForceAlongN == nil || !(*p.ForceAlongN > 0) || p.StiffnessNPerM == nil || !(*p.StiffnessNPerM < 0) {
			t.Errorf("point %d: force %v, stiffness %v", i, p.ForceAlongN, p.StiffnessNPerM)
		}
	}
}
