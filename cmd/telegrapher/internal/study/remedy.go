package study

// The [targets] and [levers] tables of the remedy search (contract: "Remedies"):
//
//	[targets]                          # each optional, at least one when the table is given
//	max_open_end_pu = 1.05             # no-load |Vr/Vs| at frequency_hz, with line-connected shunts
//	max_gain_watched = 2.0             # largest gain within the watch band of a watched harmonic
//	max_u2_pu = 2.0                    # statistical switching u2, IEC 60071-1 base
//	min_margin_pct = 0                 # least margin to switching.siwl_kv
//
//	[levers]                           # each optional; [levers] needs [targets]
//	reactor_mvar_sending = [0, 300]    # line-connected reactor added at that end, Mvar:
//	reactor_mvar_receiving = [0, 300]  #   none, or a rating within [min, max]
//	preinsertion_ohm = [0, 800]        # pre-insertion resistor: none, or within [min, max]
//	controlled_closing = true          # each pole may close near its voltage zero
//	controlled_sigma_ms = 1.0          # closing-time scatter of controlled closing, ms
//	arresters_kv = [330, 336, 360]     # rated voltages Ur (rms kV) of arresters at both ends
//
// The switching targets need zero-sequence data, and min_margin_pct needs
// switching.siwl_kv. The loader reads [levers] first and hands them to [targets],
// after [switching]; both are attached to the study (Study.Remedy).

import (
	"fmt"
	"sort"
	"strings"
)

// Keys of [targets] and [levers].
var (
	targetKeys = tableKeys("targets")
	leverKeys  = tableKeys("levers")
)

// Targets are the limits a remedy must meet; a Has flag is false for a target not given.
type Targets struct {
	HasOpenEnd, HasGainWatched, HasU2, HasMargin bool

	OpenEndPU   float64 // largest no-load |Vr/Vs| at the system frequency
	GainWatched float64 // largest gain |Vr/E| within the watch band of a watched harmonic
	U2PU        float64 // largest statistical switching u2, pu of Us·√2/√3
	MarginPct   float64 // least margin to switching.siwl_kv, %
}

// Any reports whether at least one target is given.
func (t Targets) Any() bool { return t.HasOpenEnd || t.HasGainWatched || t.HasU2 || t.HasMargin }

// Switching reports whether a target needs the statistical switching study.
func (t Targets) Switching() bool { return t.HasU2 || t.HasMargin }

// Range is a lever's allowed values: none (no change) or a value within [Min, Max].
type Range struct{ Min, Max float64 }

// Levers are what the remedy search may change; nil ranges are levers not given.
type Levers struct {
	ReactorSending   *Range    // var, line-connected reactor added at the sending end
	ReactorReceiving *Range    // var, at the receiving end
	Preinsertion     *Range    // ohm
	Controlled       bool      // controlled closing allowed
	ControlledSigma  float64   // s, closing-time scatter of controlled closing (default 1 ms)
	ArrestersV       []float64 // rated voltages Ur, rms V, ascending; nil = not a lever
}

// RemedySpec is the [targets] and [levers] of a study.
type RemedySpec struct {
	Present bool // the study has [targets]
	Targets Targets
	Levers  Levers
}

// Remedy returns the study's [targets] and [levers] (Present false when it has none).
// A copy of the study carries them.
func (st *Study) Remedy() RemedySpec { return st.remedy }

// SetRemedy sets them, for studies built in code.
func (st *Study) SetRemedy(r RemedySpec) { st.remedy = r }

// levers reads [levers] and returns them with whether the table is given, for
// targets.
func (ld *Loader) levers(t *Table) (lv Levers, given bool) {
	lv.ControlledSigma = t.SI("controlled_sigma_ms", t.key("controlled_sigma_ms").Def)
	if !t.Present() {
		return lv, false
	}
	t.Known(leverKeys...)
	rng := func(key string, what string) *Range {
		k := t.key(key)
		limit, least, unitName := k.Bounds.Hi, k.Bounds.Lo, k.Unit
		v, ok := t.Floats(key)
		if !ok {
			return nil
		}
		if len(v) != 2 {
			t.Errorf(key, "must be a range [min, max] of two numbers, got %d numbers", len(v))
			return nil
		}
		if !(v[0] >= 0) || !(v[1] > 0) || v[0] > v[1] || v[1] > limit {
			t.Errorf(key, "must be a range [min, max] with 0 <= min <= max, 0 < max <= %s, got [%s, %s]", num(limit), num(v[0]), num(v[1]))
			return nil
		}
		if v[0] != 0 && v[0] < least || v[1] < least {
			t.Errorf(key, "must be a range [min, max] whose ends are 0 or at least %s %s, got [%s, %s]", num(least), unitName, num(v[0]), num(v[1]))
			return nil
		}
		ld.Note(t.KeyPath(key), fmt.Sprintf("none, or %s to %s %s", num(v[0]), num(v[1]), what), "given")
		return &Range{Min: t.SI(key, v[0]), Max: t.SI(key, v[1])}
	}
	lv.ReactorSending = rng("reactor_mvar_sending", "Mvar line-connected at the sending end")
	lv.ReactorReceiving = rng("reactor_mvar_receiving", "Mvar line-connected at the receiving end")
	lv.Preinsertion = rng("preinsertion_ohm", "ohm pre-insertion resistor")
	if b, ok := t.Bool("controlled_closing"); ok {
		lv.Controlled = b
		ld.Note(t.KeyPath("controlled_closing"), fmt.Sprint(b), "given")
	}
	if s, ok := t.Num("controlled_sigma_ms"); ok {
		if !ld.Failed() && !lv.Controlled {
			t.Errorf("controlled_sigma_ms", "applies to controlled closing only; give controlled_closing = true or leave it out")
		}
		lv.ControlledSigma = t.SI("controlled_sigma_ms", s)
		ld.noteNum(t, "controlled_sigma_ms", s, "given")
	} else if lv.Controlled {
		ld.noteNum(t, "controlled_sigma_ms", t.key("controlled_sigma_ms").Def, "default")
	}
	if v, ok := t.Floats("arresters_kv"); ok {
		if len(v) == 0 {
			t.Errorf("arresters_kv", "must list at least one rated voltage (rms kV), e.g. [336, 360]")
		}
		b := t.key("arresters_kv").Bounds
		for i, x := range v {
			if !(x > 0) || x > b.Hi {
				t.Errorf(fmt.Sprintf("arresters_kv[%d]", i), "must be a rated voltage > 0 and at most %s kV, got %s", num(b.Hi), num(x))
				break
			}
			if x < b.Lo {
				t.Errorf(fmt.Sprintf("arresters_kv[%d]", i), "must be a rated voltage between %s and %s kV, got %s", num(b.Lo), num(b.Hi), num(x))
				break
			}
		}
		if !ld.Failed() {
			sort.Float64s(v)
			var kvs []string
			for i, x := range v {
				if i > 0 && x == v[i-1] {
					continue
				}
				lv.ArrestersV = append(lv.ArrestersV, t.SI("arresters_kv", x))
				kvs = append(kvs, num(x))
			}
			ld.Note(t.KeyPath("arresters_kv"), "none, or arresters at both line ends rated "+strings.Join(kvs, ", ")+" kV", "given")
		}
	}
	if !ld.Failed() && lv.ReactorSending == nil && lv.ReactorReceiving == nil && lv.Preinsertion == nil && !lv.Controlled && lv.ArrestersV == nil {
		ld.Errorf(t.Path(), "gives no lever; give at least one of %s (or leave out [levers])", strings.Join(leverKeys, ", "))
	}
	return lv, true
}

// targets reads [targets] (after [switching]) and attaches it with the levers lv
// (leversGiven: [levers] is in the file) to the study.
func (ld *Loader) targets(t *Table, lv Levers, leversGiven bool) {
	if !t.Present() {
		if leversGiven {
			ld.Errorf("levers", "needs [targets]: the search looks for the cheapest change that meets them; give e.g. [targets] max_open_end_pu = 1.05")
		}
		return
	}
	t.Known(targetKeys...)
	var tg Targets
	if v, ok := t.Num("max_open_end_pu"); ok {
		tg.HasOpenEnd, tg.OpenEndPU = true, v
		ld.Note(t.KeyPath("max_open_end_pu"), fmt.Sprintf("%s pu (no-load |Vr/Vs| at %g Hz)", num(v), ld.Study.Frequency), "given")
	}
	if v, ok := t.Num("max_gain_watched"); ok {
		tg.HasGainWatched, tg.GainWatched = true, v
		ld.Note(t.KeyPath("max_gain_watched"), fmt.Sprintf("%s (|Vr/E| near the watched harmonics)", num(v)), "given")
	}
	zeroNeeded := func(key string) {
		if !ld.Failed() && len(ld.Study.Zero) == 0 {
			t.Errorf(key, "needs the statistical switching study, which needs zero-sequence data: give line.r0_ohm_per_km, l0_mh_per_km (or x0_ohm_per_km) and c0_nf_per_km (or b0_us_per_km), or [line.geometry]")
		}
	}
	if v, ok := t.Num("max_u2_pu"); ok {
		zeroNeeded("max_u2_pu")
		tg.HasU2, tg.U2PU = true, v
		ld.Note(t.KeyPath("max_u2_pu"), fmt.Sprintf("%s pu (IEC 60071-1 base)", num(v)), "given")
	}
	if v, ok := t.Num("min_margin_pct"); ok {
		zeroNeeded("min_margin_pct")
		if !ld.Failed() && !(ld.Study.Switching.SIWL > 0) {
			t.Errorf("min_margin_pct", "needs switching.siwl_kv (the withstand level the margin is taken to); give e.g. [switching] siwl_kv = 1050")
		}
		tg.HasMargin, tg.MarginPct = true, v
		ld.Note(t.KeyPath("min_margin_pct"), fmt.Sprintf("%s %% to switching.siwl_kv", num(v)), "given")
	}
	if !ld.Failed() && !tg.Any() {
		ld.Errorf(t.Path(), "gives no target; give at least one of %s", strings.Join(targetKeys, ", "))
	}
	if ld.Failed() {
		return
	}
	ld.Study.SetRemedy(RemedySpec{Present: true, Targets: tg, Levers: lv})
}
