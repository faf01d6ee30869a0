#!/bin/sh
# Rebuilds the STL files in this directory from their sources.
#
# Made with the Debian 12 packages (apt-get install openscad gmsh):
#   OpenSCAD 2021.01 (openscad 2021.01-6)   paddle.scad      -> paddle.stl      (396 triangles)
#   gmsh 4.8.4 (gmsh 4.8.4+ds2-3)           dimpled-pad.geo  -> dimpled-pad.stl (580 triangles)
# Other versions may triangulate differently; the tests in mesh/cad_test.go
# check the committed files, and TestCADRegenerate compares the triangle
# counts of a fresh export with them when both tools are installed.
#
# Usage: sh testdata/cad/regenerate.sh [OUTDIR]   (default: this directory)
set -eu
here=$(cd "$(dirname "$0")" && pwd)
out=${1:-$here}
mkdir -p "$out"
openscad -o "$out/paddle.stl" --export-format binstl "$here/paddle.scad"
gmsh -2 -format stl -o "$out/dimpled-pad.stl" "$here/dimpled-pad.geo"
