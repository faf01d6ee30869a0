// A contact pad with one landing dimple (an invented MEMS design), in
// micrometres: a square pad 6 um x 6 um x 0.5 um, its bottom face the plane
// z = 0, centred on the z axis, with a spherical-cap dimple under its centre:
// a cap of a sphere of radius 1 um, 0.25 um high, so the dimple's tip at
// (0, 0, -0.25) is the pad's lowest point and its rim is a circle of radius
// sqrt(2*1*0.25 - 0.25^2) = 0.661 um on the bottom face.
//
// Mesh (surface only, STL) with: gmsh -2 -format stl -o dimpled-pad.stl dimpled-pad.geo

SetFactory("OpenCASCADE");

w = 6;     // pad side, um
t = 0.5;   // pad thickness, um
R = 1;     // dimple sphere radius, um
h = 0.25;  // dimple height, um

Box(1) = {-w/2, -w/2, 0, w, w, t};
Sphere(2) = {0, 0, R - h, R};
Box(3) = {-2*R, -2*R, -2*R, 4*R, 4*R, 2*R};      // everything below z = 0
BooleanIntersection(4) = { Volume{2}; Delete; }{ Volume{3}; Delete; };
BooleanUnion(5) = { Volume{1}; Delete; }{ Volume{4}; Delete; };

// Triangle edges of at most 0.8 um (gmsh 4.8.4 gives 580 triangles), finer
// on and around the dimple, where 12 elements per 2*pi of curvature set the
// size, so the cap keeps its shape. Coarse on purpose: the tests compute
// with this mesh in a few seconds.
Mesh.MeshSizeMin = 0.1;
Mesh.MeshSizeMax = 0.8;
Mesh.MeshSizeFromCurvature = 12;   // elements per 2*pi of curvature
Mesh.Algorithm = 6;                // Frontal-Delaunay for surfaces
Mesh.Binary = 1;                   // binary STL
