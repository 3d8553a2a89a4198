package main

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
)

// batchColumn is one column of a line inventory.
type batchColumn struct {
	name     string
	required bool
	// check validates a value (already parsed); "" = fine, else the problem.
	check func(v float64) string
	help  string
}

func positive(v float64) string {
	if v > 0 {
		return ""
	}
	return fmt.Sprintf("must be > 0, got %s", fmtNum(v))
}

func nonNegative(v float64) string {
	if v >= 0 {
		return ""
	}
	return fmt.Sprintf("must be >= 0, got %s", fmtNum(v))
}

func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// batchColumns are the columns of LINES.csv, in the order the README documents them.
// "name" is text; every other column is a number.
var batchColumns = []batchColumn{
	{name: "name", required: true, help: "line name, free text"},
	{name: "voltage_kv", required: true, check: positive, help: "nominal line-to-line rms voltage, kV"},
	{name: "frequency_hz", required: true, check: positive, help: "system frequency, Hz"},
	{name: "length_km", required: true, check: positive, help: "line length, km"},
	{name: "r_ohm_per_km", required: true, check: nonNegative, help: "positive-sequence series resistance, ohm/km"},
	{name: "l_mh_per_km", check: positive, help: "positive-sequence series inductance, mH/km (or x_ohm_per_km)"},
	{name: "x_ohm_per_km", check: positive, help: "positive-sequence series reactance at frequency_hz, ohm/km (or l_mh_per_km)"},
	{name: "c_nf_per_km", check: positive, help: "positive-sequence shunt capacitance, nF/km (or b_us_per_km)"},
	{name: "b_us_per_km", check: positive, help: "positive-sequence shunt susceptance at frequency_hz, uS/km (or c_nf_per_km)"},
	{name: "g_us_per_km", check: nonNegative, help: "shunt conductance, uS/km (default 0)"},
	{name: "r0_ohm_per_km", check: nonNegative, help: "zero-sequence series resistance, ohm/km (zero-sequence data: r0, l0 or x0, c0 or b0)"},
	{name: "l0_mh_per_km", check: positive, help: "zero-sequence series inductance, mH/km (or x0_ohm_per_km)"},
	{name: "x0_ohm_per_km", check: positive, help: "zero-sequence series reactance at frequency_hz, ohm/km (or l0_mh_per_km)"},
	{name: "c0_nf_per_km", check: positive, help: "zero-sequence shunt capacitance, nF/km (or b0_us_per_km)"},
	{name: "b0_us_per_km", check: positive, help: "zero-sequence shunt susceptance at frequency_hz, uS/km (or c0_nf_per_km)"},
	{name: "g0_us_per_km", check: nonNegative, help: "zero-sequence shunt conductance, uS/km (default 0)"},
	{name: "us_kv", check: positive, help: "highest voltage for equipment, kV (default voltage_kv)"},
	{name: "source_mva", check: positive, help: "three-phase short-circuit level at the sending bus, MVA (empty: ideal source)"},
	{name: "x_over_r", check: positive, help: "X/R of the source (required with source_mva)"},
	{name: "x0_over_x1", check: positive, help: "zero- over positive-sequence source impedance (default 1)"},
	{name: "reactor_mvar_sending", check: nonNegative, help: "line-connected shunt reactor at the sending end, Mvar (default none)"},
	{name: "reactor_mvar_receiving", check: nonNegative, help: "line-connected shunt reactor at the receiving end, Mvar (default none)"},
}

// batchLine is one validated row of a line inventory.
type batchLine struct {
	Row    int    // the row's number in the file, the header being row 1
	Name   string // "name"
	values map[string]float64
	has    map[string]bool
}

// parseBatch reads and validates a line inventory. Errors are input errors of the form
// `LINES.csv: row N: column: problem` (or `LINES.csv: column: problem` for the header).
func parseBatch(file string, r io.Reader) ([]batchLine, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("%s: %v", file, err)
	}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf")) // a spreadsheet's byte-order mark
	cr := csv.NewReader(bytes.NewReader(data))
	cr.Comment = '#'
	cr.TrimLeadingSpace = true
	cr.FieldsPerRecord = -1
	header, err := cr.Read()
	if errors.Is(err, io.EOF) {
		return nil, usagef("%s: the file is empty; the first row must name the columns (%s)", file, requiredColumns())
	}
	if err != nil {
		return nil, usagef("%s: %v", file, csvProblem(err))
	}
	index := map[string]int{}
	known := map[string]bool{}
	for _, c := range batchColumns {
		known[c.name] = true
	}
	for i, h := range header {
		h = strings.ToLower(strings.TrimSpace(h))
		header[i] = h
		if !known[h] {
			return nil, usagef("%s: column %q: unknown column%s (known: %s)", file, h, suggestColumn(h), allColumns())
		}
		if _, dup := index[h]; dup {
			return nil, usagef("%s: column %q: given twice", file, h)
		}
		index[h] = i
	}
	for _, c := range batchColumns {
		if _, ok := index[c.name]; c.required && !ok {
			return nil, usagef("%s: column %q: missing (required: %s)", file, c.name, requiredColumns())
		}
	}
	var lines []batchLine
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				return nil, usagef("%s: row %d: %v", file, pe.StartLine, pe.Err)
			}
			return nil, usagef("%s: %v", file, err)
		}
		row, _ := cr.FieldPos(0)
		if len(rec) != len(header) {
			return nil, usagef("%s: row %d: has %d fields, the header has %d", file, row, len(rec), len(header))
		}
		bl := batchLine{Row: row, values: map[string]float64{}, has: map[string]bool{}}
		for _, c := range batchColumns {
			i, ok := index[c.name]
			if !ok {
				continue
			}
			s := strings.TrimSpace(rec[i])
			if s == "" {
				if c.required {
					return nil, usagef("%s: row %d: %s: missing value", file, row, c.name)
				}
				continue
			}
			if c.check == nil {
				bl.Name = s
				continue
			}
			v, err := strconv.ParseFloat(s, 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, usagef("%s: row %d: %s: not a number: %q", file, row, c.name, s)
			}
			if p := c.check(v); p != "" {
				return nil, usagef("%s: row %d: %s: %s", file, row, c.name, p)
			}
			bl.values[c.name], bl.has[c.name] = v, true
		}
		for _, pair := range [][2]string{{"l_mh_per_km", "x_ohm_per_km"}, {"c_nf_per_km", "b_us_per_km"}} {
			if !bl.has[pair[0]] && !bl.has[pair[1]] {
				return nil, usagef("%s: row %d: %s: missing value (give %s or %s)", file, row, pair[0], pair[0], pair[1])
			}
		}
		if bl.has["source_mva"] != bl.has["x_over_r"] {
			missing := "x_over_r"
			if !bl.has["source_mva"] {
				missing = "source_mva"
			}
			return nil, usagef("%s: row %d: %s: required when %s is given", file, row, missing, other(missing))
		}
		if bl.has["us_kv"] && bl.values["us_kv"] < bl.values["voltage_kv"] {
			return nil, usagef("%s: row %d: us_kv: must be >= voltage_kv (%s), got %s", file, row,
				fmtNum(bl.values["voltage_kv"]), fmtNum(bl.values["us_kv"]))
		}
		if err := bl.validate(file); err != nil {
			return nil, err
		}
		lines = append(lines, bl)
	}
	if len(lines) == 0 {
		return nil, usagef("%s: no lines: the file has a header row but no data rows", file)
	}
	return lines, nil
}

func other(col string) string {
	if col == "x_over_r" {
		return "source_mva"
	}
	return "x_over_r"
}

// csvProblem shortens encoding/csv's messages (which carry their own line numbers).
func csvProblem(err error) string {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return pe.Err.Error()
	}
	return err.Error()
}

func requiredColumns() string {
	var s []string
	for _, c := range batchColumns {
		if c.required {
			s = append(s, c.name)
		}
	}
	return strings.Join(s, ", ")
}

func allColumns() string {
	s := make([]string, len(batchColumns))
	for i, c := range batchColumns {
		s[i] = c.name
	}
	return strings.Join(s, ", ")
}

func suggestColumn(h string) string {
	names := make([]string, len(batchColumns))
	for i, c := range batchColumns {
		names[i] = c.name
	}
	return study.DidYouMean(h, names)
}

// batchLineKeys are the [line] keys a row may give, each under the same name as its
// column: every per-length key of a study file's [line], zero sequence included.
var batchLineKeys = []string{"length_km", "r_ohm_per_km", "l_mh_per_km", "x_ohm_per_km", "c_nf_per_km",
	"b_us_per_km", "g_us_per_km", "r0_ohm_per_km", "l0_mh_per_km", "x0_ohm_per_km", "c0_nf_per_km",
	"b0_us_per_km", "g0_us_per_km"}

// studyTOML writes the row as a study file, so every line goes through the same
// loader, defaults and validation as a study given by hand. columns maps the study's
// key paths back to the row's columns, for messages.
func (bl batchLine) studyTOML() (toml []byte, columns map[string]string) {
	var b bytes.Buffer
	columns = map[string]string{}
	v := func(k string) string { return fmtNum(bl.values[k]) }
	fmt.Fprintf(&b, "title = %s\n", strconv.Quote(bl.Name))
	fmt.Fprintf(&b, "frequency_hz = %s\nvoltage_kv = %s\n", v("frequency_hz"), v("voltage_kv"))
	if bl.has["us_kv"] {
		fmt.Fprintf(&b, "us_kv = %s\n", v("us_kv"))
	}
	fmt.Fprintf(&b, "\n[line]\n")
	columns["line"] = "length_km"
	for _, k := range batchLineKeys {
		if bl.has[k] {
			fmt.Fprintf(&b, "%s = %s\n", k, v(k))
		}
		columns["line."+k] = k
	}
	if bl.has["source_mva"] {
		fmt.Fprintf(&b, "\n[source]\nshort_circuit_mva = %s\nx_over_r = %s\n", v("source_mva"), v("x_over_r"))
		if bl.has["x0_over_x1"] {
			fmt.Fprintf(&b, "x0_over_x1 = %s\n", v("x0_over_x1"))
		}
	} else if bl.has["x0_over_x1"] {
		// An ideal source has no impedance to scale; the loader still checks the value.
		fmt.Fprintf(&b, "\n[source]\nx0_over_x1 = %s\n", v("x0_over_x1"))
	}
	columns["source"], columns["source.short_circuit_mva"], columns["source.x_over_r"] = "source_mva", "source_mva", "x_over_r"
	columns["source.x0_over_x1"] = "x0_over_x1"
	n := 0
	for _, end := range []string{"sending", "receiving"} {
		k := "reactor_mvar_" + end
		if bl.values[k] > 0 {
			fmt.Fprintf(&b, "\n[[shunt]]\nat = %q\nconnection = \"line\"\nmvar = %s\n", end, v(k))
			columns[fmt.Sprintf("shunt[%d].mvar", n)] = k
			n++
		}
	}
	return b.Bytes(), columns
}

// study builds the row's study through the study loader; a problem the loader finds
// is reported against the row and its column: `LINES.csv: row N: column: problem`.
func (bl batchLine) study(file string) (*study.Study, error) {
	toml, columns := bl.studyTOML()
	name := fmt.Sprintf("%s: row %d", file, bl.Row)
	st, err := study.Parse(name, toml)
	if err == nil {
		return st, nil
	}
	var e *study.Error
	if errors.As(err, &e) && e.Key != "" {
		col, ok := columns[e.Key]
		if !ok {
			col = e.Key
		}
		msg := e.Msg
		for key, c := range columns { // the loader's key paths, in the row's words
			if strings.Contains(key, ".") {
				msg = strings.ReplaceAll(msg, key, c)
			}
		}
		return nil, usagef("%s: %s: %s", name, col, msg)
	}
	return nil, usagef("%v", err)
}

// validate checks the row through the study loader (so the inventory is refused
// before any line is screened).
func (bl batchLine) validate(file string) error {
	_, err := bl.study(file)
	return err
}
