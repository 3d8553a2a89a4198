package main

import (
	"context"
	"math"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/propagation"
)

func TestParseBatchErrors(t *testing.T) {
	t.Parallel()
	const head = "name,voltage_kv,frequency_hz,length_km,r_ohm_per_km,l_mh_per_km,c_nf_per_km"
	tests := []struct {
		name, csv, want string
	}{
		{"empty file", "", "LINES.csv: the file is empty"},
		{"unknown column", head + ",lenght_km\n", `LINES.csv: column "lenght_km": unknown column (did you mean "length_km"?)`},
		{"missing column", "name,voltage_kv\n", `LINES.csv: column "frequency_hz": missing`},
		{"duplicate column", head + ",name\n", `LINES.csv: column "name": given twice`},
		{"no rows", head + "\n", "LINES.csv: no lines"},
		{"negative length", head + "\nA,400,50,-3,0.03,0.93,12.4\n", "LINES.csv: row 2: length_km: must be > 0, got -3"},
		{"not a number", head + "\nA,400,50,100,x,0.93,12.4\n", `LINES.csv: row 2: r_ohm_per_km: not a number: "x"`},
		{"NaN", head + "\nA,400,50,100,NaN,0.93,12.4\n", `LINES.csv: row 2: r_ohm_per_km: not a number: "NaN"`},
		{"missing value", head + "\nA,400,50,100,0.03,,12\n", "LINES.csv: row 2: l_mh_per_km: missing value"},
		{"short row", head + "\nA,400,50\n", "LINES.csv: row 2: has 3 fields, the header has 7"},
		{"third row", head + "\nA,400,50,100,0.03,0.93,12.4\nB,400,0,100,0.03,0.93,12.4\n", "LINES.csv: row 3: frequency_hz: must be > 0, got 0"},
		{"source without X/R", head + ",source_mva\nA,400,50,100,0.03,0.93,12.4,5000\n", "LINES.csv: row 2: x_over_r: required when source_mva is given"},
		{"us below nominal", head + ",us_kv\nA,400,50,100,0.03,0.93,12.4,300\n", "LINES.csv: row 2: us_kv: must be >= voltage_kv (400), got 300"},
		{"negative reactor", head + ",reactor_mvar_receiving\nA,400,50,100,0.03,0.93,12.4,-5\n", "LINES.csv: row 2: reactor_mvar_receiving: must be >= 0, got -5"},
		{"bad quote", head + "\n\"A,400,50,100,0.03,0.93,12.4\n", "LINES.csv: row 2:"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			_, err := parseBatch("LINES.csv", strings.NewReader(tc.csv))
			if err == nil {
				t.Fatalf("accepted %q", tc.csv)
			}
			if !strings.HasPrefix(err.Error(), tc.want) {
				t.Errorf("error %q, want it to start with %q", err, tc.want)
			}
			if _, ok := err.(*usageError); !ok {
				t.Errorf("error %T is not an input error (exit 2)", err)
			}
		})
	}
}

func TestParseBatchRows(t *testing.T) {
	t.Parallel()
	in := "\ufeff# inventory\nName, Voltage_kV,frequency_hz,length_km,r_ohm_per_km,l_mh_per_km,c_nf_per_km,source_mva,x_over_r,reactor_mvar_receiving\n" +
		"\"North, 1\",400,50,320,0.025,0.95,12,15000,12,150\n" +
		"South,220,60,80,0.05,1.2,9.5,,,\n"
	lines, err := parseBatch("LINES.csv", strings.NewReader(in))
	if err != nil {
		t.Fatal(err)
	}
	if len(lines) != 2 {
		t.Fatalf("%d lines, want 2", len(lines))
	}
	if lines[0].Name != "North, 1" || lines[0].Row != 3 || lines[1].Row != 4 {
		t.Errorf("names/rows = %q/%d, %q/%d", lines[0].Name, lines[0].Row, lines[1].Name, lines[1].Row)
	}
	toml0, _ := lines[0].studyTOML()
	toml := string(toml0)
	for _, want := range []string{`title = "North, 1"`, "voltage_kv = 400", "length_km = 320",
		"short_circuit_mva = 15000", "x_over_r = 12", `at = "receiving"`, "mvar = 150"} {
		if !strings.Contains(toml, want) {
			t.Errorf("study of row 3 lacks %q:\n%s", want, toml)
		}
	}
	if s, _ := lines[1].studyTOML(); strings.Contains(string(s), "[source]") || strings.Contains(string(s), "[[shunt]]") {
		t.Errorf("row 4 has no source or reactor, got:\n%s", s)
	}
}

// TestParallelEach: every index is worked once whatever the worker count, and the
// progress ends at the total.
func TestParallelEach(t *testing.T) {
	t.Parallel()
	for _, workers := range []int{0, 1, 2, 7} {
		const n = 100
		var hits [n]atomic.Int32
		var last atomic.Int64
		parallelEach(n, workers, func(done int) { last.Store(int64(done)) }, func(i int) {
			hits[i].Add(1)
			time.Sleep(50 * time.Microsecond)
		})
		for i := range hits {
			if h := hits[i].Load(); h != 1 {
				t.Fatalf("workers %d: index %d worked %d times", workers, i, h)
			}
		}
		if last.Load() != n {
			t.Errorf("workers %d: last progress %d, want %d", workers, last.Load(), n)
		}
	}
}

// The batch draws its lines on the one status line, counted to the total.
func TestBatchProgressBar(t *testing.T) {
	t.Parallel()
	var b strings.Builder
	s := &statusLine{w: &b}
	s.Stage("batch")
	s.Count(1, 4, "lines")
	s.Count(4, 4, "lines")
	s.Clear()
	got := b.String()
	if !strings.Contains(got, "batch, lines") || !strings.Contains(got, "(4/4)") {
		t.Errorf("progress bar drew %q", got)
	}
}

// TestBatchLineColumns: every [line] key of a study file is a column, under its own
// name, read through the study loader: x and b forms give the constants a study file
// with the same keys gives, zero-sequence columns give the zero-sequence network, and
// the loader's rules (one form of each, complete zero-sequence data) are reported
// against the row and column.
func TestBatchLineColumns(t *testing.T) {
	t.Parallel()
	const head = "name,voltage_kv,frequency_hz,length_km,r_ohm_per_km,l_mh_per_km,x_ohm_per_km,c_nf_per_km,b_us_per_km," +
		"g_us_per_km,r0_ohm_per_km,l0_mh_per_km,x0_ohm_per_km,c0_nf_per_km,b0_us_per_km,g0_us_per_km,source_mva,x_over_r,x0_over_x1"
	// the same line as a study file, keys given by hand
	const byHand = "frequency_hz = 50\nvoltage_kv = 400\n[line]\nlength_km = 420\nr_ohm_per_km = 0.028\nx_ohm_per_km = 0.292\n" +
		"b_us_per_km = 3.9\nr0_ohm_per_km = 0.25\nx0_ohm_per_km = 0.94\nb0_us_per_km = 2.36\ng0_us_per_km = 0.01\n" +
		"[source]\nshort_circuit_mva = 12000\nx_over_r = 12\nx0_over_x1 = 1.3\n"
	want, err := study.Parse("hand.toml", []byte(byHand))
	if err != nil {
		t.Fatal(err)
	}
	rows := "A,400,50,420,0.028,,0.292,,3.9,,0.25,,0.94,,2.36,0.01,12000,12,1.3\n" + // x, b forms, zero sequence
		"B,400,50,420,0.028,0.93,,12.4,,,,,,,,,12000,12,\n" // l, c forms, no zero sequence
	lines, err := parseBatch("LINES.csv", strings.NewReader(head+"\n"+rows))
	if err != nil {
		t.Fatal(err)
	}
	a, err := lines[0].study("LINES.csv")
	if err != nil {
		t.Fatal(err)
	}
	s := complex(0, 2*math.Pi*50*7)
	for _, c := range []struct {
		name string
		got  propagation.Cascade
		want propagation.Cascade
	}{{"positive", a.Line, want.Line}, {"zero", a.Zero, want.Zero}} {
		if len(c.got) != 1 || len(c.want) != 1 {
			t.Fatalf("%s: %d sections, the study file %d", c.name, len(c.got), len(c.want))
		}
		zg, yg := c.got[0].At(s)
		zw, yw := c.want[0].At(s)
		if zg != zw || yg != yw {
			t.Errorf("%s sequence at 350 Hz: z %v y %v, the study file %v %v", c.name, zg, yg, zw, yw)
		}
	}
	if a.ZeroNetwork == nil || a.ZeroNetwork.Source != want.ZeroNetwork.Source {
		t.Errorf("zero-sequence network %+v, the study file's %+v", a.ZeroNetwork, want.ZeroNetwork)
	}
	if b, err := lines[1].study("LINES.csv"); err != nil || b.ZeroNetwork != nil {
		t.Errorf("row B: %v, zero-sequence network %v; want none", err, b.ZeroNetwork)
	}
	for _, tc := range []struct {
		name, row, want string
	}{
		{"both l and x", "A,400,50,420,0.028,0.93,0.292,12.4,,,,,,,,,,,", "LINES.csv: row 2: x_ohm_per_km: l_mh_per_km and x_ohm_per_km are alternatives"},
		{"both c and b", "A,400,50,420,0.028,0.93,,12.4,3.9,,,,,,,,,,", "LINES.csv: row 2: b_us_per_km: c_nf_per_km and b_us_per_km are alternatives"},
		{"neither c nor b", "A,400,50,420,0.028,0.93,,,,,,,,,,,,,", "LINES.csv: row 2: c_nf_per_km: missing value (give c_nf_per_km or b_us_per_km)"},
		{"zero sequence incomplete", "A,400,50,420,0.028,0.93,,12.4,,,0.25,3,,,,,,,", "LINES.csv: row 2: c0_nf_per_km: missing"},
		{"negative x0", "A,400,50,420,0.028,0.93,,12.4,,,0.25,,-1,7.5,,,,,", "LINES.csv: row 2: x0_ohm_per_km: must be > 0, got -1"},
		{"x0_over_x1 out of range", "A,400,50,420,0.028,0.93,,12.4,,,,,,,,,12000,12,5000", "LINES.csv: row 2: x0_over_x1: must be between 0.01 and 100, got 5000"},
	} {
		_, err := parseBatch("LINES.csv", strings.NewReader(head+"\n"+tc.row+"\n"))
		if err == nil || !strings.HasPrefix(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want it to start with %q", tc.name, err, tc.want)
		}
		if _, ok := err.(*usageError); err != nil && !ok {
			t.Errorf("%s: error %T is not an input error (exit 2)", tc.name, err)
		}
	}
}

// TestBatchTriplenSequence: a line whose first resonance sits on the 3rd harmonic is
// flagged at h3 "positive-sequence only" without zero-sequence columns, and screened on
// its zero-sequence network (marked so) with them.
func TestBatchTriplenSequence(t *testing.T) {
	t.Parallel()
	const head = "name,voltage_kv,frequency_hz,length_km,r_ohm_per_km,l_mh_per_km,c_nf_per_km,r0_ohm_per_km,l0_mh_per_km,c0_nf_per_km,source_mva,x_over_r"
	lines, err := parseBatch("LINES.csv", strings.NewReader(head+"\n"+
		"positive only,400,50,420,0.028,0.93,12.4,,,,12000,12\n"+
		"with zero,400,50,420,0.028,0.93,12.4,0.25,3.0,7.5,12000,12\n"))
	if err != nil {
		t.Fatal(err)
	}
	flag := func(r batchResult, prefix string) string {
		for _, f := range r.Flags {
			if strings.HasPrefix(f, prefix) {
				return f
			}
		}
		return ""
	}
	pos, err := screenLine(context.Background(), "LINES.csv", lines[0])
	if err != nil {
		t.Fatal(err)
	}
	if f := flag(pos, "h3 "); !strings.HasPrefix(f, "h3 (positive-sequence only) gain") {
		t.Errorf("without zero-sequence data: h3 flag %q (flags %q)", f, pos.Flags)
	}
	if f := flag(pos, "h5 "); f != "" && strings.Contains(f, "sequence") {
		t.Errorf("h5 is not triplen, yet marked: %q", f)
	}
	zero, err := screenLine(context.Background(), "LINES.csv", lines[1])
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range zero.Flags {
		if strings.Contains(f, "positive-sequence only") {
			t.Errorf("with zero-sequence data, flag %q", f)
		}
	}
	tb, err := batchTable([]batchResult{pos, zero})
	if err != nil {
		t.Fatal(err)
	}
	csv := string(tb.CSV())
	if !strings.Contains(csv, "worst_watched_sequence") {
		t.Errorf("no worst_watched_sequence column:\n%s", csv)
	}
	if pos.WorstOrder%3 == 0 && pos.WorstSequence != "positive-sequence only" {
		t.Errorf("worst harmonic h%d screened on %q, want positive-sequence only", pos.WorstOrder, pos.WorstSequence)
	}
}
