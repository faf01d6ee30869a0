// Package sysmem reports how much memory the machine can give a run, in
// bytes, so that fluctus can refuse a job whose dense matrices would not fit
// before any work starts.
package sysmem
