package main

import (
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"
	"gopkg.in/yaml.v3"

	"github.com/fluctus/fluctus/cmd/internal/job"
	"github.com/fluctus/fluctus/cmd/internal/plot"
	"github.com/fluctus/fluctus/scatter/material"
)

// citations gives the source of every named material's parameters (the
// comments of scatter/material's library hold the same references; a test
// checks that every library name has an entry here).
var citations = map[string]string{
	"gold-plasma":      "ħω_p = 9.0 eV, the value conventional in the Casimir literature, e.g. A. Lambrecht and S. Reynaud, Eur. Phys. J. D 8, 309 (2000)",
	"gold-drude":       "ħω_p = 9.0 eV, ħγ = 35 meV, the values conventional in the Casimir literature, e.g. A. Lambrecht and S. Reynaud, Eur. Phys. J. D 8, 309 (2000)",
	"aluminium-plasma": "ħω_p = 11.5 eV: conventional value of the Casimir literature (Lambrecht & Reynaud 2000), recalled from memory and not checked against the paper",
	"aluminium-drude":  "ħω_p = 11.5 eV, ħγ = 50 meV: conventional values of the Casimir literature (Lambrecht & Reynaud 2000), recalled from memory and not checked against the paper",
	"silicon":          "eps(iξ) = eps_∞ + (eps_0 - eps_∞) ω_0²/(ω_0² + ξ²), eps_0 = 11.87, eps_∞ = 1.035, ω_0 = 6.6e15 rad/s: A. Lambrecht, I. Pirozhenko, L. Duraffourg and Ph. Andreucci, EPL 77, 44006 (2007), recalled from memory",
	"perfect":          "the ideal metal, eps = ∞ at every frequency (H. B. G. Casimir, Proc. K. Ned. Akad. Wet. 51, 793 (1948))",
}

// materialNote is the material part of a body's line in the run's summary:
// empty for a perfect conductor, so that jobs without materials print as
// before.
func materialNote(b *job.Body) string {
	if b.Material == nil {
		return ""
	}
	return fmt.Sprintf(", material %s (%s)", b.MaterialName(), material.KindOf(b.Material))
}

// materialArg reads a material given on the command line: a library name,
// an inline YAML model ({drude: {...}}), a YAML file holding one, or a file
// of optical data (read as {table: FILE}). It returns the model and where
// it came from.
func materialArg(arg string) (material.Model, string, error) {
	arg = strings.TrimSpace(arg)
	if arg == "" {
		return nil, "", fmt.Errorf("no material given: name one (%s), or give an inline model such as '{drude: {plasma_eV: 9, damping_eV: 0.035}}' or a file", strings.Join(material.Names(), ", "))
	}
	if fi, err := os.Stat(arg); err == nil && !fi.IsDir() {
		switch strings.ToLower(filepath.Ext(arg)) {
		case ".yaml", ".yml":
			data, err := os.ReadFile(arg)
			if err != nil {
				return nil, "", fmt.Errorf("reading the material file: %w", err)
			}
			var spec any
			if err := yaml.Unmarshal(data, &spec); err != nil {
				return nil, "", fmt.Errorf("%s: invalid YAML: %w", arg, err)
			}
			m, err := material.Parse(spec, filepath.Dir(arg))
			if err != nil {
				return nil, "", fmt.Errorf("%s: %w", arg, err)
			}
			return m, "the model in " + arg, nil
		}
		m, err := material.Parse(map[string]any{"table": arg}, "")
		if err != nil {
			return nil, "", err
		}
		return m, fmt.Sprintf("optical data of %s, eps(iξ) by the Kramers–Kronig relation (Landau & Lifshitz, Electrodynamics of Continuous Media, §82)", arg), nil
	}
	if strings.HasPrefix(arg, "{") {
		var spec any
		if err := yaml.Unmarshal([]byte(arg), &spec); err != nil {
			return nil, "", fmt.Errorf("material %s: invalid YAML: %w", arg, err)
		}
		m, err := material.Parse(spec, ".")
		if err != nil {
			return nil, "", err
		}
		return m, "the model given on the command line", nil
	}
	m, err := material.Named(arg)
	if err != nil {
		if c := job.MaterialCandidates(arg); len(c) > 0 {
			return nil, "", fmt.Errorf("unknown material %q: say %s (fluctus material show --list lists every named material)", arg, strings.Join(c, " or "))
		}
		return nil, "", fmt.Errorf("%w (or a file: a YAML model or optical data)", err)
	}
	return m, citations[m.Name()], nil
}

// staticText describes the static limit of m, which decides the n = 0
// Matsubara term.
func staticText(m material.Model) string {
	s := m.Static()
	switch s.Kind {
	case material.KindDielectric:
		return fmt.Sprintf("dielectric, eps(0) = %.6g: at n = 0 only TM reflects, r_TM = (eps(0) - 1)/(eps(0) + 1) = %.4g", s.Epsilon, (s.Epsilon-1)/(s.Epsilon+1))
	case material.KindDrude:
		return "Drude metal: eps(iξ) diverges like 1/ξ, so at n = 0 the TE reflection vanishes (r_TE = 0, r_TM = 1)"
	case material.KindPlasma:
		return fmt.Sprintf("plasma metal, ħω_p = %.4g eV: ξ² eps(iξ) → ω_p², so at n = 0 the TE reflection stays finite (r_TM = 1)", material.ToEV(s.PlasmaRadPerS))
	case material.KindPerfect:
		return "perfect conductor: eps = ∞ at every frequency (r_TE = -1, r_TM = 1)"
	}
	return s.Kind.String()
}

// describeModel is the model behind a library label, e.g. "drude(9 eV, 0.035 eV)".
func describeModel(m material.Model) string {
	if l, ok := m.(material.Labelled); ok {
		return l.Model.Name()
	}
	return m.Name()
}

func (a *app) materialCommand() *cobra.Command {
	cmd := &cobra.Command{
		Use:   "material",
		Short: "Show the dielectric models a job file can name",
		Long: `Material shows the dielectric models of the material key of a job file:
"fluctus material show --list" lists the named materials, "fluctus material
show NAME" tabulates one.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error { return cmd.Help() },
	}
	cmd.AddCommand(a.materialShowCommand())
	return cmd
}

// showOptions are the flags of material show.
type showOptions struct {
	list      bool
	from, to  float64 // photon energies, eV
	perDecade int
	plotFile  string
}

func (a *app) materialShowCommand() *cobra.Command {
	var o showOptions
	cmd := &cobra.Command{
		Use:   "show NAME|MODEL|FILE",
		Short: "Tabulate a material's permittivity at imaginary frequency",
		Long: `Show prints the permittivity eps(iξ) of a material on a logarithmic grid of
imaginary frequencies ξ (columns: ξ in rad/s, the photon energy ħξ in eV,
eps(iξ)), its static limit — which decides the n = 0 Matsubara term at
T > 0: Drude metals lose their TE reflection there, plasma metals keep it —
and where its parameters come from.

The material is given as in a job file's material key:

  fluctus material show gold-drude
  fluctus material show '{drude: {plasma_eV: 9, damping_eV: 0.035}}'
  fluctus material show '{permittivity: 11.7}'
  fluctus material show model.yaml          # a YAML file holding a model
  fluctus material show gold-eps2.txt       # optical data: photon energy (eV)
                                            # and eps'' per line
  fluctus material show --list              # the named materials

--plot FILE.png or FILE.svg also draws eps(iξ) - 1 against ħξ on log–log
axes.`,
		Args: func(cmd *cobra.Command, args []string) error {
			if o.list {
				return cobra.NoArgs(cmd, args)
			}
			if len(args) != 1 {
				return fmt.Errorf("give one material (a name, an inline model or a file), or --list for the named materials")
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			if o.list {
				return a.listMaterials()
			}
			return a.showMaterial(args[0], o)
		},
	}
	fs := cmd.Flags()
	fs.BoolVar(&o.list, "list", false, "list the named materials")
	fs.Float64Var(&o.from, "from", 1e-3, "lowest photon energy ħξ of the grid, eV")
	fs.Float64Var(&o.to, "to", 100, "highest photon energy ħξ of the grid, eV")
	fs.IntVar(&o.perDecade, "per-decade", 4, "grid points per decade of ξ")
	fs.StringVar(&o.plotFile, "plot", "", "also draw eps(iξ) - 1 against ħξ into FILE.png or FILE.svg")
	return cmd
}

// listMaterials prints the library with each model, its static kind and
// its source.
func (a *app) listMaterials() error {
	tw := tabwriter.NewWriter(a.stdout, 2, 8, 2, ' ', 0)
	fmt.Fprintf(tw, "name\tmodel\tstatic limit\n")
	for _, name := range material.Names() {
		m, err := material.Named(name)
		if err != nil {
			return err
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\n", name, describeModel(m), material.KindOf(m))
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintln(a.stdout, "\nSources:")
	for _, name := range material.Names() {
		fmt.Fprintf(a.stdout, "  %s: %s\n", name, citations[name])
	}
	fmt.Fprintln(a.stdout, "\nA job file may also give an inline model ({drude: {plasma_eV, damping_eV}}, {plasma: {plasma_eV}}, {lorentz: [{strength, resonance_eV, damping_eV}]}, {permittivity: eps}, summed when several are given) or optical data ({table: FILE}).")
	return nil
}

// materialGrid returns the imaginary frequencies (rad/s) from photon
// energies from to to eV, perDecade per decade, both ends included.
func materialGrid(from, to float64, perDecade int) ([]float64, error) {
	switch {
	case !(from > 0) || !(to > from) || math.IsInf(to, 0):
		return nil, fmt.Errorf("--from %g --to %g: give photon energies in eV with 0 < from < to", from, to)
	case perDecade < 1 || perDecade > 100:
		return nil, fmt.Errorf("--per-decade %d: give 1 to 100 points per decade", perDecade)
	}
	n := int(math.Round(math.Log10(to/from)*float64(perDecade))) + 1
	n = max(n, 2)
	xi := make([]float64, n)
	for k := range xi {
		xi[k] = material.FromEV(from * math.Pow(to/from, float64(k)/float64(n-1)))
	}
	return xi, nil
}

// showMaterial prints the table of a material — or of every model of a
// family such as gold (gold-drude, gold-plasma) — and draws it if asked.
func (a *app) showMaterial(arg string, o showOptions) error {
	xi, err := materialGrid(o.from, o.to, o.perDecade)
	if err != nil {
		return err
	}
	args := []string{arg}
	if _, err := material.Named(arg); err != nil {
		if c := job.MaterialCandidates(arg); len(c) > 0 {
			if _, statErr := os.Stat(arg); statErr != nil {
				args = c
				fmt.Fprintf(a.stdout, "%s: %d models, %s\n\n", arg, len(c), strings.Join(c, " and "))
			}
		}
	}
	var curves []plot.Curve
	for i, arg := range args {
		m, source, err := materialArg(arg)
		if err != nil {
			return err
		}
		if o.plotFile != "" && material.KindOf(m) == material.KindPerfect {
			return fmt.Errorf("--plot: a perfect conductor has eps = ∞ at every frequency: there is nothing to draw")
		}
		eps := make([]float64, len(xi))
		ev := make([]float64, len(xi))
		sus := make([]float64, len(xi))
		for k, x := range xi {
			eps[k] = m.Epsilon(x)
			ev[k], sus[k] = material.ToEV(x), eps[k]-1
		}
		if i > 0 {
			fmt.Fprintln(a.stdout)
		}
		writeMaterial(a.stdout, m, source, xi, eps)
		curves = append(curves, plot.Curve{Name: m.Name(), X: ev, Y: sus})
	}
	if o.plotFile == "" {
		return nil
	}
	fig, err := plot.CurveFigure("material", "Permittivity at imaginary frequency",
		"photon energy ħξ [eV]", "eps(iξ) - 1", "", curves)
	if err != nil {
		return err
	}
	if err := plot.WriteFigure(fig, o.plotFile); err != nil {
		return err
	}
	fmt.Fprintf(a.stdout, "\nwrote %s\n", o.plotFile)
	return nil
}

// writeMaterial prints a material's description and its table.
func writeMaterial(w io.Writer, m material.Model, source string, xi, eps []float64) {
	fmt.Fprintf(w, "material: %s", m.Name())
	if d := describeModel(m); d != m.Name() {
		fmt.Fprintf(w, " = %s", d)
	}
	fmt.Fprintf(w, "\nstatic limit: %s\n", staticText(m))
	if source != "" {
		fmt.Fprintf(w, "source: %s\n", source)
	}
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 2, 8, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "ξ [rad/s]\tħξ [eV]\teps(iξ)\t\n")
	for k := range xi {
		fmt.Fprintf(tw, "%.4e\t%.4g\t%.6g\t\n", xi[k], material.ToEV(xi[k]), eps[k])
	}
	tw.Flush()
}
