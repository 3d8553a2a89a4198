package study

// [source], [[shunt]], [receiving], [scan] and [energise], and the network models
// built from them.

import (
	"fmt"
	"math"
	"strconv"

	"github.com/telegrapher/telegrapher/freqscan"
)

// source reads [source]: a short-circuit level with X/R, or R with L (or X).
//
//	|Z| = V²/S,  R = |Z|/sqrt(1 + (X/R)²),  X = R·(X/R),  L = X/ω
func (ld *Loader) source(t *Table) {
	sp := &ld.Study.Source
	sp.X0OverX1 = t.key("x0_over_x1").Def
	if k, ok := t.Num("x0_over_x1"); ok {
		sp.X0OverX1, sp.HasX0OverX1 = k, true
	}
	m := ld.mark() // an unknown key or a wrong type below hides which form is meant
	if !t.Present() {
		sp.Ideal = true
		ld.Note("source", "ideal (zero impedance)", "default: no [source]")
		return
	}
	t.Known(sourceKeys...)
	w, v := ld.omega(), ld.Study.Voltage
	scForm := t.Has("short_circuit_mva") || t.Has("x_over_r")
	rlForm := t.Has("r_ohm") || t.Has("l_mh") || t.Has("x_ohm")
	switch {
	case ld.failedSince(m):
		return
	case scForm && rlForm:
		first := "short_circuit_mva"
		if !t.Has(first) {
			first = "x_over_r"
		}
		second := "r_ohm"
		for _, k := range []string{"r_ohm", "l_mh", "x_ohm"} {
			if t.Has(k) {
				second = k
				break
			}
		}
		t.Errorf(second, "the source is given two ways (%s and %s); give short_circuit_mva with x_over_r, or r_ohm with l_mh (or x_ohm)", t.KeyPath(first), t.KeyPath(second))
		return
	case scForm:
		s := required(t, "short_circuit_mva", "short_circuit_mva = 15000")
		k := required(t, "x_over_r", "x_over_r = 12")
		t.Check("short_circuit_mva", s)
		t.Check("x_over_r", k)
		if ld.failedSince(m) {
			return
		}
		z := v * v / (s * 1e6)
		r := z / math.Sqrt(1+k*k)
		sp.ShortCircuitVA, sp.XOverR, sp.R, sp.L = t.SI("short_circuit_mva", s), k, r, r*k/w
		ld.noteNum(t, "short_circuit_mva", s, "given")
		ld.noteNum(t, "x_over_r", k, "given")
		ld.Note("source.r_ohm", fmt.Sprintf("%.6g ohm", sp.R), fmt.Sprintf("from |Z| = V^2/S = %.6g ohm", z))
		ld.Note("source.l_mh", fmt.Sprintf("%.6g mH (X = %.6g ohm at %g Hz)", sp.L*1e3, r*k, ld.Study.Frequency), "from X/R")
	case rlForm:
		r := required(t, "r_ohm", "r_ohm = 0.9")
		t.Check("r_ohm", r)
		sp.R = t.SI("r_ohm", r)
		ld.noteNum(t, "r_ohm", r, "given")
		switch t.Exclusive("l_mh", t.key("l_mh").Alt) {
		case "l_mh":
			l, _ := t.Num("l_mh")
			sp.L = t.SI("l_mh", l)
			ld.noteNum(t, "l_mh", l, "given")
		case "x_ohm":
			x, _ := t.Num("x_ohm")
			if x != 0 {
				ld.throughOmega(t, "x_ohm", x, w*1e-3, t.key("l_mh"))
			}
			sp.L = x / w
			ld.Note("source.l_mh", fmt.Sprintf("%.6g mH", sp.L*1e3), fmt.Sprintf("from x_ohm = %g ohm at %g Hz", x, ld.Study.Frequency))
		default:
			if !t.Has("l_mh") && !t.Has("x_ohm") {
				t.Errorf("l_mh", "missing: give the source inductance l_mh (0 for a resistive source) or reactance x_ohm, with r_ohm")
			}
		}
	default:
		t.Errorf("short_circuit_mva", "missing: give short_circuit_mva with x_over_r, or r_ohm with l_mh (or x_ohm); leave out [source] for an ideal source")
		return
	}
	ld.noteNum(t, "x0_over_x1", sp.X0OverX1, givenHow(sp.HasX0OverX1))
	sp.Ideal = sp.R == 0 && sp.L == 0
}

// shunts reads [[shunt]]: a rating Q at voltage_kv and frequency_hz gives X = V²/|Q|;
// a reactor L = X/ω, a capacitor C = 1/(ωX); q_factor gives R = X/q in series.
func (ld *Loader) shunts(root *Table) {
	tabs := root.Subs("shunt")
	if len(tabs) > MaxShunts {
		root.Errorf("shunt", "must have at most %d entries, got %d", MaxShunts, len(tabs))
		return
	}
	w, v := ld.omega(), ld.Study.Voltage
	for _, t := range tabs {
		m := ld.mark()
		t.Known(shuntKeys...)
		name, _ := t.String("name")
		at, ok := t.String("at")
		if !ok && !t.Has("at") {
			t.Errorf("at", `missing: give at = "sending" or at = "receiving"`)
		}
		t.OneOf("at", at, "sending", "receiving")
		conn, ok := t.String("connection")
		if !ok && !t.Has("connection") {
			t.Errorf("connection", `missing: give connection = "line" (switched with the line) or connection = "bus"`)
		}
		t.OneOf("connection", conn, "line", "bus")
		q := required(t, "mvar", "mvar = 150 (a reactor; negative for a capacitor)")
		if q == 0 && t.Has("mvar") {
			t.Errorf("mvar", "must not be 0 (> 0 reactor, < 0 capacitor), got 0")
		}
		if b := t.key("mvar").Bounds; !(math.Abs(q) >= b.Lo && math.Abs(q) <= b.Hi) {
			t.Errorf("mvar", "must be between %s and %s in size (> 0 reactor, < 0 capacitor), got %s", num(b.Lo), num(b.Hi), num(q))
		}
		sh := freqscan.Shunt{Name: name, OnLine: conn == "line"}
		if at == "receiving" {
			sh.End = freqscan.Receiving
		}
		x := v * v / (math.Abs(q) * 1e6)
		kind := "reactor"
		if q > 0 {
			sh.L = x / w
		} else {
			sh.C = 1 / (w * x)
			kind = "capacitor"
		}
		losses := "lossless"
		if qf, ok := t.Num("q_factor"); ok {
			sh.R = x / qf
			losses = fmt.Sprintf("q_factor %g: R = %.6g ohm in series", qf, sh.R)
		}
		if ld.failedSince(m) {
			continue
		}
		val := fmt.Sprintf("%g Mvar %s at the %s end, %s-connected; ", math.Abs(q), kind, at, conn)
		if sh.L > 0 {
			val += fmt.Sprintf("L = %.6g H", sh.L)
		} else {
			val += fmt.Sprintf("C = %.6g uF", sh.C*1e6)
		}
		ld.Note(t.Path(), val+", "+losses, fmt.Sprintf("from X = V^2/|Q| = %.6g ohm", x))
		ld.Study.Network.Shunts = append(ld.Study.Network.Shunts, sh)
	}
}

// receiving reads [receiving]: the load R = V²/P in parallel with L = V²/(Qω) (Q > 0)
// or C = |Q|/(V²ω) (Q < 0), and the receiving-end system for loadability.
func (ld *Loader) receiving(t *Table) {
	if !t.Present() {
		ld.Note("receiving", "nothing beyond the line", "default: no [receiving]")
		return
	}
	t.Known(receivingKeys...)
	rs := &ld.Study.Receiving
	w, v := ld.omega(), ld.Study.Voltage
	if p, ok := t.Num("load_mw"); ok {
		rs.LoadW = t.SI("load_mw", p)
		if p > 0 {
			ld.Study.Network.Load.R = v * v / rs.LoadW
		}
		if p > 0 {
			ld.Note("receiving.load_mw", fmt.Sprintf("%g MW: R = %.6g ohm in parallel", p, ld.Study.Network.Load.R), "given")
		} else {
			ld.Note("receiving.load_mw", "0 MW: no resistive load", "given")
		}
	}
	if q, ok := t.Float("load_mvar"); ok {
		t.Check("load_mvar", math.Abs(q))
		rs.LoadVar = t.SI("load_mvar", q)
		switch {
		case q > 0:
			ld.Study.Network.Load.L = v * v / (rs.LoadVar * w)
			ld.Note("receiving.load_mvar", fmt.Sprintf("%g Mvar: L = %.6g H in parallel", q, ld.Study.Network.Load.L), "given")
		case q < 0:
			ld.Study.Network.Load.C = -rs.LoadVar / (v * v * w)
			ld.Note("receiving.load_mvar", fmt.Sprintf("%g Mvar: C = %.6g uF in parallel", q, ld.Study.Network.Load.C*1e6), "given")
		default:
			ld.Note("receiving.load_mvar", "0 Mvar", "given")
		}
	}
	if t.Has("short_circuit_mva") || t.Has("x_over_r") {
		s := required(t, "short_circuit_mva", "short_circuit_mva = 8000")
		k := required(t, "x_over_r", "x_over_r = 10")
		t.Check("short_circuit_mva", s)
		t.Check("x_over_r", k)
		rs.ShortCircuitVA, rs.XOverR = t.SI("short_circuit_mva", s), k
		ld.Note("receiving.short_circuit_mva", fmt.Sprintf("%g MVA, X/R %g", s, k), "given")
	}
	rs.X0OverX1 = t.key("x0_over_x1").Def
	if k, ok := t.Num("x0_over_x1"); ok {
		if !ld.Failed() && rs.ShortCircuitVA == 0 {
			t.Errorf("x0_over_x1", "applies to the receiving-end system: give short_circuit_mva and x_over_r with it")
		}
		rs.X0OverX1 = k
		ld.noteNum(t, "x0_over_x1", k, "given")
	} else if rs.ShortCircuitVA > 0 {
		ld.noteNum(t, "x0_over_x1", rs.X0OverX1, "default")
	}
}

// build assembles the positive- and zero-sequence networks.
func (ld *Loader) build() {
	st := ld.Study
	st.Network.Source = freqscan.Source{R: st.Source.R, L: st.Source.L}
	st.Network.Line = st.Line
	// The receiving-end system, passive (EMF shorted) for the harmonic transfer from
	// the source: R-L from its short-circuit level and X/R, as the source.
	rs := st.Receiving
	if rs.ShortCircuitVA > 0 {
		st.Network.Far = freqscan.SourceAt(rs.ShortCircuitVA, st.Voltage, rs.XOverR, st.Frequency)
	}
	if st.Zero == nil {
		ld.Note("line (zero sequence)", "not given: triplen harmonics and switching need r0, l0|x0, c0|b0", "absent")
		return
	}
	k := st.Source.X0OverX1
	zn := freqscan.Network{
		Source: freqscan.Source{R: st.Source.R * k, L: st.Source.L * k},
		Line:   st.Zero,
		Shunts: append([]freqscan.Shunt(nil), st.Network.Shunts...),
		Far:    freqscan.Source{R: st.Network.Far.R * rs.X0OverX1, L: st.Network.Far.L * rs.X0OverX1},
	}
	st.ZeroNetwork = &zn
	far := ""
	if rs.ShortCircuitVA > 0 {
		far = fmt.Sprintf(", the receiving-end system impedance x %g", rs.X0OverX1)
	}
	ld.Note("zero-sequence network", fmt.Sprintf("source impedance x %g, the same shunts (solidly earthed unless [switching] gives a neutral reactor), no load%s", k, far), "built")
}

// scan reads [scan].
func (ld *Loader) scan(t *Table) {
	t.Known(scanKeys...)
	sc := &ld.Study.Scan
	f0 := ld.Study.Frequency
	note := func(key, val string, given bool) { ld.Note("scan."+key, val, givenHow(given)) }
	var ok bool
	m := ld.mark()
	if sc.FMin, ok = t.Num("f_min_hz"); !ok {
		sc.FMin = t.key("f_min_hz").Def
	}
	ld.noteNum(t, "f_min_hz", sc.FMin, givenHow(ok))
	if sc.FMax, ok = t.Float("f_max_hz"); !ok {
		sc.FMax = 50 * f0
	}
	t.Check("f_max_hz", sc.FMax)
	if !ld.failedSince(m) && !(sc.FMax > sc.FMin) {
		t.Errorf("f_max_hz", "must be > f_min_hz (%g), got %g", sc.FMin, sc.FMax)
	}
	ld.noteNum(t, "f_max_hz", sc.FMax, givenHow(ok))
	n, ok := t.Int("points")
	if !ok {
		n = int64(t.key("points").Def)
	}
	t.Check("points", float64(n))
	sc.Points = int(n)
	note("points", strconv.Itoa(sc.Points), ok)
	grid, ok := t.String("grid")
	if !ok {
		grid = "linear"
	}
	t.OneOf("grid", grid, "linear", "log")
	sc.Log = grid == "log"
	note("grid", grid, ok)

	hs, ok := t.Ints("watch_harmonics")
	if ok {
		sc.WatchHarmonics = make([]int, len(hs))
		for i, h := range hs {
			t.Check(fmt.Sprintf("watch_harmonics[%d]", i), float64(h))
			sc.WatchHarmonics[i] = int(h)
		}
	} else {
		for h := 3; h <= 25; h += 2 {
			sc.WatchHarmonics = append(sc.WatchHarmonics, h)
		}
	}
	note("watch_harmonics", fmt.Sprint(sc.WatchHarmonics), ok)
	if sc.GainLimit, ok = t.Num("gain_limit"); !ok {
		sc.GainLimit = t.key("gain_limit").Def
	}
	ld.noteNum(t, "gain_limit", sc.GainLimit, givenHow(ok))
	pct, ok := t.Float("watch_band_pct")
	if ok {
		if !(pct > 0 && pct < 50) {
			t.Errorf("watch_band_pct", "must be > 0 and < 50, got %g", pct)
		}
		t.Check("watch_band_pct", pct)
	} else {
		pct = t.key("watch_band_pct").Def
	}
	sc.WatchBand = pct / 100
	note("watch_band_pct", fmt.Sprintf("+-%g %%", pct), ok)
	sc.BackgroundPct = ld.harmonicTable(t, "background_pct")
	sc.PlanningPct = ld.harmonicTable(t, "planning_pct")
	if sc.BackgroundPct != nil {
		note("background_pct", harmonicList(sc.BackgroundPct, "%"), true)
	}
	if sc.PlanningPct != nil {
		note("planning_pct", harmonicList(sc.PlanningPct, "%"), true)
	}
	if r, ok := t.Floats("short_circuit_mva_range"); ok {
		if len(r) != 2 {
			t.Errorf("short_circuit_mva_range", "must be [min, max], got %d numbers", len(r))
		} else if b := t.key("short_circuit_mva_range").Bounds; !(r[0] > 0 && r[1] > r[0] && r[1] <= b.Hi) {
			t.Errorf("short_circuit_mva_range", "must be [min, max] with 0 < min < max <= %g, got [%g, %g]", b.Hi, r[0], r[1])
		} else if !(r[0] >= b.Lo) {
			t.Errorf("short_circuit_mva_range", "must be [min, max] with min >= %g MVA, got [%g, %g]", b.Lo, r[0], r[1])
		} else {
			sc.ShortCircuitRange = [2]float64{t.SI("short_circuit_mva_range", r[0]), t.SI("short_circuit_mva_range", r[1])}
			note("short_circuit_mva_range", fmt.Sprintf("%g to %g MVA", r[0], r[1]), true)
		}
	}
	steps, ok := t.Int("steps")
	if !ok {
		steps = int64(t.key("steps").Def)
	}
	t.Check("steps", float64(steps))
	sc.ShortCircuitSteps = int(steps)
	if sc.ShortCircuitRange[1] > 0 || ok {
		note("steps", strconv.Itoa(sc.ShortCircuitSteps), ok)
	}
	far, ok := t.Bool("far_system")
	sc.FarSystem = far || !ok
	switch {
	case ld.Study.Receiving.ShortCircuitVA == 0:
		if ok {
			note("far_system", fmt.Sprintf("%v (no receiving-end system given: [receiving] short_circuit_mva)", far), ok)
		}
	case sc.FarSystem:
		note("far_system", "true: the receiving-end system is in the scan", ok)
	default:
		note("far_system", "false: the receiving-end system is left out of the scan", ok)
		ld.Study.Network.Far = freqscan.Source{}
		if ld.Study.ZeroNetwork != nil {
			ld.Study.ZeroNetwork.Far = freqscan.Source{}
		}
	}
}

// harmonicTable reads an inline table keyed by harmonic number, e.g. { 5 = 1.5 }, with
// values in percent (0 to 100).
func (ld *Loader) harmonicTable(t *Table, key string) map[int]float64 {
	m := ld.mark()
	sub := t.Sub(key)
	if ld.failedSince(m) || !sub.Present() {
		return nil
	}
	out := map[int]float64{}
	keys := orderedKeys(sub.Map())
	for _, k := range keys {
		h, err := strconv.Atoi(k)
		if err != nil || h < 1 || h > 1000 {
			sub.Errorf(k, "must be a harmonic number 1 to 1000 as key, e.g. { 5 = 1.5, 7 = 1.0 }")
			continue
		}
		v, _ := sub.Float(k)
		b := t.key(key).Bounds
		sub.Between(k, v, b.Lo, b.Hi)
		out[h] = v
	}
	if ld.failedSince(m) {
		return nil
	}
	return out
}

// energise reads [energise].
func (ld *Loader) energise(t *Table) {
	t.Known(energiseKeys...)
	e := &ld.Study.Energise
	note := func(key, val string, given bool) { ld.Note("energise."+key, val, givenHow(given)) }
	var ok bool
	if e.Waveform, ok = t.String("waveform"); !ok {
		e.Waveform = "step"
	}
	t.OneOf("waveform", e.Waveform, "step", "sine")
	note("waveform", e.Waveform, ok)
	if e.CloseDeg, ok = t.Float("close_deg"); !ok {
		e.CloseDeg = t.key("close_deg").Def
	}
	t.Check("close_deg", e.CloseDeg)
	if e.Waveform == "sine" || ok {
		v := fmt.Sprintf("%g deg", e.CloseDeg)
		if e.Waveform != "sine" {
			v += " (used by waveform = \"sine\" only)"
		}
		note("close_deg", v, ok)
	}
	e.TrappedPU, ok = t.Num("trapped_pu")
	ld.noteNum(t, "trapped_pu", e.TrappedPU, givenHow(ok))
	md := ld.mark()
	ms, ok := t.Float("duration_ms")
	if !ok {
		ms = t.key("duration_ms").Def
	}
	t.Check("duration_ms", ms)
	e.Duration, e.DurationGiven = ms/1e3, ok // a division, not t.SI: ms*1e-3 may differ from ms/1e3 in the last bit
	if ok {
		ld.noteNum(t, "duration_ms", ms, "given")
	} else {
		note("duration_ms", "chosen from the network's slowest oscillation, at least 20 ms", ok)
	}
	us, ok := t.Float("time_step_us")
	t.NonNegative("time_step_us", us)
	if !ld.failedSince(md) && us > 0 {
		if n := ms * 1e3 / us; n > MaxSamples {
			t.Errorf("time_step_us", "gives %.0f samples over duration_ms = %g; at most %d, so time_step_us must be at least %g, got %g", n, ms, MaxSamples, ms*1e3/MaxSamples, us)
		}
		if us*1e-3 > ms {
			t.Errorf("time_step_us", "must be shorter than duration_ms (%g ms), got %g us", ms, us)
		}
	}
	t.Check("time_step_us", us)
	e.TimeStep = us / 1e6 // a division, not t.SI: us*1e-6 may differ from us/1e6 in the last bit
	if us == 0 {
		note("time_step_us", "0: chosen by the method", ok)
	} else {
		ld.noteNum(t, "time_step_us", us, givenHow(ok))
	}
	if e.Method, ok = t.String("method"); !ok {
		e.Method = "laplace"
	}
	t.OneOf("method", e.Method, "lattice", "bergeron", "laplace")
	note("method", e.Method, ok)
}
