// A switch paddle (an invented MEMS design), in micrometres: a square plate
// 8 um x 8 um x 0.5 um with four hemispherical landing bumps of radius
// 0.3 um underneath, centred at (+-2, +-2) um. The plate's bottom face is
// the plane z = 0, the plate is centred on the z axis, and the bump tips are
// the lowest points, at z = -0.3 (up to faceting).
//
// Each bump is a sphere centred on the bottom face; its upper half is buried
// in the plate, so the union leaves a hemisphere below. $fn = 12 keeps the
// spheres coarse: 6 latitude rings of 12 vertices, every vertex on the
// sphere, so the faceted bumps lie inside the smooth ones.
//
// Export (binary STL) with: openscad -o paddle.stl --export-format binstl paddle.scad

width = 8;       // plate side, um
thickness = 0.5; // plate thickness, um
bump = 0.3;      // bump radius, um
pitch = 2;       // bump offset from the centre along x and y, um

$fn = 12;

union() {
    translate([-width / 2, -width / 2, 0]) cube([width, width, thickness]);
    for (x = [-pitch, pitch], y = [-pitch, pitch])
        translate([x, y, 0]) sphere(r = bump);
}
