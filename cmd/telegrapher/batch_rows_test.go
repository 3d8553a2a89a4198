package main

import (
	"strings"
	"sync/atomic"
	"testing"
	"time"
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
		{"negative length", head + "\nA,400,50,-3,0.03,0.9,12\n", "LINES.csv: row 2: length_km: must be > 0, got -3"},
		{"not a number", head + "\nA,400,50,100,x,0.9,12\n", `LINES.csv: row 2: r_ohm_per_km: not a number: "x"`},
		{"NaN", head + "\nA,400,50,100,NaN,0.9,12\n", `LINES.csv: row 2: r_ohm_per_km: not a number: "NaN"`},
		{"missing value", head + "\nA,400,50,100,0.03,,12\n", "LINES.csv: row 2: l_mh_per_km: missing value"},
		{"short row", head + "\nA,400,50\n", "LINES.csv: row 2: has 3 fields, the header has 7"},
		{"third row", head + "\nA,400,50,100,0.03,0.9,12\nB,400,0,100,0.03,0.9,12\n", "LINES.csv: row 3: frequency_hz: must be > 0, got 0"},
		{"source without X/R", head + ",source_mva\nA,400,50,100,0.03,0.9,12,5000\n", "LINES.csv: row 2: x_over_r: required when source_mva is given"},
		{"us below nominal", head + ",us_kv\nA,400,50,100,0.03,0.9,12,300\n", "LINES.csv: row 2: us_kv: must be >= voltage_kv (400), got 300"},
		{"negative reactor", head + ",reactor_mvar_receiving\nA,400,50,100,0.03,0.9,12,-5\n", "LINES.csv: row 2: reactor_mvar_receiving: must be >= 0, got -5"},
		{"bad quote", head + "\n\"A,400,50,100,0.03,0.9,12\n", "LINES.csv: row 2:"},
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
	toml := string(lines[0].studyTOML())
	for _, want := range []string{`title = "North, 1"`, "voltage_kv = 400", "length_km = 320",
		"short_circuit_mva = 15000", "x_over_r = 12", `at = "receiving"`, "mvar = 150"} {
		if !strings.Contains(toml, want) {
			t.Errorf("study of row 3 lacks %q:\n%s", want, toml)
		}
	}
	if s := string(lines[1].studyTOML()); strings.Contains(s, "[source]") || strings.Contains(s, "[[shunt]]") {
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
		parallelEach(n, workers, time.Millisecond, func(done int) { last.Store(int64(done)) }, func(i int) {
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

func TestBatchProgressBar(t *testing.T) {
	t.Parallel()
	var b strings.Builder
	p := batchProgressBar(&b, 4, "lines")
	p(1)
	p(4)
	s := b.String()
	if !strings.Contains(s, "1/4 lines") || !strings.Contains(s, "4/4 lines in") || !strings.HasSuffix(s, "\n") {
		t.Errorf("progress bar drew %q", s)
	}
}
