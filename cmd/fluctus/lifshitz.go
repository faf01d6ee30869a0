package main

import (
	"context"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"github.com/fluctus/fluctus/cmd/internal/atomicfile"
	"github.com/fluctus/fluctus/scatter"
	"github.com/fluctus/fluctus/scatter/lifshitz"
	"github.com/fluctus/fluctus/scatter/material"
)

// lifshitzOptions are the flags of the lifshitz command.
type lifshitzOptions struct {
	material, material2 string
	gaps                []string
	temperature         string
	tolerance           float64
	out                 string
}

func (a *app) lifshitzCommand() *cobra.Command {
	var o lifshitzOptions
	cmd := &cobra.Command{
		Use:   "lifshitz --material NAME --gap 100nm",
		Short: "Casimir energy and pressure between two parallel plates of real materials",
		Long: `Lifshitz computes the Casimir interaction of two parallel half-spaces across a
vacuum gap by the Lifshitz formula at imaginary frequency (E. M. Lifshitz,
Sov. Phys. JETP 2, 73 (1956)), without any mesh: the energy per area (J/m²)
and the pressure (Pa, negative: attraction) at T = 0 and, with a temperature
above 0, the free energy per area and pressure by the Matsubara sum, with the
reduction factors

  η_E = E/E_Casimir,  η_P = P/P_Casimir,

the ratios to perfect conductors at the same gap and temperature (at T = 0
Casimir's -π²ħc/(720 d³) and -π²ħc/(240 d⁴), Casimir 1948). The n = 0
Matsubara term depends on each material's static limit, which the output
states: a Drude metal has no TE reflection there, a plasma metal keeps it —
compare gold-drude with gold-plasma to see the difference.

  fluctus lifshitz --material gold-drude --gap 100nm
  fluctus lifshitz --material gold-drude --material2 silicon --gap 50nm,100nm,1um
  fluctus lifshitz --material gold-plasma --gap 10nm:10um:13 --temperature 300K --out plates.csv

--material and --material2 take what a job file's material key takes (a
name, see "fluctus material show --list", an inline model such as
'{drude: {plasma_eV: 9, damping_eV: 0.035}}', or a file); --material2
defaults to --material. Gaps carry their unit (nm, um, mm, m), as a list
(50nm,100nm) or a range FROM:TO:N of N points evenly spaced in log d.
--out FILE.csv also writes the table as CSV (lengths in m).

Results are idealised: smooth, homogeneous, infinitely thick plates of the
given models in vacuum, with no roughness or patch potentials.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error { return a.lifshitz(cmd.Context(), o) },
	}
	fs := cmd.Flags()
	fs.StringVar(&o.material, "material", "", "material of the first plate (required)")
	fs.StringVar(&o.material2, "material2", "", "material of the second plate (default: --material)")
	fs.StringSliceVar(&o.gaps, "gap", nil, "gaps with their unit: 100nm, a list 50nm,1um or a range 10nm:1um:9 (required)")
	fs.StringVar(&o.temperature, "temperature", "300K", "temperature in kelvin (300K, or 0 for T = 0 only)")
	fs.Float64Var(&o.tolerance, "tolerance", lifshitz.DefaultTolerance, "relative accuracy of each value")
	fs.StringVarP(&o.out, "out", "o", "", "also write the table to FILE.csv")
	return cmd
}

// platesRow is one gap of the lifshitz table.
type platesRow struct {
	gap         float64 // m
	zero, therm lifshitz.Result
}

func (a *app) lifshitz(ctx context.Context, o lifshitzOptions) error {
	if o.material == "" {
		return fmt.Errorf("--material: give the material of the plates, e.g. --material gold-drude (fluctus material show --list lists the named materials)")
	}
	if len(o.gaps) == 0 {
		return fmt.Errorf("--gap: give the gap with its unit, e.g. --gap 100nm, a list 50nm,1um or a range 10nm:1um:9")
	}
	ma, _, err := materialArg(o.material)
	if err != nil {
		return fmt.Errorf("--material: %w", err)
	}
	mb := ma
	if o.material2 != "" {
		if mb, _, err = materialArg(o.material2); err != nil {
			return fmt.Errorf("--material2: %w", err)
		}
	}
	gaps, unit, err := parseGaps(o.gaps)
	if err != nil {
		return fmt.Errorf("--gap: %w", err)
	}
	temp, err := parseKelvin(o.temperature)
	if err != nil {
		return fmt.Errorf("--temperature: %w", err)
	}
	if !(o.tolerance >= lifshitz.MinTolerance && o.tolerance <= lifshitz.MaxTolerance) {
		return fmt.Errorf("--tolerance %g: give a relative accuracy from %g to %g", o.tolerance, lifshitz.MinTolerance, lifshitz.MaxTolerance)
	}
	rows := make([]platesRow, len(gaps))
	for i, d := range gaps {
		r := platesRow{gap: d}
		if r.zero, err = lifshitz.Plates(ctx, ma, mb, d, 0, o.tolerance); err != nil {
			return fmt.Errorf("gap %g m, T = 0: %w", d, err)
		}
		if temp > 0 {
			if r.therm, err = lifshitz.Plates(ctx, ma, mb, d, temp, o.tolerance); err != nil {
				return fmt.Errorf("gap %g m, T = %g K: %w", d, temp, err)
			}
		}
		rows[i] = r
	}
	writePlates(a.stdout, ma, mb, temp, unit, rows)
	if o.out != "" {
		if err := writePlatesCSV(o.out, temp, rows); err != nil {
			return err
		}
		fmt.Fprintf(a.stdout, "\nwrote %s\n", o.out)
	}
	return nil
}

// parseGaps reads gaps with units (m): single values, lists and ranges
// FROM:TO:N (N points evenly spaced in log d). It returns them with the
// unit of the first, for display.
func parseGaps(specs []string) ([]float64, scatter.Unit, error) {
	var out []float64
	var unit scatter.Unit
	for _, s := range specs {
		parts := strings.Split(s, ":")
		switch len(parts) {
		case 1:
			d, u, err := parseLength(parts[0])
			if err != nil {
				return nil, 0, err
			}
			if unit == 0 {
				unit = u
			}
			out = append(out, d)
		case 2, 3:
			lo, u, err := parseLength(parts[0])
			if err != nil {
				return nil, 0, err
			}
			hi, _, err := parseLength(parts[1])
			if err != nil {
				return nil, 0, err
			}
			n := 9
			if len(parts) == 3 {
				if n, err = strconv.Atoi(strings.TrimSpace(parts[2])); err != nil || n < 2 || n > 1000 {
					return nil, 0, fmt.Errorf("range %q: the number of points %q must be a whole number from 2 to 1000", s, parts[2])
				}
			}
			if !(hi > lo) {
				return nil, 0, fmt.Errorf("range %q: want FROM below TO", s)
			}
			if unit == 0 {
				unit = u
			}
			for k := 0; k < n; k++ {
				out = append(out, lo*math.Pow(hi/lo, float64(k)/float64(n-1)))
			}
		default:
			return nil, 0, fmt.Errorf("%q: give a gap (100nm) or a range FROM:TO:N (10nm:1um:9)", s)
		}
	}
	return out, unit, nil
}

// parseLength reads a positive length with its unit (nm, um, mm or m, as in
// a job file), e.g. "100nm", "0.1 um", returning metres and the unit.
func parseLength(s string) (float64, scatter.Unit, error) {
	s = strings.TrimSpace(s)
	i := strings.IndexFunc(s, func(r rune) bool {
		return !(r >= '0' && r <= '9' || r == '.' || r == 'e' || r == 'E' || r == '+' || r == '-')
	})
	if i < 0 {
		return 0, 0, fmt.Errorf("%q has no unit: say e.g. %snm or %sum", s, s, s)
	}
	// An exponent's e is part of the number only when digits follow.
	num, name := s[:i], strings.TrimSpace(s[i:])
	if strings.HasSuffix(num, "e") || strings.HasSuffix(num, "E") {
		num, name = num[:len(num)-1], s[i-1:]
	}
	x, err := strconv.ParseFloat(num, 64)
	if err != nil {
		return 0, 0, fmt.Errorf("%q: cannot read %q as a number", s, num)
	}
	u, err := scatter.ParseUnit(name)
	if err != nil {
		return 0, 0, fmt.Errorf("%q: %w", s, err)
	}
	if !(x > 0) || math.IsInf(x, 0) {
		return 0, 0, fmt.Errorf("%q: a gap must be greater than zero", s)
	}
	return u.Metres(x), u, nil
}

// parseKelvin reads a temperature in kelvin, with or without the unit K.
func parseKelvin(s string) (float64, error) {
	t := strings.TrimSpace(strings.TrimSuffix(strings.TrimSpace(s), "K"))
	x, err := strconv.ParseFloat(t, 64)
	if err != nil || !(x >= 0) || math.IsInf(x, 0) {
		return 0, fmt.Errorf("%q: give a temperature in kelvin ≥ 0, e.g. 300K or 0", s)
	}
	return x, nil
}

// zeroTermText states the n = 0 treatment of the materials at T > 0.
func zeroTermText(ma, mb material.Model) string {
	one := func(m material.Model) string {
		switch s := m.Static(); s.Kind {
		case material.KindDrude:
			return m.Name() + ": Drude (TE reflection 0 at n = 0)"
		case material.KindPlasma:
			return fmt.Sprintf("%s: plasma (TE reflection kept at n = 0, ħω_p = %.4g eV)", m.Name(), material.ToEV(s.PlasmaRadPerS))
		case material.KindDielectric:
			return fmt.Sprintf("%s: dielectric (eps(0) = %.6g)", m.Name(), s.Epsilon)
		}
		return m.Name() + ": perfect conductor"
	}
	if ma.Name() == mb.Name() {
		return "n = 0 Matsubara term: " + one(ma)
	}
	return "n = 0 Matsubara term: " + one(ma) + "; " + one(mb)
}

// writePlates prints the lifshitz table.
func writePlates(w io.Writer, ma, mb material.Model, temp float64, unit scatter.Unit, rows []platesRow) {
	fmt.Fprintf(w, "plates: %s | vacuum gap | %s (Lifshitz formula at imaginary frequency)\n", ma.Name(), mb.Name())
	if temp > 0 {
		fmt.Fprintf(w, "T = 0 and T = %g K; %s\n", temp, zeroTermText(ma, mb))
	} else {
		fmt.Fprintf(w, "T = 0\n")
	}
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 2, 8, 2, ' ', tabwriter.AlignRight)
	head := fmt.Sprintf("gap [%s]\tE/A [J/m²]\tP [Pa]\tη_E\tη_P\t", unit.Name())
	if temp > 0 {
		head += fmt.Sprintf("F/A %g K [J/m²]\tP %g K [Pa]\tη_E %g K\tη_P %g K\t", temp, temp, temp, temp)
	}
	fmt.Fprintln(tw, head)
	for _, r := range rows {
		line := fmt.Sprintf("%.5g\t%.5e\t%.5e\t%.5f\t%.5f\t", r.gap/float64(unit), r.zero.Energy, r.zero.Pressure, r.zero.EnergyRatio, r.zero.PressureRatio)
		if temp > 0 {
			line += fmt.Sprintf("%.5e\t%.5e\t%.5f\t%.5f\t", r.therm.Energy, r.therm.Pressure, r.therm.EnergyRatio, r.therm.PressureRatio)
		}
		fmt.Fprintln(tw, line)
	}
	tw.Flush()
	fmt.Fprintf(w, "\nη: ratio to perfect conductors at the same gap and temperature (Casimir 1948 at T = 0); negative energies and pressures mean attraction.\n")
	fmt.Fprintf(w, "Results are idealised: smooth, homogeneous, infinitely thick plates of these models in vacuum.\n")
}

// writePlatesCSV writes the table as CSV (gap in m) atomically.
func writePlatesCSV(path string, temp float64, rows []platesRow) error {
	return atomicfile.Write(path, func(w io.Writer) error {
		cw := csv.NewWriter(w)
		cw.Write([]string{"gap_m", "energy_J_per_m2", "pressure_Pa", "eta_E", "eta_P",
			"temperature_K", "free_energy_J_per_m2", "pressure_T_Pa", "eta_E_T", "eta_P_T"})
		g := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
		for _, r := range rows {
			rec := []string{g(r.gap), g(r.zero.Energy), g(r.zero.Pressure), g(r.zero.EnergyRatio), g(r.zero.PressureRatio), g(temp)}
			if temp > 0 {
				rec = append(rec, g(r.therm.Energy), g(r.therm.Pressure), g(r.therm.EnergyRatio), g(r.therm.PressureRatio))
			} else {
				rec = append(rec, "", "", "", "")
			}
			cw.Write(rec)
		}
		cw.Flush()
		return cw.Error()
	})
}
