package study

// The [switching] table: the contract's keys into SwitchingSettings, and this file's
// own keys into SwitchingOptions:
//
//	dead_time_ms = 300                  # reclosing dead time: trapped_pu rings down
//	                                    #   from the opening to the mean closing instant
//	neutral_reactor_sending_ohm   = 0   # reactance at frequency_hz of a neutral reactor
//	neutral_reactor_receiving_ohm = 0   #   between the star point of that end's
//	                                    #   line-connected reactors and earth; 0 = solid
//	[[switching.arrester]]              # optional, any number: surge arresters phase to
//	at = "receiving"                    #   earth at the "sending" (line side of the
//	rated_kv = 336                      #   breaker) or "receiving" end; rated voltage
//	                                    #   Ur (rms kV) scales a typical metal-oxide curve,
//	# vi_ka_kv = [[0.001, 475], [1, 540], [1, 700], ...] #  or a V-I table: current kA,
//	                                    #   peak voltage kV, both increasing
//	# name = "line-end arresters"

import (
	"fmt"
	"math"
	"strings"

	"github.com/telegrapher/telegrapher/waves"
)

// Keys of [switching]: the contract's, then this file's own.
var (
	switchingKeys = []string{
		"shots", "seed", "close_deg", "pole_sigma_ms", "trapped_pu", "preinsertion_ohm",
		"preinsertion_ms", "siwl_kv", "ks", "kcd", "duration_ms", "time_step_us",
		"neutral_reactor_sending_ohm", "neutral_reactor_receiving_ohm", "arrester",
		"controlled_closing", "controlled_sigma_ms", "dead_time_ms",
	}
	arresterKeys = tableKeys("switching.arrester")
)

// ArresterSpec is one [[switching.arrester]] entry in SI units.
type ArresterSpec struct {
	Name    string
	At      string          // "sending" or "receiving"
	RatedV  float64         // rated voltage Ur, rms V; 0 when a V-I table is given
	VI      []waves.VIPoint // A, peak V (the typical curve scaled by RatedV when not given)
	Typical bool            // the built-in typical metal-oxide curve
}

// SwitchingOptions are the [switching] keys beyond the contract's.
type SwitchingOptions struct {
	// NeutralReactorL is the neutral reactor inductance (H) at the sending (0) and
	// receiving (1) end; 0 = star point solidly earthed.
	NeutralReactorL   [2]float64
	NeutralReactorOhm [2]float64 // as given, at frequency_hz
	Arresters         []ArresterSpec
	HasKcd, HasKs     bool // given in the file (not the defaults)
	// Controlled is controlled (point-on-wave) closing: each pole aims at zero voltage
	// across its contacts, scattered by ControlledSigma (s); replaces random closing.
	Controlled      bool
	ControlledSigma float64
	// DeadTime is the reclosing dead time (s), from the line's opening with the
	// trapped charge to the mean closing instant; default 300 ms.
	DeadTime float64
}

// switching reads [switching] (with the models built) into Study.Switching and the
// study's switching options.
func (ld *Loader) switching(t *Table) {
	set, opt, seen, err := ParseSwitching(ld.File, t.Map(), ld.Study.Frequency, ld.Study.Us)
	if err != nil {
		ld.Fail(t.Path(), err)
		return
	}
	ld.Study.Switching = set
	ld.Study.SetSwitchingOptions(opt)
	// A neutral reactor Ln under a line-connected reactor bank adds 3·Ln to the bank's
	// zero-sequence impedance (all three phase currents return through it); the
	// positive sequence does not see it.
	if zn := ld.Study.ZeroNetwork; zn != nil {
		for e, l := range opt.NeutralReactorL {
			zn.ReactorNeutral[e] = 3 * l
		}
	}
	for _, e := range seen {
		ld.Note(e.Key, e.Value, e.How)
	}
}

// SwitchingOptions returns the study's [switching] keys beyond the contract's (the
// zero value when the study has none). A copy of the study (st2 := *st) carries them.
func (st *Study) SwitchingOptions() SwitchingOptions { return st.switchingOpts }

// SetSwitchingOptions sets them, for studies built in code.
func (st *Study) SetSwitchingOptions(o SwitchingOptions) { st.switchingOpts = o }

// swError is an input error of [switching]: FILE: key.path: problem.
type swError struct{ msg string }

func (e *swError) Error() string { return e.msg }

// IsSwitchingError reports whether err is an input error of the [switching] table.
func IsSwitchingError(err error) bool {
	_, ok := err.(*swError)
	return ok
}

func swErrorf(file, path, format string, a ...any) error {
	return &swError{fmt.Sprintf("%s: %s: %s", file, path, fmt.Sprintf(format, a...))}
}

// DefaultDeadTimeMs is the default reclosing dead time (ms): a three-phase
// auto-reclosing dead time of 300 ms (common practice, no source).
const DefaultDeadTimeMs = 300

// DefaultSwitching returns the contract's defaults of [switching].
func DefaultSwitching() SwitchingSettings {
	return SwitchingSettings{
		Shots: 200, Seed: 1, PoleSigma: 1e-3, InsertTime: 8e-3, Ks: 1.15, Kcd: 1.1,
		Duration: 20e-3,
	}
}

// ParseSwitching reads the [switching] table (tbl, the decoded TOML; nil when absent)
// of a study with the given frequency (Hz) and highest voltage for equipment us (V).
// It returns the settings in SI units, this file's own options, and what it
// understood. Errors name the file and the key path.
func ParseSwitching(file string, tbl map[string]any, frequency, us float64) (SwitchingSettings, SwitchingOptions, []Entry, error) {
	s := DefaultSwitching()
	o := SwitchingOptions{DeadTime: DefaultDeadTimeMs * 1e-3}
	var seen []Entry
	if tbl == nil {
		return s, o, seen, nil
	}
	path := func(k string) string { return "switching." + k }
	for _, k := range sortedKeys(tbl) {
		if !contains(switchingKeys, k) {
			return s, o, nil, swErrorf(file, path(k), "unknown key%s", DidYouMean(k, switchingKeys))
		}
	}
	num := func(k string, def float64) (float64, bool, error) {
		v, ok := tbl[k]
		if !ok {
			return def, false, nil
		}
		x, ok := swFloat(v)
		if !ok {
			return 0, true, swErrorf(file, path(k), "must be a number, got %s", describe(v))
		}
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return 0, true, swErrorf(file, path(k), "must be finite, got %v", v)
		}
		return x, true, nil
	}
	add := func(k, val string, given bool) {
		how := "default"
		if given {
			how = "given"
		}
		seen = append(seen, Entry{Key: path(k), Value: val, How: how})
	}
	// shots, seed: integers
	for _, k := range []string{"shots", "seed"} {
		v, ok := tbl[k]
		if !ok {
			if k == "shots" {
				add(k, fmt.Sprint(s.Shots), false)
			} else {
				add(k, fmt.Sprint(s.Seed), false)
			}
			continue
		}
		n, isInt := v.(int64)
		if !isInt {
			return s, o, nil, swErrorf(file, path(k), "must be an integer, got %s", describe(v))
		}
		if k == "shots" {
			if n < 1 || n > waves.MaxShots {
				return s, o, nil, swErrorf(file, path(k), "must be 1..%d, got %d", waves.MaxShots, n)
			}
			s.Shots = int(n)
		} else {
			s.Seed = n
		}
		add(k, fmt.Sprint(n), true)
	}
	x, given, err := num("close_deg", 0)
	if err != nil {
		return s, o, nil, err
	}
	if given {
		s.HasCloseDeg, s.CloseDeg = true, x
		add("close_deg", fmt.Sprintf("%g deg (phase a EMF at the mean closing instant)", x), true)
	} else {
		seen = append(seen, Entry{Key: path("close_deg"), Value: "uniformly random over one cycle", How: "default"})
	}
	// A first, coarse range per key (its message kept from before the schema's bounds,
	// which are checked at the end); the default, SI factor and unit are the schema's.
	type rng struct {
		key      string
		min, max float64
		minOpen  bool // min excluded
		dst      *float64
	}
	for _, r := range []rng{
		{"pole_sigma_ms", 0, 20, false, &s.PoleSigma},
		{"preinsertion_ohm", 0, 1e5, false, &s.Preinsertion},
		{"preinsertion_ms", 0, 100, true, &s.InsertTime},
		{"siwl_kv", 0, 1e4, false, &s.SIWL},
		{"ks", 0, 10, true, &s.Ks},
		{"kcd", 0, 10, true, &s.Kcd},
		{"duration_ms", 0, 10000, true, &s.Duration},
		{"time_step_us", 0, 1e4, false, &s.TimeStep},
	} {
		k := lookup(path(r.key))
		x, given, err := num(r.key, k.Def)
		if err != nil {
			return s, o, nil, err
		}
		if (r.minOpen && !(x > r.min)) || x < r.min || x > r.max {
			op := ">="
			if r.minOpen {
				op = ">"
			}
			return s, o, nil, swErrorf(file, path(r.key), "must be %s %g and at most %g, got %g", op, r.min, r.max, x)
		}
		*r.dst = x * k.SI
		val := strings.TrimSpace(fmt.Sprintf("%g %s", x, k.Unit))
		switch {
		case r.key == "time_step_us" && x == 0:
			val = "chosen by the method"
		case r.key == "preinsertion_ohm" && x == 0:
			val = "none"
		}
		add(r.key, val, given)
		switch r.key {
		case "ks":
			o.HasKs = given
		case "kcd":
			o.HasKcd = given
		}
	}
	// siwl_kv with us_kv <= 245 (range I) is refused by the switching computation
	// only, so the other commands run on the same file.
	if s.TimeStep > 0 && (s.Duration+s.InsertTime)/s.TimeStep > waves.MaxSamples {
		return s, o, nil, swErrorf(file, path("time_step_us"), "duration_ms / time_step_us gives %.4g samples, more than %d", (s.Duration+s.InsertTime)/s.TimeStep, waves.MaxSamples)
	}
	if v, ok := tbl["trapped_pu"]; ok {
		arr, ok := v.([]any)
		if !ok || len(arr) != 3 {
			return s, o, nil, swErrorf(file, path("trapped_pu"), "must be an array of three numbers (phases a, b, c), got %v", v)
		}
		for k, e := range arr {
			x, ok := swFloat(e)
			if b := lookup(path("trapped_pu")).Bounds; !ok || math.IsNaN(x) || math.IsInf(x, 0) || !(x >= b.Lo && x <= b.Hi) {
				return s, o, nil, swErrorf(file, fmt.Sprintf("%s[%d]", path("trapped_pu"), k), "must be a number within ±%g pu, got %v", b.Hi, e)
			}
			s.TrappedPU[k] = x
		}
		add("trapped_pu", fmt.Sprintf("%g, %g, %g pu", s.TrappedPU[0], s.TrappedPU[1], s.TrappedPU[2]), true)
	} else {
		add("trapped_pu", "0, 0, 0 pu", false)
	}
	for e, k := range []string{"neutral_reactor_sending_ohm", "neutral_reactor_receiving_ohm"} {
		x, given, err := num(k, 0)
		if err != nil {
			return s, o, nil, err
		}
		if x < 0 || x > 1e6 {
			return s, o, nil, swErrorf(file, path(k), "must be >= 0 and at most 1e6, got %g", x)
		}
		o.NeutralReactorOhm[e] = x
		o.NeutralReactorL[e] = x / (2 * math.Pi * frequency)
		if given {
			add(k, fmt.Sprintf("%g ohm = %.4g H", x, o.NeutralReactorL[e]), true)
		}
	}
	if v, ok := tbl["controlled_closing"]; ok {
		b, isBool := v.(bool)
		if !isBool {
			return s, o, nil, swErrorf(file, path("controlled_closing"), "must be true or false, got %s", describe(v))
		}
		o.Controlled = b
		add("controlled_closing", fmt.Sprintf("%v", b), true)
	}
	if sig, given, err := num("controlled_sigma_ms", lookup(path("controlled_sigma_ms")).Def); err != nil {
		return s, o, nil, err
	} else {
		if given && !o.Controlled {
			return s, o, nil, swErrorf(file, path("controlled_sigma_ms"), "applies to controlled closing only: set switching.controlled_closing = true")
		}
		if b := lookup(path("controlled_sigma_ms")).Bounds; !(sig >= b.Lo && sig <= b.Hi) {
			return s, o, nil, swErrorf(file, path("controlled_sigma_ms"), "must be between %g and %g ms, got %g", b.Lo, b.Hi, sig)
		}
		if o.Controlled {
			o.ControlledSigma = sig * 1e-3
			add("controlled_sigma_ms", fmt.Sprintf("%g ms (closing-time scatter of controlled closing)", sig), given)
		}
	}
	if d, given, err := num("dead_time_ms", DefaultDeadTimeMs); err != nil {
		return s, o, nil, err
	} else {
		if d < 0 || d > waves.MaxDeadTime*1e3 {
			return s, o, nil, swErrorf(file, path("dead_time_ms"), "must be >= 0 and at most %g ms, got %g", waves.MaxDeadTime*1e3, d)
		}
		o.DeadTime = d * 1e-3
		add("dead_time_ms", fmt.Sprintf("%g ms (reclosing dead time: the trapped charge of trapped_pu rings down from the opening to the mean closing instant)", d), given)
	}
	if v, ok := tbl["arrester"]; ok {
		list, err := swTables(v)
		if err != nil {
			return s, o, nil, swErrorf(file, path("arrester"), "must be an array of tables ([[switching.arrester]])")
		}
		for i, a := range list {
			ap := fmt.Sprintf("switching.arrester[%d]", i)
			spec, err := parseArrester(file, ap, a)
			if err != nil {
				return s, o, nil, err
			}
			o.Arresters = append(o.Arresters, spec)
			desc := fmt.Sprintf("%s end, ", spec.At)
			if spec.Typical {
				desc += fmt.Sprintf("typical metal-oxide curve scaled to Ur = %g kV", spec.RatedV/1e3)
			} else {
				desc += fmt.Sprintf("V-I table of %d points", len(spec.VI))
			}
			seen = append(seen, Entry{Key: ap, Value: desc, How: "given"})
		}
	}
	if err := checkSwitchingBounds(file, tbl); err != nil {
		return s, o, nil, err
	}
	return s, o, seen, nil
}

func parseArrester(file, ap string, a map[string]any) (ArresterSpec, error) {
	var spec ArresterSpec
	for _, k := range sortedKeys(a) {
		if !contains(arresterKeys, k) {
			return spec, swErrorf(file, ap+"."+k, "unknown key%s", DidYouMean(k, arresterKeys))
		}
	}
	at, _ := a["at"].(string)
	if at != "sending" && at != "receiving" {
		return spec, swErrorf(file, ap+".at", `must be "sending" or "receiving", got %v`, a["at"])
	}
	spec.At = at
	spec.Name, _ = a["name"].(string)
	if spec.Name == "" {
		spec.Name = at + " end"
	}
	rv, hasR := a["rated_kv"]
	tv, hasT := a["vi_ka_kv"]
	switch {
	case hasR == hasT:
		return spec, swErrorf(file, ap, "give exactly one of rated_kv and vi_ka_kv")
	case hasR:
		x, ok := swFloat(rv)
		if hi := lookup("switching.arrester.rated_kv").Bounds.Hi; !ok || !(x > 0) || x > hi || math.IsInf(x, 0) {
			return spec, swErrorf(file, ap+".rated_kv", "must be a number > 0 and at most %g, got %v", hi, rv)
		}
		spec.RatedV = x * 1e3
		spec.VI = waves.TypicalArrester(spec.RatedV)
		spec.Typical = true
	default:
		rows, ok := tv.([]any)
		if !ok || len(rows) < 2 {
			return spec, swErrorf(file, ap+".vi_ka_kv", "must be an array of at least two [current_ka, voltage_kv] pairs")
		}
		for j, r := range rows {
			pair, ok := r.([]any)
			var i, v float64
			var oki, okv bool
			if ok && len(pair) == 2 {
				i, oki = swFloat(pair[0])
				v, okv = swFloat(pair[1])
			}
			if !oki || !okv || !(i > 0) || !(v > 0) || math.IsInf(i, 0) || math.IsInf(v, 0) {
				return spec, swErrorf(file, fmt.Sprintf("%s.vi_ka_kv[%d]", ap, j), "must be a pair [current_ka > 0, voltage_kv > 0], got %v", r)
			}
			if j > 0 && !(i*1e3 > spec.VI[j-1].Current && v*1e3 > spec.VI[j-1].Voltage) {
				return spec, swErrorf(file, fmt.Sprintf("%s.vi_ka_kv[%d]", ap, j), "current and voltage must both increase from the previous point")
			}
			spec.VI = append(spec.VI, waves.VIPoint{Current: i * 1e3, Voltage: v * 1e3})
		}
	}
	return spec, nil
}

func swFloat(v any) (float64, bool) {
	switch x := v.(type) {
	case float64:
		return x, true
	case int64:
		return float64(x), true
	case int:
		return float64(x), true
	}
	return 0, false
}

func swTables(v any) ([]map[string]any, error) {
	switch x := v.(type) {
	case []map[string]any:
		return x, nil
	case []any:
		out := make([]map[string]any, 0, len(x))
		for _, e := range x {
			m, ok := e.(map[string]any)
			if !ok {
				return nil, fmt.Errorf("not a table")
			}
			out = append(out, m)
		}
		return out, nil
	}
	return nil, fmt.Errorf("not an array of tables")
}

// checkSwitchingBounds checks the numbers of a [switching] table (tbl, decoded TOML)
// already read by ParseSwitching against the schema's bounds, key by key in the
// schema's order, and returns the first problem.
func checkSwitchingBounds(file string, tbl map[string]any) error {
	for _, k := range Schema {
		if k.Table != "switching" || !k.Bounds.hasRange() {
			continue
		}
		x, ok := swFloat(tbl[k.Name])
		if !ok {
			continue
		}
		if p := k.Bounds.problem(x); p != "" {
			return swErrorf(file, k.Path(), "%s", p)
		}
	}
	rated := lookup("switching.arrester.rated_kv").Bounds
	current := lookup("switching.arrester.vi_ka_kv.current").Bounds
	voltage := lookup("switching.arrester.vi_ka_kv.voltage").Bounds
	list, _ := swTables(tbl["arrester"])
	for i, a := range list {
		ap := fmt.Sprintf("switching.arrester[%d]", i)
		if x, ok := swFloat(a["rated_kv"]); ok && !(x >= rated.Lo && x <= rated.Hi) {
			return swErrorf(file, ap+".rated_kv", "must be between %s and %s kV, got %s", num(rated.Lo), num(rated.Hi), num(x))
		}
		rows, _ := a["vi_ka_kv"].([]any)
		for j, r := range rows {
			pair, _ := r.([]any)
			if len(pair) != 2 {
				continue
			}
			i, _ := swFloat(pair[0])
			v, _ := swFloat(pair[1])
			if !(i >= current.Lo && i <= current.Hi && v >= voltage.Lo && v <= voltage.Hi) || math.IsNaN(i+v) {
				return swErrorf(file, fmt.Sprintf("%s.vi_ka_kv[%d]", ap, j), "must be a pair [current_ka, voltage_kv] with current %s to %s kA and voltage %s to %s kV, got %v",
					num(current.Lo), num(current.Hi), num(voltage.Lo), num(voltage.Hi), r)
			}
		}
	}
	return nil
}
