// Package shard splits a run into shards and keeps its checkpoints.
//
// A run's work units are (sweep point, imaginary wavenumber κ) pairs. Shard
// i of n (1 ≤ i ≤ n) owns the sweep points p (0-based) with p mod n = i-1,
// whole points, since each point's frequency rule adapts to that point
// alone. A checkpoint directory holds one file per finished unit, written
// atomically, a manifest with the fingerprint of the job (Hash) and, once
// the run has finished its points, finished.json. A rerun with the same
// directory loads the units instead of computing them; merging checks that
// the shards share one fingerprint and that every sweep point was finished
// by exactly one shard.
//
// Units: κ in 1/(job unit); the stored values are the solver's integrand
// vector (dimensionless ln det, its gradient in 1/(job unit) and per radian,
// the stiffness term in 1/(job unit)²), stored as hexadecimal floats so that
// they read back bit for bit.
package shard
