package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/report"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/propagation"
)

// sweepStudy is a 400 kV twin-bundle line from its geometry, built without the loader.
func sweepStudy(t *testing.T) *study.Study {
	t.Helper()
	c, err := propagation.NewConductor(0.0318, 0.009, 0.058e-3)
	if err != nil {
		t.Fatal(err)
	}
	e, _ := propagation.NewConductor(0.014, 0, 0.35e-3)
	var ph []propagation.Wire
	for i := 0; i < 3; i++ {
		ph = append(ph, propagation.Wire{X: float64(i-1) * 12, Height: 27, Sag: 12, Conductor: c, Bundle: 2, Spacing: 0.4})
	}
	ew := []propagation.Wire{{X: -7, Height: 36, Sag: 9, Conductor: e}, {X: 7, Height: 36, Sag: 9, Conductor: e}}
	g, err := propagation.NewGeometry(ph, ew, 100, true)
	if err != nil {
		t.Fatal(err)
	}
	return &study.Study{
		File: "tower.toml", Title: "Test tower", Frequency: 50, Voltage: 400e3,
		Line: propagation.Cascade{{Length: 200e3, Constants: g.Positive()}},
		Zero: propagation.Cascade{{Length: 200e3, Constants: g.Zero()}},
	}
}

func TestSweepPhysics(t *testing.T) {
	t.Parallel()
	// Common practice, no source: with frequency the resistance rises (skin effect,
	// earth return), the inductance falls, the capacitance of a geometry is constant,
	// and the positive-sequence velocity approaches but stays below c.
	st := sweepStudy(t)
	res, err := computeSweep(st, sweepFrequencies(1, 1e6, 31))
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Sections) != 1 || len(res.Sections[0].Sequences) != 2 || !res.Sections[0].Geometry {
		t.Fatalf("unexpected shape %+v", res.Sections)
	}
	for _, sq := range res.Sections[0].Sequences {
		pts := sq.Points
		for k := 1; k < len(pts); k++ {
			if pts[k].R < pts[k-1].R*(1-1e-9) || pts[k].L > pts[k-1].L*(1+1e-9) {
				t.Errorf("%s: r or l not monotonic at %g Hz", sq.Name, res.FreqHz[k])
			}
			if math.Abs(pts[k].C/pts[0].C-1) > 1e-12 {
				t.Errorf("%s: c varies with frequency", sq.Name)
			}
			if pts[k].Velocity >= propagation.SpeedOfLight/1e3 {
				t.Errorf("%s: velocity %g km/s above c", sq.Name, pts[k].Velocity)
			}
		}
	}
	pos := res.Sections[0].Sequences[0].Points
	if v := pos[len(pos)-1].Velocity / (propagation.SpeedOfLight / 1e3); v < 0.97 {
		t.Errorf("positive-sequence velocity at 1 MHz %.3g c, want near c", v)
	}
	// At 1 Hz r1 is close to Rdc/2 = 0.029 ohm/km (skin effect still negligible).
	if math.Abs(pos[0].R/0.029-1) > 1e-3 {
		t.Errorf("r1(1 Hz) = %g ohm/km, want about 0.029", pos[0].R)
	}
}

func TestSweepOutputs(t *testing.T) {
	t.Parallel()
	st := sweepStudy(t)
	dir := t.TempDir()
	var out bytes.Buffer
	for _, name := range []string{"sweep.png", "sweep.svg"} {
		out.Reset()
		path := filepath.Join(dir, name)
		res, err := runSweep(st, &out, path, false)
		if err != nil {
			t.Fatal(err)
		}
		if len(res.FreqHz) != sweepTablePoints {
			t.Errorf("table has %d frequencies", len(res.FreqHz))
		}
		b, err := os.ReadFile(path)
		if err != nil || len(b) < 1000 {
			t.Fatalf("%s: %d bytes, %v", name, len(b), err)
		}
		if !strings.Contains(out.String(), "zero sequence") || strings.Count(out.String(), "\n") < 2*sweepTablePoints {
			t.Errorf("table output:\n%s", out.String())
		}
	}
	if _, err := runSweep(st, &out, filepath.Join(dir, "sweep.jpg"), false); err == nil {
		t.Error("a .jpg plot was accepted")
	}
	if keep := os.Getenv("TELEGRAPHER_KEEP_SWEEP_PLOT"); keep != "" {
		fine, _ := computeSweep(st, sweepFrequencies(1, 1e6, sweepPlotPoints))
		b, err := report.RenderSweep(sweepPlotData(st, fine), "png")
		if err != nil {
			t.Fatal(err)
		}
		if err := report.WriteFileAtomic(keep, b); err != nil {
			t.Fatal(err)
		}
	}
}

func TestLineSequence(t *testing.T) {
	t.Parallel()
	st := sweepStudy(t)
	seq := lineSequence(st.Line[0], 50)
	if seq == nil {
		t.Fatal("no sequence for a geometry line")
	}
	// The same numbers as the library (identity through the CLI layer).
	g := st.Line[0].Constants.(propagation.SequenceConstants).Geometry
	w := 2 * math.Pi * 50
	z1, y1, z0, y0 := g.Sequence(complex(0, w))
	if math.Abs(seq.Positive.R-real(z1)*1e3) > 1e-15 || math.Abs(seq.Zero.L-imag(z0)/w*1e6) > 1e-12 ||
		math.Abs(seq.Positive.C-imag(y1)/w*1e12) > 1e-9 || math.Abs(seq.Zero.C-imag(y0)/w*1e12) > 1e-9 {
		t.Errorf("sequence %+v disagrees with the geometry", seq)
	}
	if lineSequence(propagation.Line{Length: 1, Constants: propagation.RLGC{R: 1, L: 1e-6, C: 1e-11}}, 50) != nil {
		t.Error("a sequence for directly given constants")
	}
}

func TestConstantsGeometryCLI(t *testing.T) {
	t.Parallel()
	// End to end on the demo tower: `constants --json` carries the sequence constants
	// (contract keys) and `--sweep --plot` writes the plot.
	const tower = "../../testdata/geometry_tower_400kv.toml"
	var out, errb bytes.Buffer
	if st := run([]string{"constants", tower, "--json"}, &out, &errb); st != 0 {
		t.Fatalf("status %d: %s", st, errb.String())
	}
	var doc map[string]any
	if err := json.Unmarshal(out.Bytes(), &doc); err != nil {
		t.Fatal(err)
	}
	seq, ok := doc["sequence"].(map[string]any)
	if !ok {
		t.Fatalf("no sequence in %s", out.String())
	}
	for _, name := range []string{"positive", "zero"} {
		s, ok := seq[name].(map[string]any)
		if !ok {
			t.Fatalf("no sequence.%s", name)
		}
		for _, k := range []string{"r_ohm_per_km", "l_mh_per_km", "c_nf_per_km", "g_us_per_km", "zc_ohm", "gamma_per_km"} {
			if _, ok := s[k]; !ok {
				t.Errorf("sequence.%s.%s missing", name, k)
			}
		}
	}
	plotPath := filepath.Join(t.TempDir(), "sweep.png")
	out.Reset()
	if st := run([]string{"constants", "--sweep", "--plot", plotPath, tower}, &out, &errb); st != 0 {
		t.Fatalf("status %d: %s", st, errb.String())
	}
	if fi, err := os.Stat(plotPath); err != nil || fi.Size() < 1000 {
		t.Errorf("plot not written: %v", err)
	}
	if !strings.Contains(out.String(), "zero sequence") {
		t.Errorf("no sweep table in the output")
	}
}
