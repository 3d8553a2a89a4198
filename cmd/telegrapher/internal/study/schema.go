package study

// The schema: one table of every key of the study file with its unit, SI factor,
// bounds, default and help text. The parsers read numbers through it (Table.Num,
// Table.Check: the bounds and their messages; Table.SI: the conversion; Loader.noteNum:
// the `check` listing in the key's unit), the map-based parsers of [conductors],
// [line.geometry] and [switching] take their bounds from it, and README's key tables
// are written from it (TestREADMEKeyTables fails when README.md differs; run it with
// -update to rewrite them).

import (
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"

	"github.com/telegrapher/telegrapher/waves"
)

// Key is one key of the study file.
type Key struct {
	Table string // the table holding it: "" (top level), "line", "shunt", "conductors.NAME", "line.geometry.phases", ...
	Name  string // the key itself, e.g. "length_km"

	Unit   string  // the unit the file writes it in, as `check` prints it ("Hz", "uS/km"); "" for ratios and text
	SI     float64 // factor from Unit to SI (kV to V: 1e3); 0 for a key that is not a quantity
	Bounds Bounds  // the range of a number as the file writes it
	Def    float64 // the default of a number, in Unit (see Default for the text)
	Alt    string  // the alternative key in the same table (l_mh_per_km or x_ohm_per_km); one of them, not both

	// README's key tables.
	Default string // the default column: "required", "none", a value; "" = Def
	Rule    string // the rule column; {range}, {lo} and {hi} stand for the bounds, {range KEY} for another key's (path as in Path)
	Row     string // the key column when it is not just the key (alternatives and pairs in one row)
	DocUnit string // the unit column when it is not Unit
	Hidden  bool   // listed in another key's row (the x of "l or x")
	Cost    string // [levers]: the cost units
}

// Path is the key's path in the schema: its table and name, "line.length_km"; a table
// of an array ([[shunt]]) or a named table ([conductors.NAME]) without the index.
func (k *Key) Path() string {
	if k.Table == "" {
		return k.Name
	}
	return k.Table + "." + k.Name
}

// Bounds is the range of a number. The messages name the first bound the value
// breaks, in this order: the sign (Positive, NonNegative), the upper bound (AtMostFirst),
// then the range [Lo, Hi] (or 0 when ZeroOK). Lo = Hi = 0 is no range.
type Bounds struct {
	Lo, Hi      float64
	ZeroOK      bool // 0 stands for none beside [Lo, Hi]
	Positive    bool // "must be > 0" before the range
	NonNegative bool // "must be >= 0" before the range
	AtMostFirst bool // "must be at most Hi" before the range
}

// hasRange reports whether b has a range beside its sign.
func (b Bounds) hasRange() bool { return b.Lo != 0 || b.Hi != 0 }

// problem returns what v breaks in b, "" when nothing, in the words of Table.Positive,
// Table.NonNegative, Table.AtMost, Table.Between and Table.ZeroOr.
func (b Bounds) problem(v float64) string {
	in := v >= b.Lo && v <= b.Hi
	switch {
	case b.Positive && !(v > 0):
		return fmt.Sprintf("must be > 0, got %s", num(v))
	case b.NonNegative && !(v >= 0):
		return fmt.Sprintf("must be >= 0, got %s", num(v))
	case b.AtMostFirst && !(v <= b.Hi):
		return fmt.Sprintf("must be at most %s, got %s", num(b.Hi), num(v))
	case !b.hasRange():
		return ""
	case b.ZeroOK:
		if v != 0 && !in {
			return fmt.Sprintf("must be 0 or between %s and %s, got %s", num(b.Lo), num(b.Hi), num(v))
		}
	case !in:
		return fmt.Sprintf("must be between %s and %s, got %s", num(b.Lo), num(b.Hi), num(v))
	}
	return ""
}

// Physical limits kept beside the schema because several keys share them.
const (
	maxCoreRatio  = 0.9 // core over outer diameter of a tube: a wall of at least 5 %
	maxEarthWires = 4
	maxBundle     = 12 // subconductors
)

// Schema is every key of the study file, table by table in README's order.
var Schema = []*Key{
	// System
	{Name: "title", Unit: "text", Default: "none", Rule: "string"},
	{Name: "frequency_hz", Unit: "Hz", SI: 1, Bounds: Bounds{Lo: 1, Hi: 1e4, Positive: true, AtMostFirst: true}, Default: "required", Rule: "{range}"},
	{Name: "voltage_kv", Unit: "kV", SI: 1e3, Bounds: Bounds{Lo: 1, Hi: 2000, Positive: true, AtMostFirst: true}, Default: "required", Rule: "{range}; the source EMF is at this voltage"},
	{Name: "us_kv", Unit: "kV", SI: 1e3, Bounds: Bounds{Hi: 2000, Positive: true, AtMostFirst: true}, Default: "`voltage_kv`", Rule: "highest voltage for equipment (IEC 60071-1), `voltage_kv` to {hi}"},

	// [line], and each [[line.sections]] entry (name: a section's only)
	{Table: "line", Name: "name", Unit: "text", Hidden: true},
	{Table: "line", Name: "length_km", Unit: "km", SI: 1e3, Bounds: Bounds{Lo: 0.01, Hi: 1e4, Positive: true, AtMostFirst: true}, Default: "required", Rule: "{range}"},
	{Table: "line", Name: "r_ohm_per_km", Unit: "ohm/km", SI: 1e-3, Bounds: Bounds{Lo: 1e-6, Hi: 1000, ZeroOK: true, NonNegative: true}, Default: "required", Rule: "0 (lossless) or {lo} to {hi}; positive-sequence series resistance"},
	{Table: "line", Name: "l_mh_per_km", Unit: "mH/km", SI: 1e-6, Bounds: Bounds{Lo: 1e-4, Hi: 100, Positive: true}, Alt: "x_ohm_per_km",
		Row: "`l_mh_per_km` or `x_ohm_per_km`", DocUnit: "mH/km or ohm/km at `frequency_hz`", Default: "one required", Rule: "{range} mH/km (x: the same inductance at `frequency_hz`); not both"},
	{Table: "line", Name: "x_ohm_per_km", Unit: "ohm/km", SI: 1e-3, Bounds: Bounds{Positive: true}, Alt: "l_mh_per_km", Hidden: true},
	{Table: "line", Name: "c_nf_per_km", Unit: "nF/km", SI: 1e-12, Bounds: Bounds{Lo: 1e-3, Hi: 1e4, Positive: true}, Alt: "b_us_per_km",
		Row: "`c_nf_per_km` or `b_us_per_km`", DocUnit: "nF/km or µS/km at `frequency_hz`", Default: "one required", Rule: "{range} nF/km (b: the same capacitance at `frequency_hz`); not both; with l, slower than light (below)"},
	{Table: "line", Name: "b_us_per_km", Unit: "uS/km", SI: 1e-9, Bounds: Bounds{Positive: true}, Alt: "c_nf_per_km", Hidden: true},
	{Table: "line", Name: "g_us_per_km", Unit: "uS/km", SI: 1e-9, Bounds: Bounds{Lo: 1e-6, Hi: 1e4, ZeroOK: true, NonNegative: true}, Default: "0", Rule: "{range}"},
	{Table: "line", Name: "r0_ohm_per_km", Unit: "ohm/km", SI: 1e-3, Bounds: Bounds{Lo: 1e-6, Hi: 1000, ZeroOK: true, NonNegative: true},
		Row: "`r0_ohm_per_km`, `l0_mh_per_km` or `x0_ohm_per_km`, `c0_nf_per_km` or `b0_us_per_km`, `g0_us_per_km`", DocUnit: "as above", Default: "absent",
		Rule: "zero sequence, the same bounds: if any is given, r0, l0 or x0, and c0 or b0 are all needed"},
	{Table: "line", Name: "l0_mh_per_km", Unit: "mH/km", SI: 1e-6, Bounds: Bounds{Lo: 1e-4, Hi: 100, Positive: true}, Alt: "x0_ohm_per_km", Hidden: true},
	{Table: "line", Name: "x0_ohm_per_km", Unit: "ohm/km", SI: 1e-3, Bounds: Bounds{Positive: true}, Alt: "l0_mh_per_km", Hidden: true},
	{Table: "line", Name: "c0_nf_per_km", Unit: "nF/km", SI: 1e-12, Bounds: Bounds{Lo: 1e-3, Hi: 1e4, Positive: true}, Alt: "b0_us_per_km", Hidden: true},
	{Table: "line", Name: "b0_us_per_km", Unit: "uS/km", SI: 1e-9, Bounds: Bounds{Positive: true}, Alt: "c0_nf_per_km", Hidden: true},
	{Table: "line", Name: "g0_us_per_km", Unit: "uS/km", SI: 1e-9, Bounds: Bounds{Lo: 1e-6, Hi: 1e4, ZeroOK: true, NonNegative: true}, Hidden: true},

	// [source]
	{Table: "source", Name: "short_circuit_mva", Unit: "MVA", SI: 1e6, Bounds: Bounds{Lo: 1, Hi: 1e7, Positive: true, AtMostFirst: true},
		Row: "`short_circuit_mva` with `x_over_r`", DocUnit: "MVA, ratio", Rule: "{range} MVA, X/R {range source.x_over_r}: \\|Z\\| = V²/S, R = \\|Z\\|/sqrt(1+(X/R)²), X = R·X/R, L = X/ω; no c-factor"},
	{Table: "source", Name: "x_over_r", SI: 1, Bounds: Bounds{Lo: 0.1, Hi: 1e4, Positive: true, AtMostFirst: true}, Hidden: true},
	{Table: "source", Name: "r_ohm", Unit: "ohm", SI: 1, Bounds: Bounds{Lo: 1e-6, Hi: 1e6, ZeroOK: true, NonNegative: true},
		Row: "or `r_ohm` with `l_mh` (or `x_ohm` at `frequency_hz`)", DocUnit: "ohm, mH", Rule: "each {range} (x: the same inductance); `l_mh = 0` is a resistive source"},
	{Table: "source", Name: "l_mh", Unit: "mH", SI: 1e-3, Bounds: Bounds{Lo: 1e-6, Hi: 1e6, ZeroOK: true, NonNegative: true}, Alt: "x_ohm", Hidden: true},
	{Table: "source", Name: "x_ohm", Unit: "ohm", SI: 1, Bounds: Bounds{NonNegative: true}, Alt: "l_mh", Hidden: true},
	{Table: "source", Name: "x0_over_x1", SI: 1, Bounds: Bounds{Lo: 0.01, Hi: 100, Positive: true}, Def: 1, DocUnit: "ratio", Rule: "{range}, default 1: zero- over positive-sequence source impedance"},

	// [[shunt]]
	{Table: "shunt", Name: "name", Rule: "optional text"},
	{Table: "shunt", Name: "at", Rule: "`\"sending\"` or `\"receiving\"` (required)"},
	{Table: "shunt", Name: "connection", Rule: "`\"line\"` (switched with the line, the usual EHV reactor) or `\"bus\"` (required)"},
	{Table: "shunt", Name: "mvar", Unit: "Mvar", SI: 1e6, Bounds: Bounds{Lo: 1e-3, Hi: 1e5},
		Rule: "rating at `voltage_kv` and `frequency_hz`, > 0 reactor, < 0 capacitor, {range} in size: X = V²/\\|Q\\|, L = X/ω or C = 1/(ωX)"},
	{Table: "shunt", Name: "q_factor", SI: 1, Bounds: Bounds{Lo: 1, Hi: 1e5, Positive: true}, Rule: "optional, {range}: X/R at `frequency_hz`, R = X/q in series, constant; absent = lossless"},

	// [receiving]
	{Table: "receiving", Name: "load_mw", Unit: "MW", SI: 1e6, Bounds: Bounds{Lo: 1e-3, Hi: 1e7, ZeroOK: true, NonNegative: true}, Rule: "{range}: constant-impedance load, R = V²/P"},
	{Table: "receiving", Name: "load_mvar", Unit: "Mvar", SI: 1e6, Bounds: Bounds{Lo: 1e-3, Hi: 1e7, ZeroOK: true},
		Rule: "{range} in size, in parallel: L = V²/(Qω) for Q > 0, C = \\|Q\\|/(V²ω) for Q < 0"},
	{Table: "receiving", Name: "short_circuit_mva", Unit: "MVA", SI: 1e6, Bounds: Bounds{Lo: 1, Hi: 1e7, Positive: true, AtMostFirst: true},
		Row: "`short_circuit_mva` with `x_over_r`", Rule: "the receiving-end system (the far system), for loadability and in the scan; {range} MVA, X/R {range receiving.x_over_r}; R-L as for the source"},
	{Table: "receiving", Name: "x_over_r", SI: 1, Bounds: Bounds{Lo: 0.1, Hi: 1e4, Positive: true, AtMostFirst: true}, Hidden: true},
	{Table: "receiving", Name: "x0_over_x1", SI: 1, Bounds: Bounds{Hi: 1000, Positive: true, AtMostFirst: true}, Def: 1,
		Rule: "> 0, at most {hi}, default 1: its zero- over positive-sequence impedance (needs `short_circuit_mva`)"},

	// [scan]
	{Table: "scan", Name: "f_min_hz", Unit: "Hz", SI: 1, Bounds: Bounds{Lo: 1e-3, Hi: 1e7, Positive: true}, Def: 1, Rule: "{range}"},
	{Table: "scan", Name: "f_max_hz", Unit: "Hz", SI: 1, Bounds: Bounds{Lo: math.Inf(-1), Hi: 1e7, AtMostFirst: true}, Default: "50 × `frequency_hz`", Rule: "> `f_min_hz`, at most {hi}"},
	{Table: "scan", Name: "points", Bounds: Bounds{Lo: 2, Hi: MaxScanPoints}, Def: 5000, Rule: "integer, {range}"},
	{Table: "scan", Name: "grid", Default: "`\"linear\"`", Rule: "`\"linear\"` or `\"log\"`"},
	{Table: "scan", Name: "watch_harmonics", Bounds: Bounds{Lo: 1, Hi: 1000}, Default: "3, 5, ..., 25", Rule: "integers {range}"},
	{Table: "scan", Name: "gain_limit", SI: 1, Bounds: Bounds{Lo: 1e-3, Hi: 1e6, Positive: true}, Def: 2, Default: "2.0", Rule: "{range}"},
	{Table: "scan", Name: "watch_band_pct", Unit: "%", SI: 1e-2, Bounds: Bounds{Lo: 0.1, Hi: 49}, Def: 10, Rule: "{range}: the band ± around each watched harmonic"},
	{Table: "scan", Name: "background_pct", Unit: "%", Bounds: Bounds{Lo: 0, Hi: 100}, Default: "none", Rule: "inline table by harmonic number, e.g. `{ 5 = 1.5, 7 = 1.0 }`, {lo} to {hi} %"},
	{Table: "scan", Name: "planning_pct", Unit: "%", Bounds: Bounds{Lo: 0, Hi: 100}, Default: "IEC TR 61000-3-6 indicative levels", Rule: "same form"},
	{Table: "scan", Name: "short_circuit_mva_range", Unit: "MVA", SI: 1e6, Bounds: Bounds{Lo: 1, Hi: 1e7}, Default: "none", Rule: "`[min, max]`, {lo} <= min < max <= {hi}: source-strength map"},
	{Table: "scan", Name: "steps", Bounds: Bounds{Lo: 2, Hi: 200}, Def: 20, Rule: "integer {range}: steps of that map"},
	{Table: "scan", Name: "far_system", Default: "true", Rule: "`false` leaves the receiving-end system (`[receiving] short_circuit_mva`) out of the scan, said in the output"},

	// [energise]
	{Table: "energise", Name: "waveform", Default: "`\"step\"`", Rule: "`\"step\"` (1 pu step of EMF at t = 0) or `\"sine\"`"},
	{Table: "energise", Name: "close_deg", Unit: "deg", Bounds: Bounds{Lo: -360, Hi: 360}, Def: 90, Rule: "{range}; EMF phase angle at closing, `sine` only"},
	{Table: "energise", Name: "trapped_pu", Unit: "pu", Bounds: Bounds{Lo: -2, Hi: 2}, Def: 0, Rule: "{range}; line voltage at the closing instant"},
	{Table: "energise", Name: "duration_ms", Unit: "ms", SI: 1e-3, Bounds: Bounds{Lo: 1e-3, Hi: 1e4, Positive: true, AtMostFirst: true}, Def: 20, Default: "from the network, at least 20", Rule: "{range}"},
	{Table: "energise", Name: "time_step_us", Unit: "us", SI: 1e-6, Bounds: Bounds{Lo: 1e-3, Hi: 1e4, ZeroOK: true, NonNegative: true}, Def: 0,
		Rule: "0 = chosen by the method, or {lo} to {hi}, shorter than `duration_ms`; at most 10 000 000 samples"},
	{Table: "energise", Name: "method", Default: "`\"laplace\"`", Rule: "`\"lattice\"`, `\"bergeron\"` or `\"laplace\"`"},

	// [loading]
	{Table: "loading", Name: "thermal_rating_a", Unit: "A", SI: 1, Bounds: Bounds{Lo: 1, Hi: 1e6, Positive: true},
		Row: "`[loading] thermal_rating_a`", DocUnit: "A per phase", Default: "none",
		Rule: "{range}: the line's current rating; the thermal limit √3·`voltage_kv`·I (as power at unity power factor) joins the loadability curve"},

	// [conductors.NAME]
	{Table: "conductors.NAME", Name: "outer_diameter_mm", Unit: "mm", SI: 1e-3, Bounds: Bounds{Lo: 1, Hi: 200}, Default: "required", Rule: "{range}"},
	{Table: "conductors.NAME", Name: "core_diameter_mm", Unit: "mm", SI: 1e-3, Def: 0,
		Rule: "0 to " + num(maxCoreRatio) + " × `outer_diameter_mm`: non-conducting core of a tube (steel-core approximation); 0 = solid"},
	{Table: "conductors.NAME", Name: "dc_ohm_per_km", Unit: "ohm/km", SI: 1e-3, Bounds: Bounds{Lo: 1e-3, Hi: 100}, Default: "required", Rule: "{range}; d.c. resistance at the operating temperature"},

	// [line.geometry]
	{Table: "line.geometry", Name: "earth_resistivity_ohm_m", Unit: "ohm·m", SI: 1, Bounds: Bounds{Lo: 0.1, Hi: 1e6}, Default: "required", Rule: "{range}, homogeneous earth"},
	{Table: "line.geometry", Name: "transposed", Unit: "bool", Default: "true", Rule: "false keeps the phase matrices: sequence constants are the diagonal of the sequence matrices"},
	{Table: "line.geometry", Name: "phases", Unit: "array of wires", Default: "required", Rule: "exactly 3 (single circuit)"},
	{Table: "line.geometry", Name: "earth_wires", Unit: "array of wires", Default: "none",
		Rule: "at most " + strconv.Itoa(maxEarthWires) + "; continuous, earthed at every tower, eliminated by Kron reduction"},

	// a wire of phases and earth_wires
	{Table: "line.geometry.phases", Name: "x_m", Unit: "m", SI: 1, Bounds: Bounds{Lo: -200, Hi: 200}, Default: "required", Rule: "within ±{hi}"},
	{Table: "line.geometry.phases", Name: "height_m", Unit: "m", SI: 1, Bounds: Bounds{Lo: 1, Hi: 300}, Default: "required", Rule: "{range}, at the tower; mean height `height_m - 2/3 sag_m`"},
	{Table: "line.geometry.phases", Name: "sag_m", Unit: "m", SI: 1, Def: 0, Rule: ">= 0, < `height_m`"},
	{Table: "line.geometry.phases", Name: "conductor", Unit: "name", Default: "required", Rule: "a `[conductors.NAME]` table"},
	{Table: "line.geometry.phases", Name: "bundle", Unit: "count", Bounds: Bounds{Lo: 1, Hi: maxBundle}, Def: 1, Rule: "integer {range}"},
	{Table: "line.geometry.phases", Name: "bundle_spacing_mm", Unit: "mm", SI: 1e-3, Bounds: Bounds{Hi: 2000}, Def: 0, Rule: "with `bundle` > 1 only: above the conductor diameter, at most {hi}"},

	// [switching]; the bounds of the numbers are checked in this order after the
	// table is read (ParseSwitching)
	{Table: "switching", Name: "shots", Unit: "count", Bounds: Bounds{Lo: 1, Hi: waves.MaxShots}, Def: 200, Rule: "integer {range}"},
	{Table: "switching", Name: "seed", Unit: "integer", Def: 1, Rule: "any integer (it only picks the random sequence)"},
	{Table: "switching", Name: "close_deg", Unit: "deg", Bounds: Bounds{Lo: -360, Hi: 360}, Default: "random", Rule: "{range}: phase a EMF angle at the mean closing instant; absent = uniform over one cycle"},
	{Table: "switching", Name: "pole_sigma_ms", Unit: "ms", SI: 1e-3, Bounds: Bounds{Lo: 0, Hi: 20}, Def: 1, Default: "1.0", Rule: "{lo} to {hi}"},
	{Table: "switching", Name: "trapped_pu", Unit: "pu", Bounds: Bounds{Lo: -10, Hi: 10}, Default: "[0, 0, 0]",
		Rule: "three numbers (a, b, c) within ±{hi}: each phase's line voltage at the opening, with zero current in the line and its reactors (reactor current zero: the crest of the ring-down); it rings down through `dead_time_ms`"},
	{Table: "switching", Name: "preinsertion_ohm", Unit: "ohm", SI: 1, Bounds: Bounds{Lo: 1, Hi: 1e5, ZeroOK: true}, Def: 0, Rule: "0 = none, or {lo} to {hi}"},
	{Table: "switching", Name: "preinsertion_ms", Unit: "ms", SI: 1e-3, Bounds: Bounds{Lo: 0.01, Hi: 100}, Def: 8, Rule: "{range}"},
	{Table: "switching", Name: "siwl_kv", Unit: "kV peak", SI: 1e3, Bounds: Bounds{Lo: 1, Hi: 1e4, ZeroOK: true}, Def: 0, Default: "0 (none)",
		Rule: "0, or {lo} to {hi}; with `us_kv` <= 245 (range I) `switching` refuses it (exit 2) and the report's switching section says why; the other commands run"},
	{Table: "switching", Name: "ks", SI: 1, Bounds: Bounds{Lo: 1, Hi: 2}, Def: 1.15, Rule: "{range} (IEC 60071-2: 1.15 internal, 1.05 external insulation)"},
	{Table: "switching", Name: "kcd", SI: 1, Bounds: Bounds{Lo: 1, Hi: 2}, Def: 1.1, Rule: "{range}"},
	{Table: "switching", Name: "duration_ms", Unit: "ms", SI: 1e-3, Bounds: Bounds{Lo: 0.01, Hi: 1e4}, Def: 20, Rule: "{range}; from the last pole's last contact"},
	{Table: "switching", Name: "time_step_us", Unit: "µs", SI: 1e-6, Bounds: Bounds{Lo: 1e-3, Hi: 1e4, ZeroOK: true}, Def: 0, Rule: "0 = chosen by the method, or {lo} to {hi}"},
	{Table: "switching", Name: "neutral_reactor_sending_ohm", Unit: "ohm", SI: 1, Bounds: Bounds{Lo: 1, Hi: 1e6, ZeroOK: true}, Def: 0,
		Row: "`neutral_reactor_sending_ohm`, `neutral_reactor_receiving_ohm`", DocUnit: "ohm at `frequency_hz`",
		Rule: "0, or {lo} to {hi}: neutral reactor between the star point of that end's line-connected reactors and earth; 0 = solidly earthed"},
	{Table: "switching", Name: "neutral_reactor_receiving_ohm", Unit: "ohm", SI: 1, Bounds: Bounds{Lo: 1, Hi: 1e6, ZeroOK: true}, Def: 0, Hidden: true},
	{Table: "switching", Name: "dead_time_ms", Unit: "ms", SI: 1e-3, Bounds: Bounds{Lo: 0.01, Hi: waves.MaxDeadTime * 1e3, ZeroOK: true}, Def: DefaultDeadTimeMs,
		Rule: "0, or {lo} to {hi}: reclosing dead time, from the opening to the mean closing instant (300 ms: three-phase auto-reclosing, common practice); 0 = the line holds `trapped_pu` at the closing; changes nothing without trapped charge"},
	{Table: "switching", Name: "controlled_closing", Unit: "bool", Default: "false",
		Rule: "controlled (point-on-wave) closing: each pole aims at the least voltage across its contacts (EMF minus the line-side voltage as the dead time leaves it, ringing or d.c.) within two cycles of the command, over its scatter, instead of random closing"},
	{Table: "switching", Name: "controlled_sigma_ms", Unit: "ms", SI: 1e-3, Bounds: Bounds{Lo: 0, Hi: 20}, Def: 1, Default: "1.0",
		Rule: "{lo} to {hi}: scatter of each pole's closing instant about its aim (normal, truncated at 3σ); with `controlled_closing = true` only"},

	// [[switching.arrester]]
	{Table: "switching.arrester", Name: "at", Rule: "`\"sending\"` (line side of the breaker) or `\"receiving\"`"},
	{Table: "switching.arrester", Name: "rated_kv", Unit: "kV", SI: 1e3, Bounds: Bounds{Lo: 1, Hi: 2000}, DocUnit: "kV rms", Rule: "{range}: scales a typical metal-oxide curve; or"},
	{Table: "switching.arrester", Name: "vi_ka_kv", DocUnit: "[[kA, kV peak], ...]",
		Rule: "at least two points, current and voltage both increasing, currents {range switching.arrester.vi_ka_kv.current} kA, voltages {range switching.arrester.vi_ka_kv.voltage} kV"},
	{Table: "switching.arrester.vi_ka_kv", Name: "current", Unit: "kA", SI: 1e3, Bounds: Bounds{Lo: 1e-6, Hi: 1000}, Hidden: true},
	{Table: "switching.arrester.vi_ka_kv", Name: "voltage", Unit: "kV", SI: 1e3, Bounds: Bounds{Lo: 1, Hi: 1e4}, Hidden: true},
	{Table: "switching.arrester", Name: "name", Unit: "text", Rule: "optional"},

	// [targets]
	{Table: "targets", Name: "max_open_end_pu", Unit: "pu", Bounds: Bounds{Lo: 0.5, Hi: 10, Positive: true}, Rule: "{range}: no-load \\|Vr/Vs\\| at `frequency_hz`, with the line-connected shunts"},
	{Table: "targets", Name: "max_gain_watched", Bounds: Bounds{Lo: 0.1, Hi: 1e4, Positive: true}, Rule: "{range}: largest gain \\|Vr/E\\| within ±`scan.watch_band_pct` of a watched harmonic"},
	{Table: "targets", Name: "max_u2_pu", Unit: "pu", Bounds: Bounds{Lo: 1, Hi: 10, Positive: true}, Rule: "{range}: switching u2 (IEC 60071-1 base); needs zero-sequence data"},
	{Table: "targets", Name: "min_margin_pct", Unit: "%", Bounds: Bounds{Lo: -100, Hi: 1000}, Rule: "{range}: least margin to `switching.siwl_kv`; needs zero-sequence data and `siwl_kv`"},

	// [levers]
	{Table: "levers", Name: "reactor_mvar_sending", Unit: "Mvar", SI: 1e6, Bounds: Bounds{Lo: 1e-3, Hi: 1e5},
		Row: "`reactor_mvar_sending`, `reactor_mvar_receiving`", Cost: "30 per end + 1 per Mvar",
		Rule: "`[min, max]`, 0 <= min <= max <= {hi}, each end 0 or at least {lo}: none, or a line-connected reactor (X/R 300) added within the range"},
	{Table: "levers", Name: "reactor_mvar_receiving", Unit: "Mvar", SI: 1e6, Bounds: Bounds{Lo: 1e-3, Hi: 1e5}, Hidden: true},
	{Table: "levers", Name: "preinsertion_ohm", Unit: "ohm", SI: 1, Bounds: Bounds{Lo: 1, Hi: 1e5}, Cost: "60", Rule: "`[min, max]`, max <= {hi}, each end 0 or at least {lo}"},
	{Table: "levers", Name: "controlled_closing", Unit: "bool", Cost: "40", Rule: "each pole closes where the voltage across its contacts is zero"},
	{Table: "levers", Name: "controlled_sigma_ms", Unit: "ms", SI: 1e-3, Bounds: Bounds{Hi: 20, NonNegative: true, AtMostFirst: true}, Def: 1,
		Rule: "{lo} to {hi}, default 1; with `controlled_closing = true` only"},
	{Table: "levers", Name: "arresters_kv", Unit: "kV", SI: 1e3, Bounds: Bounds{Lo: 1, Hi: 2000}, DocUnit: "kV rms", Cost: "15", Rule: "list of rated voltages, {range}: arresters at both line ends"},
}

// tableKeys returns the names of the schema's keys of table, in the schema's order:
// the keys a parser knows in that table.
func tableKeys(table string) []string {
	var names []string
	for _, k := range Schema {
		if k.Table == table {
			names = append(names, k.Name)
		}
	}
	return names
}

// schemaIndex finds a key by its path.
var schemaIndex = func() map[string]*Key {
	m := make(map[string]*Key, len(Schema))
	for _, k := range Schema {
		if m[k.Path()] != nil {
			panic("study: the schema has " + k.Path() + " twice")
		}
		m[k.Path()] = k
	}
	return m
}()

// lookup returns the schema's key at path; a key the schema lacks is a programmer
// error and panics.
func lookup(path string) *Key {
	k := schemaIndex[path]
	if k == nil {
		panic("study: no key " + path + " in the schema")
	}
	return k
}

// indexSuffix matches the index of an array element in a key path, "[3]".
var indexSuffix = regexp.MustCompile(`\[\d+\]`)

// schemaPath turns a key path of the file (line.sections[2].length_km,
// shunt[0].mvar, scan.watch_harmonics[4]) into the schema's (line.length_km,
// shunt.mvar, scan.watch_harmonics).
func schemaPath(path string) string {
	p := indexSuffix.ReplaceAllString(path, "")
	if rest, ok := strings.CutPrefix(p, "line.sections."); ok {
		p = "line." + rest
	}
	return p
}

// key returns the schema's entry of key in this table.
func (t *Table) key(key string) *Key { return lookup(schemaPath(t.KeyPath(key))) }

// Check records the first bound of the schema that v, the value at key, breaks.
func (t *Table) Check(key string, v float64) {
	if p := t.key(key).Bounds.problem(v); p != "" {
		t.Errorf(key, "%s", p)
	}
}

// Num returns the number at key, checked against its bounds in the schema, and
// whether it is given; in the unit of the key (SI converts).
func (t *Table) Num(key string) (float64, bool) {
	v, ok := t.Float(key)
	if ok {
		t.Check(key, v)
	}
	return v, ok
}

// SI converts v, the value at key in the key's unit, to SI units.
func (t *Table) SI(key string, v float64) float64 { return v * t.key(key).SI }

// noteNum notes the value v at key for `check` in the key's unit, with how.
func (ld *Loader) noteNum(t *Table, key string, v float64, how string) {
	ld.Note(t.KeyPath(key), strings.TrimSpace(num(v)+" "+t.key(key).Unit), how)
}

// givenHow is "given" or "default".
func givenHow(given bool) string {
	if given {
		return "given"
	}
	return "default"
}
