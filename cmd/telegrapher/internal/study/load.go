package study

// The study loader: Load/Parse read a TOML study file, check every key, convert to SI
// units once, fill the documented defaults and build the line and network models.
//
// # The tables, in a fixed order
//
// load reads the tables in one explicit order: the system keys, [conductors] (the
// named conductor types, handed to the line as a typed map), [line] with its sections
// and geometries, [source], [[shunt]], [receiving]; then, with the models built,
// [scan], [energise], [levers], [loading], [switching] and [targets] (which is given
// the levers read before it). Each parser reads its table through a *Table (typed,
// checked, the key path in messages), records its problems in the Loader, notes what
// it understood for `check` (Study.Understood), and writes its part of the Study.
// The keys, their units, SI factors, bounds and defaults are in the schema
// (schema.go); README's key tables are written from it.
//
// Errors: a parser returns an error (any type; it is kept as an input error with its
// text) or records one with t.Errorf / ld.Errorf, whose text is `FILE: key.path:
// problem, got X`. Never panic on user data.

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"

	"github.com/BurntSushi/toml"
	"github.com/telegrapher/telegrapher/propagation"
)

// Limits of a study file.
const (
	MaxFileBytes  = 1 << 20    // the file size cap, 1 MiB
	MaxScanPoints = 1_000_000  // [scan] points
	MaxSamples    = 10_000_000 // [energise] duration_ms / time_step_us
	MaxShunts     = 100        // [[shunt]] entries
	MaxSections   = 1000       // [[line.sections]] entries
)

// Keys of the core study file.
var (
	rootKeys     = []string{"title", "frequency_hz", "voltage_kv", "us_kv", "line", "source", "shunt", "receiving", "scan", "energise", "conductors", "levers", "loading", "switching", "targets"}
	constantKeys = []string{"r_ohm_per_km", "l_mh_per_km", "x_ohm_per_km", "c_nf_per_km", "b_us_per_km", "g_us_per_km"}
	zeroKeys     = []string{"r0_ohm_per_km", "l0_mh_per_km", "x0_ohm_per_km", "c0_nf_per_km", "b0_us_per_km", "g0_us_per_km"}
	sectionKeys  = tableKeys("line") // name (of a section), length_km, the constants
	lineOnlyKeys = []string{"sections"}
	// geometryKey is the sub-table of [line] and of every [[line.sections]] entry that
	// gives the section's constants from the tower instead of the per-length keys.
	geometryKey   = "geometry"
	sourceKeys    = tableKeys("source")
	shuntKeys     = tableKeys("shunt")
	receivingKeys = tableKeys("receiving")
	scanKeys      = tableKeys("scan")
	energiseKeys  = tableKeys("energise")
)

// Load reads and validates the study file at path. Every error is an *Error naming
// the file, and the key path or line.
func Load(path string) (*Study, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, &Error{File: path, Msg: "cannot read the study file: " + plainOSError(err)}
	}
	defer f.Close()
	if fi, err := f.Stat(); err == nil && fi.IsDir() {
		return nil, &Error{File: path, Msg: "cannot read the study file: it is a directory"}
	}
	data, err := io.ReadAll(io.LimitReader(f, MaxFileBytes+1))
	if err != nil {
		return nil, &Error{File: path, Msg: "cannot read the study file: " + plainOSError(err)}
	}
	return Parse(path, data)
}

func plainOSError(err error) string {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err.Error()
	}
	return err.Error()
}

// Parse validates the study file contents data; name is the file name for messages.
func Parse(name string, data []byte) (*Study, error) {
	if len(data) > MaxFileBytes {
		return nil, &Error{File: name, Msg: fmt.Sprintf("the study file is larger than %d bytes (1 MiB); a study file is a few kilobytes", MaxFileBytes)}
	}
	if len(bytes.TrimSpace(data)) == 0 {
		return nil, &Error{File: name, Msg: "the study file is empty; give at least frequency_hz, voltage_kv and [line]"}
	}
	var m map[string]any
	if _, err := toml.NewDecoder(bytes.NewReader(data)).Decode(&m); err != nil {
		var pe toml.ParseError
		if errors.As(err, &pe) {
			return nil, &Error{File: name, Line: max(pe.Position.Line, 1), Msg: "syntax error: " + pe.Message}
		}
		return nil, &Error{File: name, Line: 1, Msg: "syntax error: " + err.Error()}
	}
	if len(m) == 0 {
		return nil, &Error{File: name, Msg: "the study file is empty (comments only); give at least frequency_hz, voltage_kv and [line]"}
	}
	ld := &Loader{File: name, Study: &Study{File: name}}
	ld.root = &Table{ld: ld, m: m}
	if err := ld.load(); err != nil {
		return nil, err
	}
	return ld.Study, nil
}

// load reads the tables in their fixed order and returns every problem found. The
// system keys feed every later table, so a problem there stops the load; a problem in
// the conductors stops the line, and a problem in the line, source, shunts or receiving
// end stops the models and the tables read after them ([levers], [loading],
// [switching] and [targets] rely on the models), while [scan] and [energise] are
// checked in any case.
func (ld *Loader) load() (err error) {
	root := ld.root
	root.Known(rootKeys...)
	top := ld.mark() // an unknown top-level key breaks no model
	m := top
	ld.system(root)
	if ld.failedSince(m) {
		return ld.Err()
	}
	m = ld.mark()
	conds := ld.conductors(root.Sub("conductors"))
	if !ld.failedSince(m) {
		ld.line(root.Sub("line"), conds)
	}
	ld.source(root.Sub("source"))
	ld.shunts(root)
	ld.receiving(root.Sub("receiving"))
	modelsOK := !ld.failedSince(top)
	if modelsOK {
		ld.build()
	}
	ld.scan(root.Sub("scan"))
	ld.energise(root.Sub("energise"))
	if modelsOK {
		lv, leversGiven := ld.levers(root.Sub("levers"))
		ld.loading(root.Sub("loading"))
		ld.switching(root.Sub("switching"))
		ld.targets(root.Sub("targets"), lv, leversGiven)
	}
	return ld.Err()
}

// required returns the number at key, recording "missing" with an example when absent.
func required(t *Table, key, example string) float64 {
	v, ok := t.Float(key)
	if !ok && !t.Has(key) {
		t.Errorf(key, "missing: give it, e.g. %s", example)
	}
	return v
}

func (ld *Loader) system(root *Table) {
	st := ld.Study
	if s, ok := root.String("title"); ok {
		st.Title = s
		ld.Note("title", fmt.Sprintf("%q", s), "given")
	}
	f := required(root, "frequency_hz", "frequency_hz = 50")
	root.Check("frequency_hz", f)
	mv := ld.mark()
	v := required(root, "voltage_kv", "voltage_kv = 400")
	root.Check("voltage_kv", v)
	vOK := !ld.failedSince(mv)
	st.Frequency, st.Voltage = root.SI("frequency_hz", f), root.SI("voltage_kv", v)
	ld.noteNum(root, "frequency_hz", f, "given")
	ld.Note("voltage_kv", fmt.Sprintf("%g kV line-to-line rms", v), "given")
	mu := ld.mark()
	if us, ok := root.Num("us_kv"); ok {
		if vOK && !ld.failedSince(mu) && us < v {
			root.Errorf("us_kv", "the highest voltage for equipment must be >= voltage_kv (%g), got %g", v, us)
		}
		st.Us = root.SI("us_kv", us)
		ld.noteNum(root, "us_kv", us, "given")
	} else {
		st.Us = st.Voltage
		ld.Note("us_kv", fmt.Sprintf("%g kV", v), "default: voltage_kv")
	}
}

// omega returns the angular system frequency in rad/s.
func (ld *Loader) omega() float64 { return 2 * math.Pi * ld.Study.Frequency }

// line reads [line]: either one section (its keys in [line]) or [[line.sections]].
// Each section is checked on its own; the line is built only when all are good.
func (ld *Loader) line(t *Table, conds map[string]propagation.Conductor) {
	if !t.Present() {
		if !ld.keys["line"] {
			ld.Errorf("line", "missing: give the line, e.g. [line] with length_km, r_ohm_per_km, l_mh_per_km and c_nf_per_km")
		}
		return
	}
	m := ld.mark()
	if t.Has("sections") {
		for _, k := range orderedKeys(t.Map()) {
			if k != "sections" {
				t.Errorf(k, "with [[line.sections]] every key goes into a section; [line] holds only the sections")
				return // one mistake: the first such key stands for all
			}
		}
		secs := t.Subs("sections")
		if ld.failedSince(m) {
			return
		}
		if len(secs) == 0 {
			t.Errorf("sections", "must have at least one section")
			return
		}
		if len(secs) > MaxSections {
			t.Errorf("sections", "must have at most %d sections, got %d", MaxSections, len(secs))
			return
		}
		var pos, zero propagation.Cascade
		ref := -1 // the first good section, which says whether zero-sequence data is given
		for i, s := range secs {
			p, z := ld.section(s, true, conds)
			if p == nil {
				continue
			}
			if ref < 0 {
				ref = i
			} else if (z != nil) != (len(zero) > 0) {
				s.Errorf("r0_ohm_per_km", "zero-sequence constants must be given for every section or for none (sections[%d] %s them, this one %s them)", ref, haveWord(len(zero) > 0), haveWord(z != nil))
				continue
			}
			pos = append(pos, *p)
			if z != nil {
				zero = append(zero, *z)
			}
		}
		if ld.failedSince(m) {
			return
		}
		ld.Study.Line, ld.Study.Zero = pos, zero
		ld.Note("line.length_km", fmt.Sprintf("%g km in %d sections", pos.Length()/1e3, len(pos)), "sum of the sections")
		return
	}
	p, z := ld.section(t, false, conds)
	if p == nil {
		return
	}
	ld.Study.Line = propagation.Cascade{*p}
	if z != nil {
		ld.Study.Zero = propagation.Cascade{*z}
	}
}

func haveWord(b bool) string {
	if b {
		return "has"
	}
	return "lacks"
}

// section reads one section's keys (the single [line] or one [[line.sections]] entry)
// and returns its positive-sequence line and, when given, its zero-sequence line; nil
// when the section has a problem (recorded). conds are the conductor types a geometry
// names.
func (ld *Loader) section(t *Table, named bool, conds map[string]propagation.Conductor) (pos, zero *propagation.Line) {
	m := ld.mark()
	known := append([]string{}, sectionKeys...)
	if !named {
		known = known[1:] // no name in a single-section [line]
		known = append(known, lineOnlyKeys...)
	}
	known = append(known, geometryKey)
	t.Known(known...)
	var name string
	if named {
		name, _ = t.String("name")
	}
	length := required(t, "length_km", "length_km = 320")
	t.Check("length_km", length)
	ld.noteNum(t, "length_km", length, "given")
	if named && name != "" {
		ld.Note(t.KeyPath("name"), fmt.Sprintf("%q", name), "given")
	}
	if t.Has(geometryKey) {
		for _, k := range append(append([]string{}, constantKeys...), zeroKeys...) {
			if t.Has(k) {
				t.Errorf(k, "the per-length constants and %s exclude each other; give one or the other", t.KeyPath(geometryKey))
				return nil, nil
			}
		}
		p, z, err := ld.geometry(t, t.Sub(geometryKey), conds)
		ld.Fail(t.KeyPath(geometryKey), err)
		if ld.failedSince(m) {
			return nil, nil
		}
		if p == nil {
			t.Errorf(geometryKey, "gives no line constants")
			return nil, nil
		}
		ld.plausible(t, name, p, z, true)
		pos = &propagation.Line{Name: name, Length: t.SI("length_km", length), Constants: p}
		if z != nil {
			zero = &propagation.Line{Name: name, Length: t.SI("length_km", length), Constants: z}
		}
		return pos, zero
	}
	rl := ld.rlgc(t, "", "positive-sequence")
	anyZero := false
	for _, k := range zeroKeys {
		anyZero = anyZero || t.Has(k)
	}
	var z propagation.RLGC
	if anyZero {
		z = ld.rlgc(t, "0", "zero-sequence")
	}
	if ld.failedSince(m) {
		return nil, nil
	}
	if anyZero {
		ld.plausible(t, name, rl, z, false)
	} else {
		ld.plausible(t, name, rl, nil, false)
	}
	if ld.failedSince(m) {
		return nil, nil
	}
	pos = &propagation.Line{Name: name, Length: t.SI("length_km", length), Constants: rl}
	if anyZero {
		zero = &propagation.Line{Name: name, Length: t.SI("length_km", length), Constants: z}
	}
	return pos, zero
}

// rlgc reads r, l|x, c|b, g with the sequence suffix seq ("" or "0") and converts to SI.
func (ld *Loader) rlgc(t *Table, seq, what string) propagation.RLGC {
	w := ld.omega()
	rk, lk, xk := "r"+seq+"_ohm_per_km", "l"+seq+"_mh_per_km", "x"+seq+"_ohm_per_km"
	ck, bk, gk := "c"+seq+"_nf_per_km", "b"+seq+"_us_per_km", "g"+seq+"_us_per_km"
	var p propagation.RLGC
	missing := func(key, ex string) {
		if seq == "0" {
			t.Errorf(key, "missing: zero-sequence constants need r0_ohm_per_km, l0_mh_per_km (or x0_ohm_per_km) and c0_nf_per_km (or b0_us_per_km); e.g. %s", ex)
		} else {
			t.Errorf(key, "missing: give the %s series resistance, e.g. %s", what, ex)
		}
	}
	if r, ok := t.Num(rk); ok {
		p.R = r / 1e3 // a division, not t.SI: r*1e-3 may differ from r/1e3 in the last bit
		ld.noteNum(t, rk, r, "given")
	} else if !t.Has(rk) {
		missing(rk, rk+" = 0.03")
	}

	switch t.Exclusive(lk, t.key(lk).Alt) {
	case lk:
		l, _ := t.Num(lk)
		p.L = t.SI(lk, l)
		ld.noteNum(t, lk, l, "given")
	case xk:
		x, _ := t.Num(xk)
		ld.throughOmega(t, xk, x, w*1e-3, t.key(lk))
		p.L = x / w / 1e3
		ld.Note(t.KeyPath(lk), fmt.Sprintf("%.6g mH/km", p.L*1e6), fmt.Sprintf("from %s = %g ohm/km at %g Hz", xk, x, ld.Study.Frequency))
	default:
		if !t.Has(lk) && !t.Has(xk) { // else: both given, reported by Exclusive
			if seq == "0" {
				missing(lk, lk+" = 3.0")
			} else {
				t.Errorf(lk, "missing: give the %s inductance %s or reactance %s, e.g. %s = 0.95", what, lk, xk, lk)
			}
		}
	}
	switch t.Exclusive(ck, t.key(ck).Alt) {
	case ck:
		c, _ := t.Num(ck)
		p.C = t.SI(ck, c)
		ld.noteNum(t, ck, c, "given")
	case bk:
		b, _ := t.Num(bk)
		ld.throughOmega(t, bk, b, w*1e-3, t.key(ck))
		p.C = b * 1e-6 / w / 1e3
		ld.Note(t.KeyPath(ck), fmt.Sprintf("%.6g nF/km", p.C*1e12), fmt.Sprintf("from %s = %g uS/km at %g Hz", bk, b, ld.Study.Frequency))
	default:
		if !t.Has(ck) && !t.Has(bk) {
			if seq == "0" {
				missing(ck, ck+" = 7.5")
			} else {
				t.Errorf(ck, "missing: give the %s capacitance %s or susceptance %s, e.g. %s = 12", what, ck, bk, ck)
			}
		}
	}
	if g, ok := t.Num(gk); ok {
		p.G = t.SI(gk, g)
		ld.noteNum(t, gk, g, "given")
	} else {
		ld.noteNum(t, gk, 0, "default")
	}
	return p
}

// throughOmega checks a reactance or susceptance v at key, given at frequency_hz,
// against the bounds of the inductance or capacitance (the schema's key of) it stands
// for (v = k·x with k = ω in the units at hand), and names the key as given with the
// bounds in its own unit.
func (ld *Loader) throughOmega(t *Table, key string, v, k float64, of *Key) {
	b := of.Bounds
	if x := v / k; !(x >= b.Lo && x <= b.Hi) {
		t.Errorf(key, "must be between %.6g and %.6g %s (%s to %s %s at %g Hz), got %s",
			b.Lo*k, b.Hi*k, t.key(key).Unit, num(b.Lo), num(b.Hi), of.Unit, ld.Study.Frequency, num(v))
	}
}
