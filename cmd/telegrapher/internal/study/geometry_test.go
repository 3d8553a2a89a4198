package study

import (
	"math"
	"os"
	"strings"
	"testing"

	"github.com/BurntSushi/toml"
	"github.com/telegrapher/telegrapher/propagation"
)

// decodeGeometry decodes a TOML text and runs the geometry tables through the parser.
func decodeGeometry(t *testing.T, text string) error {
	t.Helper()
	var doc map[string]any
	if _, err := toml.Decode(text, &doc); err != nil {
		t.Fatalf("toml: %v", err)
	}
	condTbl, _ := doc["conductors"].(map[string]any)
	conds, _, err := ParseConductors("s.toml", condTbl)
	if err != nil {
		return err
	}
	line, _ := doc["line"].(map[string]any)
	geo, _ := line["geometry"].(map[string]any)
	_, _, err = ParseGeometry("s.toml", "line.geometry", geo, line, conds, 50)
	return err
}

func TestTowerStudyGeometry(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile("../../../../testdata/geometry_tower_400kv.toml")
	if err != nil {
		t.Fatal(err)
	}
	var doc map[string]any
	if _, err := toml.Decode(string(b), &doc); err != nil {
		t.Fatal(err)
	}
	conds, ce, err := ParseConductors("tower.toml", doc["conductors"].(map[string]any))
	if err != nil || len(conds) != 2 || len(ce) != 2 {
		t.Fatalf("conductors: %v %v", conds, err)
	}
	line := doc["line"].(map[string]any)
	g, entries, err := ParseGeometry("tower.toml", "line.geometry", line["geometry"].(map[string]any), line, conds, 50)
	if err != nil {
		t.Fatal(err)
	}
	if len(entries) < 7 {
		t.Errorf("only %d entries understood", len(entries))
	}
	// Common practice, no source: a 400 kV twin-bundle line has l1 about 0.9-1.1 mH/km,
	// c1 about 10-13 nF/km, a surge impedance of 280-330 ohm, and r0/r1 well above 3.
	w := 2 * math.Pi * 50
	z1, y1, z0, _ := g.Sequence(complex(0, w))
	l1, c1 := imag(z1)/w*1e6, imag(y1)/w*1e12
	zc := math.Sqrt(l1 * 1e-6 / (c1 * 1e-12))
	if l1 < 0.9 || l1 > 1.1 || c1 < 10 || c1 > 13 || zc < 280 || zc > 330 || real(z0)/real(z1) < 3 {
		t.Errorf("implausible 400 kV constants: l1 %g mH/km, c1 %g nF/km, Zc %g ohm, r0/r1 %g", l1, c1, zc, real(z0)/real(z1))
	}
	t.Logf("tower: z1 %v ohm/km, l1 %.4f mH/km, c1 %.4f nF/km, Zc %.1f ohm, z0 %v ohm/km", z1*1e3, l1, c1, zc, z0*1e3)
}

const goodConductors = `
[conductors.main]
outer_diameter_mm = 30
core_diameter_mm = 8
dc_ohm_per_km = 0.06
`

func TestGeometryValidation(t *testing.T) {
	t.Parallel()
	phases := `phases = [
  { x_m = -10, height_m = 20, conductor = "main" },
  { x_m = 0, height_m = 20, conductor = "main" },
  { x_m = 10, height_m = 20, conductor = "main" },
]`
	geo := func(body string) string {
		return goodConductors + "\n[line]\nlength_km = 100\n[line.geometry]\nearth_resistivity_ohm_m = 100\n" + body
	}
	cases := []struct {
		name, text, want string
	}{
		{"valid", geo(phases), ""},
		{"unknown geometry key", geo(phases + "\nearth_resistivity = 3"), `s.toml: line.geometry.earth_resistivity: unknown key (did you mean "earth_resistivity_ohm_m"?)`},
		{"unknown conductor key", strings.Replace(geo(phases), "dc_ohm_per_km", "dc_ohms_per_km", 1), `s.toml: conductors.main.dc_ohms_per_km: unknown key (did you mean "dc_ohm_per_km"?)`},
		{"unknown wire key", strings.Replace(geo(phases), "height_m = 20, conductor", "heigth_m = 20, conductor", 1), `s.toml: line.geometry.phases[0].heigth_m: unknown key (did you mean "height_m"?)`},
		{"missing conductor table", strings.Replace(geo(phases), `{ x_m = 0, height_m = 20, conductor = "main" }`, `{ x_m = 0, height_m = 20, conductor = "mian" }`, 1), `s.toml: line.geometry.phases[1].conductor: no [conductors.mian] table (did you mean "main"?)`},
		{"two phases", geo(`phases = [{ x_m = 0, height_m = 20, conductor = "main" }, { x_m = 5, height_m = 20, conductor = "main" }]`), "s.toml: line.geometry.phases: a single circuit needs exactly 3 phases, got 2"},
		{"negative height", strings.Replace(geo(phases), "x_m = 10, height_m = 20", "x_m = 10, height_m = -3", 1), "s.toml: line.geometry.phases[2].height_m: must be > 0"},
		{"sag too large", strings.Replace(geo(phases), "x_m = 10, height_m = 20,", "x_m = 10, height_m = 20, sag_m = 25,", 1), "s.toml: line.geometry.phases[2].sag_m: must be >= 0 and less than height_m"},
		{"bundle without spacing", strings.Replace(geo(phases), "x_m = 10, height_m = 20,", "x_m = 10, height_m = 20, bundle = 2,", 1), "s.toml: line.geometry.phases[2].bundle_spacing_mm: a bundle of 2 needs a spacing"},
		{"fractional bundle", strings.Replace(geo(phases), "x_m = 10, height_m = 20,", "x_m = 10, height_m = 20, bundle = 1.5,", 1), "s.toml: line.geometry.phases[2].bundle: must be a whole number"},
		{"spacing without bundle", strings.Replace(geo(phases), "x_m = 10, height_m = 20,", "x_m = 10, height_m = 20, bundle_spacing_mm = 400,", 1), "s.toml: line.geometry.phases[2].bundle_spacing_mm: only with bundle > 1"},
		{"overlapping phases", strings.Replace(geo(phases), "x_m = 10,", "x_m = 0.01,", 1), "s.toml: line.geometry: phase 1 and phase 2 overlap"},
		{"earth resistivity", strings.Replace(geo(phases), "earth_resistivity_ohm_m = 100", "earth_resistivity_ohm_m = 0", 1), "s.toml: line.geometry.earth_resistivity_ohm_m: must be between"},
		{"missing resistivity", strings.Replace(geo(phases), "earth_resistivity_ohm_m = 100", "transposed = false", 1), "s.toml: line.geometry.earth_resistivity_ohm_m: missing"},
		{"transposed not bool", geo(phases + "\ntransposed = 1"), "s.toml: line.geometry.transposed: must be true or false"},
		{"with per-length constants", strings.Replace(geo(phases), "length_km = 100", "length_km = 100\nr_ohm_per_km = 0.03", 1), "s.toml: line.r_ohm_per_km: the per-length constants and line.geometry exclude each other"},
		{"core too large", strings.Replace(geo(phases), "core_diameter_mm = 8", "core_diameter_mm = 30", 1), "s.toml: conductors.main.core_diameter_mm: must be >= 0 and less than outer_diameter_mm"},
		{"no d.c. resistance", strings.Replace(geo(phases), "dc_ohm_per_km = 0.06", "", 1), "s.toml: conductors.main.dc_ohm_per_km: missing"},
		{"earth wire bad conductor", geo(phases + "\nearth_wires = [{ x_m = 0, height_m = 30, conductor = \"steel\" }]"), "s.toml: line.geometry.earth_wires[0].conductor: no [conductors.steel] table"},
		{"no phases", strings.Replace(geo(""), "", "", 1), "s.toml: line.geometry.phases: missing"},
		{"phases not tables", geo("phases = [1, 2, 3]"), "s.toml: line.geometry.phases[0]: must be a table"},
	}
	for _, c := range cases {
		err := decodeGeometry(t, c.text)
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%s: unexpected error %v", c.name, err)
		case c.want != "" && err == nil:
			t.Errorf("%s: no error, want %q", c.name, c.want)
		case c.want != "" && !strings.HasPrefix(err.Error(), c.want):
			t.Errorf("%s: error\n  %v\nwant prefix\n  %s", c.name, err, c.want)
		case err != nil && !IsInputError(err):
			t.Errorf("%s: not an input error: %v", c.name, err)
		}
	}
}

func TestLoadTowerStudy(t *testing.T) {
	t.Parallel()
	// Through the whole loader: the geometry gives Study.Line and Study.Zero.
	st, err := Load("../../../../testdata/geometry_tower_400kv.toml")
	if err != nil {
		t.Fatal(err)
	}
	if len(st.Line) != 1 || len(st.Zero) != 1 || st.Line[0].Length != 240e3 {
		t.Fatalf("line %+v zero %+v", st.Line, st.Zero)
	}
	pos, ok := st.Line[0].Constants.(propagation.SequenceConstants)
	if !ok || pos.ZeroSequence || pos.Geometry == nil {
		t.Fatalf("positive-sequence constants are %T", st.Line[0].Constants)
	}
	zero, ok := st.Zero[0].Constants.(propagation.SequenceConstants)
	if !ok || !zero.ZeroSequence || zero.Geometry != pos.Geometry {
		t.Fatalf("zero-sequence constants are %T", st.Zero[0].Constants)
	}
	found := false
	for _, e := range st.Understood {
		found = found || strings.HasPrefix(e.Key, "line.geometry.phases[2]")
	}
	if !found {
		t.Errorf("check would not list the phases: %+v", st.Understood)
	}
}

func TestLoadGeometryErrors(t *testing.T) {
	t.Parallel()
	base := "frequency_hz = 50\nvoltage_kv = 400\n" + goodConductors + `
[line]
length_km = 100
[line.geometry]
earth_resistivity_ohm_m = 100
phases = [
  { x_m = -10, height_m = 20, conductor = "main" },
  { x_m = 0, height_m = 20, conductor = "main" },
  { x_m = 10, height_m = 20, conductor = "main" },
]
`
	cases := []struct{ name, text, want string }{
		{"valid", base, ""},
		{"with r", strings.Replace(base, "length_km = 100", "length_km = 100\nr_ohm_per_km = 0.02", 1), "s.toml: line.r_ohm_per_km: the per-length constants and line.geometry exclude each other"},
		{"geometry not a table", strings.Replace(strings.Replace(base, "[line.geometry]\n", "geometry = 3\n[scan]\n", 1), "earth_resistivity_ohm_m = 100\n", "", 1), "s.toml: line.geometry: must be a table"},
		{"conductors typo", strings.Replace(base, "[conductors.main]", "[conductor.main]", 1), `s.toml: conductor: unknown key (did you mean "conductors"?)`},
		{"no conductors", strings.Replace(base, goodConductors, "", 1), `s.toml: line.geometry.phases[0].conductor: no [conductors.main] table`},
		{"sections", strings.Replace(base, "[line]\nlength_km = 100\n[line.geometry]", "[[line.sections]]\nname = \"a\"\nlength_km = 100\n[line.sections.geometry]", 1), ""},
		{"section bad", strings.Replace(strings.Replace(base, "[line]\nlength_km = 100\n[line.geometry]", "[[line.sections]]\nname = \"a\"\nlength_km = 100\n[line.sections.geometry]", 1), "x_m = 10,", "x_m = 10, sag_m = -1,", 1), "s.toml: line.sections[0].geometry.phases[2].sag_m: must be >= 0"},
	}
	for _, c := range cases {
		st, err := Parse("s.toml", []byte(c.text))
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%s: unexpected error %v", c.name, err)
		case c.want == "" && (len(st.Line) == 0 || len(st.Zero) == 0):
			t.Errorf("%s: no line or zero sequence", c.name)
		case c.want != "" && err == nil:
			t.Errorf("%s: no error, want %q", c.name, c.want)
		case c.want != "" && !strings.HasPrefix(err.Error(), c.want):
			t.Errorf("%s: error\n  %v\nwant prefix\n  %s", c.name, err, c.want)
		case err != nil && !IsInputError(err):
			t.Errorf("%s: not an input error: %v", c.name, err)
		}
	}
}
