// Package bem builds the boundary-element matrix of the electric-field integral
// equation at imaginary frequency for perfectly conducting bodies meshed with
// triangles and expanded in RWG functions:
//
//	M_ab(κ) = ∫∫ [κ f_a(x)·f_b(y) + (1/κ) ∇·f_a(x) ∇·f_b(y)] G(|x-y|) dx dy,
//	G(r) = exp(-κr)/(4πr).
//
// The pipeline has four replaceable parts:
//
//   - Rule: quadrature rules on a triangle (tabulated symmetric rules and
//     collapsed Gauss–Legendre products of any order);
//   - Potential: the inner integrals of the kernel over a source triangle,
//     reduced to edge integrals so that they hold for every κ and every
//     observation point, on the triangle itself included;
//   - Operator: the kernel and its combination of triangle-pair integrals into
//     the 3×3 RWG entries of a triangle pair (EFIE is the one here);
//   - Assembler: the backend that loops over triangle pairs in parallel and
//     writes dense self and interaction blocks.
//
// For homogeneous dielectric or metallic bodies (DESIGN §13) the KFIE
// operator K_ab = ∫∫ f_a(x)·(∇_x G(x-y) × f_b(y)) dx dy joins the EFIE in the
// PMCHWT blocks of DielectricSelf and DielectricCross (unknowns: electric and
// magnetic surface currents J, M in RWG functions); CrossGradientK is its
// rigid-motion derivative.
//
// Units: lengths are in the scene unit L0 and κ in 1/L0. M carries units of
// L0 (the impedance prefactor of the integral equation is dropped: it cancels
// in every determinant ratio the energy needs).
package bem
