// Package converge estimates the discretisation error of a result computed
// on meshes of decreasing size, by Richardson extrapolation: with the error
// taken as C h^p for a mesh size h, two or three levels give the limit
// h → 0 and, from three, the observed order p.
//
// Units: h in any length unit (only ratios matter); values in whatever unit
// they are computed in, which the estimates keep.
package converge
