package study

import (
	"math"
	"strings"
	"testing"
)

func TestParseSwitchingDefaults(t *testing.T) {
	t.Parallel()
	s, o, _, err := ParseSwitching("s.toml", nil, 50, 420e3)
	if err != nil {
		t.Fatal(err)
	}
	// the contract's defaults
	want := SwitchingSettings{Shots: 200, Seed: 1, PoleSigma: 1e-3, InsertTime: 8e-3, Ks: 1.15, Kcd: 1.1, Duration: 20e-3}
	if s != want {
		t.Errorf("defaults %+v, want %+v", s, want)
	}
	if o.HasKcd || len(o.Arresters) > 0 {
		t.Errorf("options %+v", o)
	}
}

func TestParseSwitchingGiven(t *testing.T) {
	t.Parallel()
	// conversions: ms -> s, kV -> V, ohm at 50 Hz -> H (X/ω)
	const tol = 1e-12
	tbl := map[string]any{
		"shots": int64(500), "seed": int64(9), "close_deg": 30.0, "pole_sigma_ms": 1.5,
		"trapped_pu": []any{1.0, int64(-1), 0.5}, "preinsertion_ohm": int64(400), "preinsertion_ms": 10.0,
		"siwl_kv": int64(1050), "ks": 1.05, "duration_ms": 25.0, "time_step_us": 10.0,
		"neutral_reactor_receiving_ohm": 314.159265358979,
		"arrester": []map[string]any{
			{"at": "receiving", "rated_kv": int64(336)},
			{"at": "sending", "vi_ka_kv": []any{[]any{0.001, 470.0}, []any{1.0, 700.0}, []any{10.0, 830.0}}, "name": "line entrance"},
		},
	}
	s, o, seen, err := ParseSwitching("s.toml", tbl, 50, 420e3)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"shots", float64(s.Shots), 500}, {"seed", float64(s.Seed), 9}, {"close", s.CloseDeg, 30},
		{"sigma", s.PoleSigma, 1.5e-3}, {"trapped b", s.TrappedPU[1], -1}, {"pir", s.Preinsertion, 400},
		{"pir time", s.InsertTime, 10e-3}, {"siwl", s.SIWL, 1050e3}, {"ks", s.Ks, 1.05}, {"kcd", s.Kcd, 1.1},
		{"duration", s.Duration, 25e-3}, {"step", s.TimeStep, 10e-6}, {"neutral L", o.NeutralReactorL[1], 1},
		{"arrester 0 rated", o.Arresters[0].RatedV, 336e3}, {"arrester 1 point 1 V", o.Arresters[1].VI[1].Voltage, 700e3},
		{"arrester 1 point 2 A", o.Arresters[1].VI[2].Current, 10e3},
	} {
		if math.Abs(c.got-c.want) > tol*math.Max(1, math.Abs(c.want)) {
			t.Errorf("%s = %g, want %g", c.name, c.got, c.want)
		}
	}
	if !s.HasCloseDeg || !o.HasKs || o.HasKcd || !o.Arresters[0].Typical || o.Arresters[1].Name != "line entrance" {
		t.Errorf("flags: %+v %+v", s, o)
	}
	if len(seen) == 0 {
		t.Error("nothing understood")
	}
}

func TestParseSwitchingErrors(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		name string
		tbl  map[string]any
		us   float64
		want string // key path and problem in the message
	}{
		{"unknown key", map[string]any{"shot": int64(3)}, 420e3, `s.toml: switching.shot: unknown key (did you mean "shots"?)`},
		{"shots too many", map[string]any{"shots": int64(100001)}, 420e3, "switching.shots: must be 1..100000"},
		{"shots float", map[string]any{"shots": 2.5}, 420e3, "switching.shots: must be an integer"},
		{"negative sigma", map[string]any{"pole_sigma_ms": -1.0}, 420e3, "switching.pole_sigma_ms: must be >= 0"},
		{"zero duration", map[string]any{"duration_ms": 0.0}, 420e3, "switching.duration_ms: must be > 0"},
		{"trapped length", map[string]any{"trapped_pu": []any{1.0}}, 420e3, "switching.trapped_pu: must be an array of three"},
		{"trapped value", map[string]any{"trapped_pu": []any{1.0, "x", 0.0}}, 420e3, "switching.trapped_pu[1]"},
		{"samples", map[string]any{"time_step_us": 0.001, "duration_ms": 20.0}, 420e3, "switching.time_step_us:"},
		{"arrester end", map[string]any{"arrester": []map[string]any{{"at": "middle", "rated_kv": 336.0}}}, 420e3, "switching.arrester[0].at"},
		{"arrester both", map[string]any{"arrester": []map[string]any{{"at": "sending", "rated_kv": 336.0, "vi_ka_kv": []any{}}}}, 420e3, "give exactly one of rated_kv and vi_ka_kv"},
		{"arrester table order", map[string]any{"arrester": []map[string]any{{"at": "sending", "vi_ka_kv": []any{[]any{1.0, 700.0}, []any{0.5, 800.0}}}}}, 420e3, "switching.arrester[0].vi_ka_kv[1]"},
		{"arrester key", map[string]any{"arrester": []map[string]any{{"at": "sending", "rated": 336.0}}}, 420e3, "switching.arrester[0].rated: unknown key"},
		{"neutral negative", map[string]any{"neutral_reactor_sending_ohm": -5.0}, 420e3, "switching.neutral_reactor_sending_ohm"},
		{"dead time negative", map[string]any{"dead_time_ms": -1.0}, 420e3, "switching.dead_time_ms: must be >= 0 and at most 10000 ms"},
		{"dead time too long", map[string]any{"dead_time_ms": 10001.0}, 420e3, "switching.dead_time_ms: must be >= 0 and at most 10000 ms"},
		{"dead time text", map[string]any{"dead_time_ms": "300"}, 420e3, "switching.dead_time_ms: must be a number"},
	} {
		_, _, _, err := ParseSwitching("s.toml", tc.tbl, 50, tc.us)
		if err == nil {
			t.Errorf("%s: accepted", tc.name)
			continue
		}
		if !strings.Contains(err.Error(), tc.want) || !IsSwitchingError(err) {
			t.Errorf("%s: %q does not contain %q", tc.name, err, tc.want)
		}
	}
}

// Options are kept with the study, and a copy of the study carries them.
func TestSwitchingOptionsAttach(t *testing.T) {
	t.Parallel()
	a := &Study{}
	a.SetSwitchingOptions(SwitchingOptions{NeutralReactorOhm: [2]float64{0, 300}})
	b := *a
	if a.SwitchingOptions().NeutralReactorOhm[1] != 300 {
		t.Error("options lost")
	}
	if b.SwitchingOptions().NeutralReactorOhm[1] != 300 {
		t.Error("a copy of the study lost the options")
	}
	b.SetSwitchingOptions(SwitchingOptions{})
	if a.SwitchingOptions().NeutralReactorOhm[1] != 300 {
		t.Error("changing the copy's options changed the original's")
	}
}

// siwl_kv in range I (us_kv <= 245) is read: only the switching computation refuses
// it, so the file stays valid for every other command.
func TestParseSwitchingSIWLRangeIRead(t *testing.T) {
	t.Parallel()
	s, _, _, err := ParseSwitching("s.toml", map[string]any{"siwl_kv": 850.0}, 50, 245e3)
	if err != nil || s.SIWL != 850e3 {
		t.Errorf("siwl_kv = 850 with us_kv = 245: %v, SIWL %g V", err, s.SIWL)
	}
}

// dead_time_ms: 300 ms by default (common practice, no source: three-phase
// auto-reclosing), given in ms, kept in s; 0 is allowed (the charge held at closing).
func TestParseSwitchingDeadTime(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		tbl  map[string]any
		want float64 // s
	}{{nil, 0.3}, {map[string]any{}, 0.3}, {map[string]any{"dead_time_ms": int64(500)}, 0.5}, {map[string]any{"dead_time_ms": 0.0}, 0}} {
		_, o, seen, err := ParseSwitching("s.toml", tc.tbl, 50, 420e3)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(o.DeadTime-tc.want) > 1e-15 {
			t.Errorf("%v: dead time %g s, want %g", tc.tbl, o.DeadTime, tc.want)
		}
		found := tc.tbl == nil // an absent table lists nothing
		for _, e := range seen {
			found = found || e.Key == "switching.dead_time_ms"
		}
		if !found {
			t.Errorf("%v: check does not list switching.dead_time_ms", tc.tbl)
		}
	}
}
