// Package validate holds published closed-form results for Casimir energies of
// perfect conductors, used as references by the tests of the solver and by
// the verification command: far-field series for spheres, the
// proximity-force estimates of simple shapes, and the parallel-plate law.
// Lengths are in an arbitrary unit L0 and energies in ħc/L0, forces in ħc/L0².
//
// Subpackages hold independent reference solutions (multipole expansions).
package validate
