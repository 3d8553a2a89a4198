package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// Tolerances of the batch checks.
const (
	// silTol: SIL is V²/sqrt(L/C) exactly for constants given directly; only the
	// formatting of the CSV (shortest exact float) stands between.
	silTol = 1e-9
	// riseTol: the open-end rise of a lossy line against the lossless 1/cos(βl); the
	// inventory's resistances (<= 0.06 ohm/km) move it by well under 1 %.
	riseTol = 0.01
)

// readCSV reads a CSV file into a header index and rows.
func readCSV(t *testing.T, path string) (map[string]int, [][]string) {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(bytes.NewReader(b)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	idx := map[string]int{}
	for i, h := range recs[0] {
		idx[h] = i
	}
	return idx, recs[1:]
}

func num(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("not a number: %q", s)
	}
	return v
}

func TestBatchExample(t *testing.T) {
	t.Parallel()
	out := filepath.Join(t.TempDir(), "screen")
	var stdout, stderr bytes.Buffer
	if code := run([]string{"batch", "--out", out, filepath.Join("..", "..", "testdata", "batch_example.csv")}, &stdout, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	for _, f := range []string{"batch.csv", "batch.html", reportMarker} {
		if _, err := os.Stat(filepath.Join(out, f)); err != nil {
			t.Errorf("missing %s", f)
		}
	}
	idx, rows := readCSV(t, filepath.Join(out, "batch.csv"))
	if len(rows) != 6 {
		t.Fatalf("%d rows, want 6", len(rows))
	}
	byName := map[string][]string{}
	prev := math.Inf(1)
	for i, r := range rows {
		byName[r[idx["name"]]] = r
		if r[idx["rank"]] != strconv.Itoa(i+1) {
			t.Errorf("row %d has rank %s", i+1, r[idx["rank"]])
		}
		sev := num(t, r[idx["severity"]])
		if sev > prev {
			t.Errorf("not worst first: severity %g after %g", sev, prev)
		}
		prev = sev
		if flagged := r[idx["flags"]] != ""; flagged != (sev > 1) {
			t.Errorf("%s: severity %g but flags %q", r[idx["name"]], sev, r[idx["flags"]])
		}
	}
	// SIL = V²/sqrt(L/C) (surge-impedance loading; any power-systems text).
	q1 := byName["Harrowfield - Quenby 1"]
	q2 := byName["Harrowfield - Quenby 2"]
	wantSIL := 400.0 * 400 / math.Sqrt(0.95e-3/12e-9)
	if got := num(t, q1[idx["sil_mw"]]); math.Abs(got-wantSIL) > silTol*wantSIL {
		t.Errorf("SIL %g MW, want %g", got, wantSIL)
	}
	// Open-end rise of the line without a reactor ≈ 1/cos(βl), β = ω sqrt(LC)
	// (Ferranti effect of a lossless line; any power-systems text).
	bl := 2 * math.Pi * 50 * math.Sqrt(0.95e-3*12e-9) * 320
	if got, want := num(t, q2[idx["open_end_rise_pu"]]), 1/math.Cos(bl); math.Abs(got-want) > riseTol*want {
		t.Errorf("open-end rise %g, want about %g", got, want)
	}
	// The 150 Mvar reactor (at 400 kV: Yr = -j·150e6/400e3² S, lossless; with B = j·Zc·sin βl,
	// B·Yr = +Zc·sin βl·150e6/400e3²) lowers the
	// open-end voltage of the same line to 1/|cos βl + Zc·sin βl·150e6/400e3²| (lossless
	// line with a shunt reactor; any power-systems text).
	zc := math.Sqrt(0.95e-3 / 12e-9)
	if got, want := num(t, q1[idx["open_end_rise_pu"]]), 1/math.Abs(math.Cos(bl)+zc*math.Sin(bl)*150e6/(400e3*400e3)); math.Abs(got-want) > riseTol*want {
		t.Errorf("open-end rise with the reactor %g, want about %g", got, want)
	}
	// The same line from a weaker source (4000 against 15000 MVA: more inductance
	// behind the line's capacitance) and without the receiving-end reactor (whose
	// inductance shortens the effective capacitance) resonates lower: both changes
	// move the first resonance down.
	if q2[idx["first_resonance_hz"]] == "" || q1[idx["first_resonance_hz"]] == "" {
		t.Fatalf("no first resonance: %q, %q", q1[idx["first_resonance_hz"]], q2[idx["first_resonance_hz"]])
	}
	if num(t, q2[idx["first_resonance_hz"]]) >= num(t, q1[idx["first_resonance_hz"]]) {
		t.Errorf("weak source without reactor resonates at %s Hz, not below the strong source with reactor at %s Hz",
			q2[idx["first_resonance_hz"]], q1[idx["first_resonance_hz"]])
	}
	if !strings.Contains(stdout.String(), "6 lines screened") {
		t.Errorf("stdout: %s", stdout.String())
	}
}

// inventory writes a generated inventory of n lines (deterministic).
func inventory(t testing.TB, n int) string {
	t.Helper()
	rng := rand.New(rand.NewPCG(7, 11))
	var b strings.Builder
	b.WriteString("name,voltage_kv,frequency_hz,length_km,r_ohm_per_km,l_mh_per_km,c_nf_per_km,source_mva,x_over_r,reactor_mvar_receiving\n")
	kvs := []float64{132, 220, 275, 400, 500, 765}
	for i := range n {
		kv := kvs[rng.IntN(len(kvs))]
		reactor := ""
		if rng.IntN(3) == 0 {
			reactor = fmt.Sprintf("%.0f", 50+rng.Float64()*200)
		}
		// C from a wave velocity of 0.93 to 0.99 c (common practice, no source), so that
		// no row is faster than light: C = 1/(v² L), L in H/km, C in nF/km.
		f, length, r := []int{50, 60}[rng.IntN(2)], 20+rng.Float64()*480, 0.01+rng.Float64()*0.06
		l := 0.8 + rng.Float64()*0.5
		v := (0.93 + rng.Float64()*0.06) * 299792.458 // km/s
		c := 1e9 / (v * v * l * 1e-3)
		fmt.Fprintf(&b, "line %d,%g,%d,%.1f,%.4f,%.3f,%.2f,%.0f,%.1f,%s\n", i+1, kv, f,
			length, r, l, c, 2000+rng.Float64()*38000, 5+rng.Float64()*20, reactor)
	}
	path := filepath.Join(t.TempDir(), "lines.csv")
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// TestBatchCoresAgree: the same inventory on one and on two workers gives the same
// table, every row present once.
func TestBatchCoresAgree(t *testing.T) {
	t.Parallel()
	const n = 24
	lines := inventory(t, n)
	var tables [2][]byte
	for i, jobs := range []string{"1", "2"} {
		out := filepath.Join(t.TempDir(), "out")
		var stdout, stderr bytes.Buffer
		if code := run([]string{"batch", lines, "--out", out, "--jobs", jobs}, &stdout, &stderr); code != 0 {
			t.Fatalf("jobs %s: exit %d: %s", jobs, code, stderr.String())
		}
		b, err := os.ReadFile(filepath.Join(out, "batch.csv"))
		if err != nil {
			t.Fatal(err)
		}
		tables[i] = b
	}
	if !bytes.Equal(tables[0], tables[1]) {
		t.Error("one and two workers give different tables")
	}
	idx, rows := readCSV(t, writeTemp(t, tables[0]))
	seen := map[string]bool{}
	for _, r := range rows {
		seen[r[idx["row"]]] = true
	}
	if len(rows) != n || len(seen) != n {
		t.Errorf("%d rows, %d distinct, want %d", len(rows), len(seen), n)
	}
}

func writeTemp(t *testing.T, b []byte) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), "t.csv")
	if err := os.WriteFile(p, b, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestBatchBadInput: a bad row is exit 2 with the row named, and no folder is left.
func TestBatchBadInput(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	in := filepath.Join(dir, "LINES.csv")
	data := "name,voltage_kv,frequency_hz,length_km,r_ohm_per_km,l_mh_per_km,c_nf_per_km\nA,400,50,-3,0.03,0.9,12\n"
	if err := os.WriteFile(in, []byte(data), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	var stdout, stderr bytes.Buffer
	code := run([]string{"batch", in, "--out", out}, &stdout, &stderr)
	if code != 2 {
		t.Fatalf("exit %d, want 2", code)
	}
	if want := in + ": row 2: length_km: must be > 0, got -3"; !strings.Contains(stderr.String(), want) {
		t.Errorf("stderr %q lacks %q", stderr.String(), want)
	}
	for _, n := range listDir(t, dir) {
		if n != "LINES.csv" {
			t.Errorf("left behind: %s", n)
		}
	}
}

// BenchmarkBatch1000 screens a generated inventory of 1,000 lines on every core
// (goal: under a minute on 2 cores).
func BenchmarkBatch1000(b *testing.B) {
	path := inventory(b, 1000)
	f, err := os.Open(path)
	if err != nil {
		b.Fatal(err)
	}
	lines, err := parseBatch(path, f)
	f.Close()
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for b.Loop() {
		if _, err := screenInventory(context.Background(), path, lines, 0, nil); err != nil {
			b.Fatal(err)
		}
	}
}
