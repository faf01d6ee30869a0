// Package job reads a fluctus job file — a YAML description of the bodies of a
// scene and of the sweep that moves one of them — and turns it into the meshes
// and displacements the solver works on.
//
// Decode checks the file strictly: unknown keys, missing or malformed values
// and inconsistent choices are errors that name the file, the line, the key
// and the fix. Job.Build then loads or generates the meshes, checks them,
// places them in the scene and resolves the sweep; Scene.Clearance checks that
// no two bodies overlap or touch at any sweep point.
//
// Units: every length in a job file (sizes, positions, gaps, offsets,
// mesh sizes) and in the resulting meshes is in the job's length unit L0,
// given by its `unit` key; temperatures are in kelvin and rotation angles in
// degrees in the file (radians inside).
package job
