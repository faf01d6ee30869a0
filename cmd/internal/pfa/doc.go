// Package pfa evaluates the proximity-force estimates of a sweep without
// the solver — the instant first look at a scene: the energy summed over
// facing surface elements from the moving body's panels, from the others',
// and their mean (scatter.PFAEnergy, DESIGN §7, with the substrate when the
// scene has one), and the force along the sweep direction.
//
// Units: lengths in the scene unit L0, energies in ħc/L0, forces in ħc/L0²,
// as in package scatter.
package pfa
