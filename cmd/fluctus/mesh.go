package main

import (
	"fmt"
	"slices"
	"strings"

	"github.com/spf13/cobra"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/fluctus/fluctus/cmd/internal/report"
	"github.com/fluctus/fluctus/mesh"
	"github.com/fluctus/fluctus/scatter"
)

func (a *app) meshCommand() *cobra.Command {
	cmd := &cobra.Command{
		Use:   "mesh",
		Short: "Inspect STL meshes and generate standard shapes",
	}
	cmd.AddCommand(a.meshInfoCommand(), a.meshMakeCommand())
	return cmd
}

func (a *app) meshInfoCommand() *cobra.Command {
	var (
		unit, near string
		atGap      float64
	)
	cmd := &cobra.Command{
		Use:   "info FILE.stl --unit UNIT",
		Short: "Print the statistics of an STL mesh and every problem found",
		Long: `Info reads an STL file (binary or ASCII), welds coincident vertices and prints
its statistics with lengths in the given unit (STL files carry none). It then
lists every problem that keeps the mesh from being a closed, consistently
outward-oriented surface (open or non-manifold edges, flipped or degenerate
triangles, ...) and exits with a non-zero status if there is any.

With --near OTHER.stl it also measures the gap between the two meshes as they
are placed in their files (or, with --gap G, after moving OTHER along z until
it is G above FILE) and warns when triangles of FILE near the closest approach
are larger than half the local gap (rule of thumb), saying where and
suggesting a graded mesh size for the job file.`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			u, err := scatter.ParseUnit(unit)
			if err != nil {
				return fmt.Errorf("--unit: %w", err)
			}
			m, err := mesh.Load(args[0])
			if err != nil {
				return err
			}
			rows := report.MeshStats(m, u.Name())
			problems := m.Check()
			if len(problems) == 0 {
				rows = append(rows, [2]string{"problems", "none: a closed, outward-oriented surface"})
			} else {
				rows = append(rows, [2]string{"problems", "found, listed below"})
			}
			var warning string
			if near == "" && cmd.Flags().Changed("gap") {
				return fmt.Errorf("--gap needs --near OTHER.stl, the mesh to place at that gap")
			}
			if near != "" && len(problems) == 0 {
				o, err := mesh.Load(near)
				if err != nil {
					return fmt.Errorf("--near: %w", err)
				}
				if cmd.Flags().Changed("gap") {
					if !(atGap > 0) {
						return fmt.Errorf("--gap %g: give a positive gap", atGap)
					}
					t, err := mesh.OffsetForGap(o, []*mesh.Mesh{m}, r3.Vec{Z: 1}, atGap)
					if err != nil {
						return fmt.Errorf("--gap: %w", err)
					}
					o = o.Translate(r3.Vec{Z: t})
				}
				gap, _, _ := mesh.Gap(m, o)
				if !(gap > 0) || mesh.Overlap(m, o) {
					return fmt.Errorf("--near: %s and %s touch or overlap as placed in their files: there is no gap to check the mesh against", args[0], near)
				}
				rows = append(rows, [2]string{"gap to " + near, fmt.Sprintf("%.6g %s", gap, u.Name())})
				if warning = mesh.CoarseSummary(mesh.CoarseNear(m, []*mesh.Tree{mesh.NewTree(o)}, gap), gap); warning == "" {
					rows = append(rows, [2]string{"near the gap", "no triangle larger than half the local gap"})
				} else {
					rows = append(rows, [2]string{"near the gap", "too coarse, see the warning"})
				}
			}
			if err := report.WriteRows(a.stdout, rows); err != nil {
				return err
			}
			if warning != "" {
				fmt.Fprintf(a.stderr, "warning: %s (lengths in %s)\n", warning, u.Name())
			}
			if len(problems) == 0 {
				return nil
			}
			for _, p := range problems {
				fmt.Fprintf(a.stdout, "  - %s\n", p)
			}
			return fmt.Errorf("%s: the mesh has problems (listed above); repair it before using it in a job", args[0])
		},
	}
	cmd.Flags().StringVar(&unit, "unit", "", "length unit of the file: nm, um, mm or m (required)")
	cmd.Flags().StringVar(&near, "near", "", "another STL file: check the mesh against the gap to it")
	cmd.Flags().Float64Var(&atGap, "gap", 0, "with --near: move the other mesh along z to this gap above the mesh first")
	cmd.MarkFlagRequired("unit")
	return cmd
}

// shapeParams lists the flags each shape needs.
var shapeParams = map[string][]string{
	"sphere":   {"radius"},
	"box":      {"size"},
	"plate":    {"width", "depth", "thickness"},
	"cylinder": {"radius", "height"},
}

func (a *app) meshMakeCommand() *cobra.Command {
	var (
		radius, width, depth, thickness, height, h float64
		size                                       []float64
		out, unit                                  string
	)
	cmd := &cobra.Command{
		Use:   "make sphere|box|plate|cylinder --mesh-size H -o FILE.stl",
		Short: "Write a generated shape as a binary STL file",
		Long: `Make generates a closed, outward-oriented mesh of a standard shape centred at the
origin and writes it as binary STL:

  sphere    --radius R                          (icosphere, vertices on the sphere)
  box       --size X,Y,Z                        (axis-aligned)
  plate     --width X --depth Y --thickness Z   (a thin box)
  cylinder  --radius R --height Z               (axis along z)

--mesh-size is the target triangle edge. Sizes are in the unit the file will
be used with; --unit only labels the statistics printed.`,
		Args:      cobra.ExactArgs(1),
		ValidArgs: []string{"sphere", "box", "plate", "cylinder"},
		RunE: func(cmd *cobra.Command, args []string) error {
			kind := args[0]
			need, ok := shapeParams[kind]
			if !ok {
				return fmt.Errorf("unknown shape %q: say sphere, box, plate or cylinder", kind)
			}
			for _, p := range []string{"radius", "size", "width", "depth", "thickness", "height"} {
				given := cmd.Flags().Changed(p)
				switch wanted := slices.Contains(need, p); {
				case wanted && !given:
					return fmt.Errorf("a %s needs --%s (it needs %s)", kind, p, flagList(need))
				case given && !wanted:
					return fmt.Errorf("--%s does not apply to a %s (it needs %s)", p, kind, flagList(need))
				}
			}
			label := ""
			if unit != "" {
				u, err := scatter.ParseUnit(unit)
				if err != nil {
					return fmt.Errorf("--unit: %w", err)
				}
				label = u.Name()
			}
			var m *mesh.Mesh
			var err error
			switch kind {
			case "sphere":
				m, err = mesh.Sphere(radius, h)
			case "box":
				if len(size) != 3 {
					return fmt.Errorf("--size wants three side lengths X,Y,Z, got %d", len(size))
				}
				m, err = mesh.Box(r3.Vec{X: size[0], Y: size[1], Z: size[2]}, h)
			case "plate":
				m, err = mesh.Plate(width, depth, thickness, h)
			case "cylinder":
				m, err = mesh.Cylinder(radius, height, h)
			}
			if err != nil {
				return err
			}
			if err := mesh.Save(out, m); err != nil {
				return err
			}
			if err := report.WriteRows(a.stdout, report.MeshStats(m, label)); err != nil {
				return err
			}
			fmt.Fprintf(a.stdout, "wrote %s\n", out)
			return nil
		},
	}
	fs := cmd.Flags()
	fs.Float64Var(&radius, "radius", 0, "radius (sphere, cylinder)")
	fs.Float64SliceVar(&size, "size", nil, "side lengths X,Y,Z (box)")
	fs.Float64Var(&width, "width", 0, "extent along x (plate)")
	fs.Float64Var(&depth, "depth", 0, "extent along y (plate)")
	fs.Float64Var(&thickness, "thickness", 0, "extent along z (plate)")
	fs.Float64Var(&height, "height", 0, "length along z (cylinder)")
	fs.Float64Var(&h, "mesh-size", 0, "target triangle edge length (required)")
	fs.StringVarP(&out, "output", "o", "", "STL file to write (required)")
	fs.StringVar(&unit, "unit", "", "unit to label the printed statistics with: nm, um, mm or m")
	cmd.MarkFlagRequired("mesh-size")
	cmd.MarkFlagRequired("output")
	return cmd
}

// flagList formats flag names as "--a, --b and --c".
func flagList(names []string) string {
	f := make([]string, len(names))
	for i, n := range names {
		f[i] = "--" + n
	}
	if len(f) == 1 {
		return f[0]
	}
	return strings.Join(f[:len(f)-1], ", ") + " and " + f[len(f)-1]
}
