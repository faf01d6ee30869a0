// Package job reads a fluctus job file — a YAML description of the bodies of a
// scene, an optional conducting substrate, the sweep that moves or turns one
// body, and an optional spring that suspends it — and turns it into the
// meshes and placements the solver works on.
//
// Decode checks the file strictly: unknown keys, missing or malformed values
// and inconsistent choices are errors that name the file, the line, the key
// and the fix. Job.Build then loads or generates the meshes (graded towards
// the closest approach when the job asks for it), checks them, places them in
// the scene and resolves the sweep; Scene.Clearance checks that no two bodies
// overlap or touch, and that none touches or crosses the substrate, at any
// sweep point; Scene.CheckSweep checks what needs the gaps.
//
// A body's material key names its dielectric model (package
// scatter/material: a library name, an inline model or an optical-data
// table, which Build reads); no key, or perfect, is a perfect conductor.
// With real materials Scene.MakePlates tabulates the Lifshitz plate law the
// PFA estimates use (Scene.PFAOptions).
//
// Units: every length in a job file (sizes, positions, gaps, offsets,
// mesh sizes, the substrate's point) and in the resulting meshes is in the
// job's length unit L0, given by its `unit` key; temperatures are in kelvin,
// rotation and sweep angles in degrees in the file (radians inside), spring
// stiffnesses in N/m or N m/rad.
package job
