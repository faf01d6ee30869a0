// Package mesh holds closed triangle surfaces: loading and writing STL, welding
// coincident vertices, topology checks, rigid placement, standard shapes, exact
// surface distances, and the RWG (Rao–Wilton–Glisson) edge basis built on a
// surface.
//
// Lengths are dimensionless: they are in the scene's length unit L0 (nm, um, mm
// or m, chosen by the user; STL files carry no unit). Areas are in L0^2 and
// volumes in L0^3. Angles are in radians.
//
// A Mesh that passes Check is a closed, orientable 2-manifold whose triangles are
// ordered counter-clockwise when seen from outside, so the right-hand normal of
// every triangle points out of the body.
//
// The parts:
//   - Shapes centred at the origin: Sphere and SphereLevel (subdivided
//     icosahedron), Box, Plate, Cylinder.
//   - STL: Load and Read (binary or ASCII, welded with Weld at 1e-6 of the
//     bounding-box diagonal), Save (atomic) and Write (binary).
//   - Checks: Mesh.Check lists every Problem (open, non-manifold or
//     inconsistently oriented edges, inward normals, degenerate, duplicate or
//     non-finite triangles); Mesh.Validate turns them into one error.
//   - Measures: Mesh.Stats, Mesh.Volume (signed), Mesh.EquivalentRadius.
//   - Rigid placement: Translate, Rotate, Scale and Mirror return new meshes;
//     Mirror reverses the vertex order so normals stay outward.
//   - Distances: Gap (exact surface-to-surface distance with closest points,
//     through the bounding-volume hierarchy Tree), Contains (winding number),
//     Overlap, Tree.Ray, and OffsetForGap, which places a body at a given gap
//     from others along a direction.
package mesh
