package validate

import (
	"context"
	"testing"
)

// TestCases runs the verification cases (the long ones with -tags long):
// each compares fluctus with the published value or independent solution
// named in its Source, within the tolerance stated beside it.
func TestCases(t *testing.T) {
	for _, c := range Cases(longSuite) {
		t.Run(c.Name, func(t *testing.T) {
			got, want, err := c.Run(context.Background(), 0)
			if err != nil {
				t.Fatal(err)
			}
			r := Result{Case: c, Got: got, Want: want}
			t.Logf("%s: fluctus %.8g, reference %.8g (%s), difference %.2g", c.Name, got, want, c.Source, r.Difference())
			if !r.Passed() {
				t.Errorf("relative difference %.3g exceeds %.3g", r.Difference(), c.Tolerance)
			}
		})
	}
}

// TestQuickCasesAreTested: the short verification table is a subset of the
// cases TestCases runs in the default suite.
func TestQuickCasesAreTested(t *testing.T) {
	names := map[string]bool{}
	for _, c := range Cases(false) {
		names[c.Name] = true
	}
	q := QuickCases()
	if len(q) == 0 {
		t.Fatal("no quick cases")
	}
	for _, c := range q {
		if !names[c.Name] {
			t.Errorf("quick case %q is not run by the default tests", c.Name)
		}
	}
}
