package report

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"text/tabwriter"
)

// File names of a run's results inside its output directory.
const (
	JSONName = "result.json"
	CSVName  = "result.csv"
)

// WriteTable prints the points as aligned tables — energies, then forces
// when the run has them, then the convergence study if any — followed by
// Notice and, with a spring, the sticking analysis in plain sentences.
func WriteTable(w io.Writer, r *Result) error {
	if r.Mode == ModePFAOnly {
		if err := writePFA(w, r); err != nil {
			return err
		}
	} else {
		if err := writeEnergies(w, r); err != nil {
			return err
		}
		if r.Forces {
			if err := writeForces(w, r); err != nil {
				return err
			}
		}
	}
	if r.Convergence != nil {
		if err := writeConvergence(w, r); err != nil {
			return err
		}
	}
	if r.Materials != "" {
		text := "Materials: " + r.Materials
		if r.ZeroFrequency != "" {
			text += "; at T > 0 " + r.ZeroFrequency
		}
		text += "."
		text += " PFA: " + r.PFALaw + "."
		if _, err := fmt.Fprintf(w, "\n%s\n", wrap(text, 78)); err != nil {
			return err
		}
	}
	notice := r.Notice
	if notice == "" {
		notice = Notice
	}
	if _, err := fmt.Fprintf(w, "\n%s\n", wrap(notice, 78)); err != nil {
		return err
	}
	if st := r.Sticking; st != nil {
		if err := writeSticking(w, st); err != nil {
			return err
		}
	}
	return nil
}

// table is a right-aligned tabwriter whose lines lose their trailing
// blanks when it is flushed.
type table struct {
	*tabwriter.Writer
	buf bytes.Buffer
	out io.Writer
}

func newTable(w io.Writer) *table {
	t := &table{out: w}
	t.Writer = tabwriter.NewWriter(&t.buf, 0, 0, 2, ' ', tabwriter.AlignRight)
	return t
}

// Flush writes the aligned table to the underlying writer.
func (t *table) Flush() error {
	if err := t.Writer.Flush(); err != nil {
		return err
	}
	for _, l := range strings.SplitAfter(t.buf.String(), "\n") {
		if l == "" {
			continue
		}
		if _, err := io.WriteString(t.out, strings.TrimRight(l, " \n")+"\n"); err != nil {
			return err
		}
	}
	t.buf.Reset()
	return nil
}

// angles reports whether the points carry sweep angles.
func (r *Result) angles() bool { return r.Sweep.By == "angles" }

// lead returns the leading cells of a point's row (angle and gap) and of
// the header.
func (r *Result) lead(p *Point) string {
	if r.angles() {
		return cell(deref(p.AngleDeg), 'g', 5) + "\t" + cell(p.Gap, 'g', 5)
	}
	return cell(p.Gap, 'g', 5)
}

func (r *Result) leadHeader() string {
	if r.angles() {
		return fmt.Sprintf("angle [deg]\tgap [%s]", r.Unit)
	}
	return fmt.Sprintf("gap [%s]", r.Unit)
}

// mark flags points added for an analysis.
func mark(p *Point) string {
	if p.AddedFor != "" {
		return "*"
	}
	return ""
}

// footnote explains the mark of added points, if any.
func footnote(w io.Writer, r *Result) {
	for _, p := range r.Points {
		if p.AddedFor != "" {
			fmt.Fprintf(w, "* computed for the %s analysis\n", p.AddedFor)
			return
		}
	}
}

func writeEnergies(w io.Writer, r *Result) error {
	tw := newTable(w)
	fmt.Fprintf(tw, "%s\tenergy [J]\terror [J]\tPFA [J]\tE/PFA\t\t\n", r.leadHeader())
	for i := range r.Points {
		p := &r.Points[i]
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t\n", r.lead(p),
			cell(p.EnergyJ, 'e', 4), cell(p.EnergyErrorJ, 'e', 1),
			cell(p.PFAEnergyJ, 'e', 4), cell(p.RatioPFA, 'f', 4), mark(p))
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	footnote(w, r)
	return nil
}

func writeForces(w io.Writer, r *Result) error {
	fmt.Fprintln(w)
	tw := newTable(w)
	if r.angles() {
		fmt.Fprintf(tw, "angle [deg]\ttorque [N m]\terror [N m]\tstiffness [N m/rad]\t\t\n")
		for i := range r.Points {
			p := &r.Points[i]
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t\n", cell(deref(p.AngleDeg), 'g', 5),
				cell(deref(p.TorqueAlongNm), 'e', 4), cell(deref(p.TorqueErrorNm), 'e', 1),
				cell(deref(p.TorsionalStiffness), 'e', 4), mark(p))
		}
	} else {
		fmt.Fprintf(tw, "gap [%s]\tforce [N]\terror [N]\tPFA force [N]\tF/PFA\tstiffness [N/m]\t\t\n", r.Unit)
		for i := range r.Points {
			p := &r.Points[i]
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t\n", cell(p.Gap, 'g', 5),
				cell(deref(p.ForceAlongN), 'e', 4), cell(deref(p.ForceErrorN), 'e', 1),
				cell(deref(p.PFAForceN), 'e', 4), cell(deref(p.RatioForce), 'f', 4),
				cell(deref(p.StiffnessNPerM), 'e', 4), mark(p))
		}
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	if r.angles() {
		fmt.Fprintf(w, "torque about the rotation axis (> 0: towards larger angles); stiffness\n-d(torque)/d(angle)\n")
	} else {
		fmt.Fprintf(w, "force along the approach direction ê (> 0: attraction); stiffness -dF/ds for\na step s along ê (< 0: the pull grows towards contact)\n")
	}
	return nil
}

func writePFA(w io.Writer, r *Result) error {
	tw := newTable(w)
	force := r.has(func(p *Point) bool { return p.PFAForceN != nil })
	head := fmt.Sprintf("%s\tPFA moving [J]\tPFA fixed [J]\tPFA mean [J]\t", r.leadHeader())
	if force {
		head += "PFA force [N]\t"
	}
	fmt.Fprintln(tw, head)
	for i := range r.Points {
		p := &r.Points[i]
		row := fmt.Sprintf("%s\t%s\t%s\t%s\t", r.lead(p), cell(p.PFAMovingJ, 'e', 4), cell(p.PFAFixedJ, 'e', 4), cell(p.PFAEnergyJ, 'e', 4))
		if force {
			row += cell(deref(p.PFAForceN), 'e', 4) + "\t"
		}
		fmt.Fprintln(tw, row)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	_, err := fmt.Fprintf(w, "\n%s\n", wrap("Proximity-force (PFA) estimates only, summed over facing panels from the moving body (moving), from the others (fixed) and their mean; no boundary-element solution was computed. PFA is accurate only where the surfaces are nearly parallel and close compared with their curvature; run without --pfa-only for the exact values.", 78))
	return err
}

func writeConvergence(w io.Writer, r *Result) error {
	c := r.Convergence
	var hs []string
	for _, l := range c.Levels {
		hs = append(hs, cell(l.MeshH, 'g', 3))
	}
	fmt.Fprintf(w, "\nMesh convergence, %d levels (mean triangle size h = %s %s):\n", len(c.Levels), strings.Join(hs, ", "), r.Unit)
	block := func(name string, values func(*ConvergencePoint) ([]Float, Float, Float)) error {
		tw := newTable(w)
		head := r.leadHeader() + "\t"
		for i := range c.Levels {
			head += fmt.Sprintf("%s h%d\t", name, i+1)
		}
		fmt.Fprintln(tw, head+"extrapolated\torder p\t")
		for i := range c.Points {
			cp := &c.Points[i]
			vs, ex, order := values(cp)
			row := cell(cp.Gap, 'g', 5) + "\t"
			if r.angles() {
				row = cell(deref(cp.AngleDeg), 'g', 5) + "\t" + row
			}
			for _, v := range vs {
				row += cell(v, 'e', 4) + "\t"
			}
			p := cell(order, 'f', 2)
			if c.OrderAssumed {
				p = "2 (assumed)"
			}
			fmt.Fprintln(tw, row+cell(ex, 'e', 4)+"\t"+p+"\t")
		}
		return tw.Flush()
	}
	if err := block("E [J]", func(cp *ConvergencePoint) ([]Float, Float, Float) {
		return cp.EnergyJ, cp.ExtrapolatedEnergyJ, cp.EnergyOrder
	}); err != nil {
		return err
	}
	if len(c.Points) > 0 && c.Points[0].LoadName != "" {
		name := "F [N]"
		if r.angles() {
			name = "torque [N m]"
		}
		fmt.Fprintln(w)
		if err := block(name, func(cp *ConvergencePoint) ([]Float, Float, Float) {
			return cp.Load, deref(cp.ExtrapolatedLoad), deref(cp.LoadOrder)
		}); err != nil {
			return err
		}
	}
	_, err := fmt.Fprintf(w, "%s\n", wrap(c.Note+". The main tables show the finest level.", 78))
	return err
}

func writeSticking(w io.Writer, st *Sticking) error {
	what := fmt.Sprintf("k = %.3g N/m, rest gap %s", st.Stiffness, si(st.Rest, "m"))
	if st.Torsional {
		contact := float64(deref(st.ContactAngleDeg))
		what = fmt.Sprintf("k = %.3g N m/rad, at rest at the sweep angle %.4g degrees, %s before contact at %.4g degrees; the angles below are measured from contact",
			st.Stiffness, contact-st.Rest*180/math.Pi, si(st.Rest, "rad"), contact)
	}
	refined := "no extra points were needed"
	switch {
	case st.Rounds > 0 && st.Converged:
		refined = fmt.Sprintf("%d refinement round(s) added points, marked *; converged", st.Rounds)
	case st.Rounds > 0:
		refined = fmt.Sprintf("%d refinement round(s) added points, marked *; the interpolation has not converged to the target, so treat limits near the verdict with care", st.Rounds)
	case !st.Converged:
		refined = "the interpolation has not converged to the target"
	}
	if _, err := fmt.Fprintf(w, "\n%s\n", wrap(fmt.Sprintf("Sticking analysis (%s; %s):", what, refined), 78)); err != nil {
		return err
	}
	_, err := fmt.Fprintf(w, "%s\n", wrap(st.Summary, 78))
	return err
}

// si formats v with an SI prefix to four digits, e.g. 4e-7 m as "400 nm".
func si(v float64, unit string) string {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Sprintf("%g %s", v, unit)
	}
	prefixes := []string{"a", "f", "p", "n", "µ", "m", "", "k", "M", "G"}
	p := int(math.Floor(math.Log10(math.Abs(v)) / 3))
	p = min(max(p, -6), 3)
	return fmt.Sprintf("%.4g %s%s", v/math.Pow(1000, float64(p)), prefixes[p+6], unit)
}

// has reports whether any point has what f asks for.
func (r *Result) has(f func(*Point) bool) bool {
	for i := range r.Points {
		if f(&r.Points[i]) {
			return true
		}
	}
	return false
}

// deref returns *f, or NaN for a nil pointer.
func deref(f *Float) Float {
	if f == nil {
		return Float(math.NaN())
	}
	return *f
}

// cell formats a table entry; NaN and infinities print as "-".
func cell(f Float, format byte, prec int) string {
	x := float64(f)
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "-"
	}
	return strconv.FormatFloat(x, format, prec, 64)
}

// wrap breaks text into lines of at most width characters at spaces.
func wrap(text string, width int) string {
	var b strings.Builder
	n := 0
	for _, w := range strings.Fields(text) {
		switch {
		case n == 0:
		case n+1+len(w) > width:
			b.WriteByte('\n')
			n = 0
		default:
			b.WriteByte(' ')
			n++
		}
		b.WriteString(w)
		n += len(w)
	}
	return b.String()
}

// WriteJSON writes r as indented JSON (the content of result.json).
func WriteJSON(w io.Writer, r *Result) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(r)
}

// CSVHeader returns the column names of result.csv for a length unit.
// The columns are the same for every run; values a run did not compute are
// empty.
func CSVHeader(unit string) []string {
	return []string{
		"gap_" + unit, "offset_x_" + unit, "offset_y_" + unit, "offset_z_" + unit,
		"energy_J", "energy_error_J", "pfa_energy_J", "pfa_moving_J", "pfa_fixed_J", "ratio_pfa",
		"angle_deg",
		"force_x_N", "force_y_N", "force_z_N", "force_along_N", "force_error_N", "pfa_force_N", "ratio_force_pfa",
		"torque_x_Nm", "torque_y_Nm", "torque_z_Nm", "torque_along_Nm", "torque_error_Nm",
		"stiffness_N_per_m", "stiffness_error_N_per_m",
		"torsional_stiffness_Nm_per_rad", "torsional_stiffness_error_Nm_per_rad",
		"added_for",
	}
}

// WriteCSV writes one row of scalars per point under CSVHeader. Numbers
// have full precision; an undefined or missing value is an empty field.
func WriteCSV(w io.Writer, r *Result) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(CSVHeader(r.Unit)); err != nil {
		return err
	}
	nan := Float(math.NaN())
	three := func(v *[3]Float) []Float {
		if v == nil {
			return []Float{nan, nan, nan}
		}
		return v[:]
	}
	for i := range r.Points {
		p := &r.Points[i]
		row := []Float{p.Gap, p.Offset[0], p.Offset[1], p.Offset[2],
			p.EnergyJ, p.EnergyErrorJ, p.PFAEnergyJ, p.PFAMovingJ, p.PFAFixedJ, p.RatioPFA,
			deref(p.AngleDeg)}
		row = append(row, three(p.ForceN)...)
		row = append(row, deref(p.ForceAlongN), deref(p.ForceErrorN), deref(p.PFAForceN), deref(p.RatioForce))
		row = append(row, three(p.TorqueNm)...)
		row = append(row, deref(p.TorqueAlongNm), deref(p.TorqueErrorNm),
			deref(p.StiffnessNPerM), deref(p.StiffnessErrorNPerM),
			deref(p.TorsionalStiffness), deref(p.TorsionalStiffnessError))
		rec := make([]string, len(row), len(row)+1)
		for i, f := range row {
			if x := float64(f); !math.IsNaN(x) && !math.IsInf(x, 0) {
				rec[i] = strconv.FormatFloat(x, 'g', -1, 64)
			}
		}
		rec = append(rec, p.AddedFor)
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// RemoveStale deletes the result files of an earlier run from dir, if any.
func RemoveStale(dir string) error {
	for _, name := range []string{JSONName, CSVName} {
		if err := os.Remove(filepath.Join(dir, name)); err != nil && !errors.Is(err, os.ErrNotExist) {
			return fmt.Errorf("removing the result of an earlier run: %w", err)
		}
	}
	return nil
}

// WriteFiles writes result.json and result.csv into dir atomically: both
// are written to temporary files in dir first and renamed into place only
// when both are complete, result.json last. On any error neither file is
// left behind (nor any temporary file).
func WriteFiles(dir string, r *Result) error {
	jsonTmp, err := writeTemp(dir, JSONName, func(w io.Writer) error { return WriteJSON(w, r) })
	if err != nil {
		return err
	}
	csvTmp, err := writeTemp(dir, CSVName, func(w io.Writer) error { return WriteCSV(w, r) })
	if err != nil {
		os.Remove(jsonTmp)
		return err
	}
	csvPath, jsonPath := filepath.Join(dir, CSVName), filepath.Join(dir, JSONName)
	if err := os.Rename(csvTmp, csvPath); err != nil {
		os.Remove(jsonTmp)
		os.Remove(csvTmp)
		return fmt.Errorf("writing %s: %w", csvPath, err)
	}
	if err := os.Rename(jsonTmp, jsonPath); err != nil {
		os.Remove(jsonTmp)
		os.Remove(csvPath)
		return fmt.Errorf("writing %s: %w", jsonPath, err)
	}
	syncDir(dir)
	return nil
}

// writeTemp writes a complete temporary file next to dir/name and returns
// its path.
func writeTemp(dir, name string, write func(io.Writer) error) (string, error) {
	f, err := os.CreateTemp(dir, "."+name+".*.tmp")
	if err != nil {
		return "", fmt.Errorf("writing %s: %w", filepath.Join(dir, name), err)
	}
	tmp := f.Name()
	fail := func(err error) (string, error) {
		f.Close()
		os.Remove(tmp)
		return "", fmt.Errorf("writing %s: %w", filepath.Join(dir, name), err)
	}
	if err := write(f); err != nil {
		return fail(err)
	}
	if err := f.Chmod(0o644); err != nil {
		return fail(err)
	}
	if err := f.Sync(); err != nil {
		return fail(err)
	}
	if err := f.Close(); err != nil {
		os.Remove(tmp)
		return "", fmt.Errorf("writing %s: %w", filepath.Join(dir, name), err)
	}
	return tmp, nil
}

// syncDir flushes the directory entry of renamed files to disk where the
// system supports it; failure only weakens durability, not atomicity.
func syncDir(dir string) {
	if d, err := os.Open(dir); err == nil {
		d.Sync()
		d.Close()
	}
}
