package report

import (
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

// WriteTable prints the points as an aligned table followed by Notice.
func WriteTable(w io.Writer, r *Result) error {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "gap [%s]\tenergy [J]\terror [J]\tPFA [J]\tE/PFA\t\n", r.Unit)
	for _, p := range r.Points {
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t\n",
			cell(p.Gap, 'g', 5), cell(p.EnergyJ, 'e', 4), cell(p.EnergyErrorJ, 'e', 1),
			cell(p.PFAEnergyJ, 'e', 4), cell(p.RatioPFA, 'f', 4))
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	_, err := fmt.Fprintf(w, "\n%s\n", wrap(Notice, 78))
	return err
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
func CSVHeader(unit string) []string {
	return []string{
		"gap_" + unit, "offset_x_" + unit, "offset_y_" + unit, "offset_z_" + unit,
		"energy_J", "energy_error_J", "pfa_energy_J", "pfa_moving_J", "pfa_fixed_J", "ratio_pfa",
	}
}

// WriteCSV writes one row of scalars per point under CSVHeader. Numbers
// have full precision; an undefined value (NaN) is an empty field.
func WriteCSV(w io.Writer, r *Result) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(CSVHeader(r.Unit)); err != nil {
		return err
	}
	for _, p := range r.Points {
		row := []Float{p.Gap, p.Offset[0], p.Offset[1], p.Offset[2],
			p.EnergyJ, p.EnergyErrorJ, p.PFAEnergyJ, p.PFAMovingJ, p.PFAFixedJ, p.RatioPFA}
		rec := make([]string, len(row))
		for i, f := range row {
			if x := float64(f); !math.IsNaN(x) && !math.IsInf(x, 0) {
				rec[i] = strconv.FormatFloat(x, 'g', -1, 64)
			}
		}
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
