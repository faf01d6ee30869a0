// Package stick runs the sticking analysis of a fluctus job: it turns the
// forces (or torques) computed along a sweep into the load samples of
// package sticking, analyses the moving body on its spring and refines the
// sweep where the analysis asks for it, computing the extra positions with
// the caller's solver.
//
// Units: the analysis works in SI (positions in m or rad, loads in N or
// N m, slopes and stiffnesses in N/m or N m/rad, as package sticking
// documents); the solver's points are in the job's unit L0 (forces in
// ħc/L0², torques in ħc/L0, stiffnesses in ħc/L0³ or ħc/L0 per radian) and
// are converted with scatter.Unit. Sweep positions handed to the solver are
// gaps in L0 or angles in degrees, as in the job file.
package stick
