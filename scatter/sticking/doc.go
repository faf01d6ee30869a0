// Package sticking decides whether a suspended electrode held by a spring
// collapses onto its neighbour under the Casimir attraction (pull-in, or
// "stiction"), from the load computed at a handful of positions.
//
// # Model
//
// The body sits on a linear spring of stiffness k with rest position x0 and
// feels a load L(x) ≥ 0 that pulls it towards smaller x. The net force along
// increasing x is
//
//	N(x) = k (x0 - x) - L(x).
//
// Equilibria solve N(x) = 0 below the rest position; an equilibrium is stable
// where dN/dx < 0, i.e. where the net restoring stiffness k + dL/dx (which is
// k - |dL/dx| for an attraction that weakens with x) is positive. Pull-in is
// the tangency N = 0 and dN/dx = 0: the spring of stiffness k loses its stable
// equilibrium at the point x* where dL/dx = -k, and holds only rest positions
// x0 ≥ x0_crit = x* + L(x*)/k. For a given rest position the smallest spring
// that holds it is k_min = L(x_t)/(x0 - x_t) = -L'(x_t) at the tangency
// x0 - x_t = L(x_t)/(-L'(x_t)). For a power law L = C/x^n these give
// x* = (nC/k)^(1/(n+1)), x_t = n x0/(n+1) and
// k_min = (n+1)^(n+1)/n^n · C/x0^(n+1); n = 4 for parallel plates.
//
// # Coordinates and units
//
// The analysis is generic in the coordinate x; units are SI throughout.
//
//   - Translation: x is the gap in metres, L the attractive force in newtons,
//     dL/dx in N/m and the spring stiffness in N/m.
//   - Rotation (Spring.Torsional): x is the angle in radians that the body can
//     still turn before it touches, x = θ_contact - θ for a tilt sweep θ, L is
//     the torque in N m that turns it towards contact (the negative of the
//     torque along increasing θ when θ tilts the body towards its neighbour),
//     dL/dx = -dτ/dθ in N m/rad, and the stiffness is in N m/rad. The rest
//     position is the rest angle measured the same way. Measuring x from
//     contact matters: the attraction grows as a power of the distance to
//     contact, which is what the log–log interpolation below follows exactly.
//
// # Interpolation
//
// The load is known at samples (x, L, dL/dx) from the solver. Curve joins them
// by piecewise cubic Hermite interpolation of ln L against ln x, with slopes
// x L'/L; this is exact for a power law and accurate for power-law-like
// forces. If a sampled load is zero the interpolation falls back to L against
// x. Each interval carries an error estimate, the difference between the
// cubic and the quintic that also matches the neighbouring sample; it follows
// the true error closely (both shrink as the fourth power of the spacing) and
// Suggest turns it into extra positions to compute.
//
// # What lies outside the samples
//
// Everything is solved inside the sampled range. A pull-in point or tangency
// outside it is reported as such (Location BelowRange or AboveRange) with a
// value continued from the nearest end as a power law and flagged
// Extrapolated; a verdict that would rest on such a continuation is
// Undetermined. Statements about the region below the samples assume that the
// attraction keeps growing and stiffening towards contact (L convex), as
// dispersion forces do.
//
// The results are idealised: the load is what the solver computed (perfect
// conductors in vacuum unless a material model was used), without surface
// roughness, patch charges or humidity. Report.Summary says so.
package sticking
