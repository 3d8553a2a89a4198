package study

// Plausibility of a line section's constants: the wave velocity 1/sqrt(LC) and the
// lossless surge impedance sqrt(L/C) at frequency_hz. Faster than light is impossible
// (refused, naming the key most likely wrong); far outside the usual ranges of
// overhead lines and cables is warned about (Study.Warnings).

import (
	"fmt"
	"math"
	"strings"

	"github.com/telegrapher/telegrapher/propagation"
)

// lightSpeed is the speed of light in vacuum, m/s (exact, SI definition).
const lightSpeed = 299_792_458.0

// plausibleRange is what a kind of line usually has, and where a warning starts.
type plausibleRange struct {
	kind           string
	usualV, usualZ [2]float64 // common practice, for the message: velocity (c), Zc (ohm)
	warnV, warnZ   [2]float64 // outside these a value is far from usual: warned
}

// The usual ranges (common practice, no source): overhead lines propagate at 0.9 to
// 0.995 c with a positive-sequence surge impedance of 200 to 500 ohm; cables at 0.4 to
// 0.7 c with 15 to 60 ohm; the zero sequence of an overhead line, with its earth
// return, at about 0.6 to 0.9 c with 500 to 1200 ohm. Warnings start well outside
// them, so that a real line never warns: a cable's zero sequence (which depends on the
// sheath bonding) is not checked.
var (
	overheadRange = plausibleRange{kind: "an overhead line",
		usualV: [2]float64{0.9, 0.995}, usualZ: [2]float64{200, 500},
		warnV: [2]float64{0.85, 1}, warnZ: [2]float64{150, 700}}
	cableRange = plausibleRange{kind: "a cable",
		usualV: [2]float64{0.4, 0.7}, usualZ: [2]float64{15, 60},
		warnV: [2]float64{0.3, 0.8}, warnZ: [2]float64{8, 100}}
	overheadZeroRange = plausibleRange{kind: "the zero sequence of an overhead line",
		usualV: [2]float64{0.6, 0.9}, usualZ: [2]float64{500, 1200},
		warnV: [2]float64{0.5, 1}, warnZ: [2]float64{300, 2000}}
)

func (r plausibleRange) fits(v, z float64) bool {
	return v >= r.warnV[0] && v <= r.warnV[1] && z >= r.warnZ[0] && z <= r.warnZ[1]
}

func (r plausibleRange) usual() string {
	return fmt.Sprintf("%s (%g-%g c, %g-%g ohm)", r.kind, r.usualV[0], r.usualV[1], r.usualZ[0], r.usualZ[1])
}

// cableLikeV: below this velocity (fraction of c) a section unnamed as to its kind is
// taken for a cable (common practice, no source: overhead lines stay above 0.85 c).
const cableLikeV = 0.8

// sectionKind tells a cable or an overhead line from the section's name, or "".
func sectionKind(name string) string {
	n := strings.ToLower(name)
	switch {
	case strings.Contains(n, "cable"):
		return "cable"
	case strings.Contains(n, "overhead"), strings.Contains(n, "ohl"), strings.Contains(n, "aerial"):
		return "overhead"
	}
	return ""
}

// lineLC returns the inductance and capacitance per metre of c at frequency f (Hz):
// Im z/ω and Im y/ω.
func lineLC(c propagation.Constants, f float64) (l, cap float64) {
	w := 2 * math.Pi * f
	z, y := c.At(complex(0, w))
	return imag(z) / w, imag(y) / w
}

// plausible checks one section (t, named name) with its positive-sequence constants
// pos and zero-sequence constants zero (nil when not given). derived is true for
// constants computed from a geometry: those are warned about, never refused.
func (ld *Loader) plausible(t *Table, name string, pos, zero propagation.Constants, derived bool) {
	f := ld.Study.Frequency
	kind := sectionKind(name)
	l, c := lineLC(pos, f)
	v, z := 1/math.Sqrt(l*c)/lightSpeed, math.Sqrt(l/c)
	if !ld.faster(t, "", kind, l, c, derived) {
		var fit []plausibleRange
		switch {
		case kind == "cable":
			fit = []plausibleRange{cableRange}
		case kind == "overhead":
			fit = []plausibleRange{overheadRange}
		default:
			fit = []plausibleRange{overheadRange, cableRange}
		}
		ok := false
		for _, r := range fit {
			ok = ok || r.fits(v, z)
		}
		if !ok {
			var usual []string
			for _, r := range fit {
				usual = append(usual, r.usual())
			}
			how := "fit neither"
			if len(fit) == 1 {
				how = fmt.Sprintf("are far from what its name (%q) says it is,", name)
			}
			ld.Warnf(ld.suspectKey(t, "", kind, l, c, derived), "velocity %.3g c and surge impedance %.4g ohm at %g Hz (L %.4g mH/km, C %.4g nF/km%s) %s %s, common practice; check the value and its unit",
				v, z, f, l*1e6, c*1e12, derivedWord(derived), how, strings.Join(usual, " nor "))
		}
		if kind == "" {
			kind = "overhead"
			if v < cableLikeV {
				kind = "cable"
			}
		}
	}
	if zero == nil {
		return
	}
	l0, c0 := lineLC(zero, f)
	if ld.faster(t, "0", kind, l0, c0, derived) || kind != "overhead" {
		return
	}
	v0, z0 := 1/math.Sqrt(l0*c0)/lightSpeed, math.Sqrt(l0/c0)
	if !overheadZeroRange.fits(v0, z0) {
		ld.Warnf(ld.suspectKey(t, "0", kind, l0, c0, derived), "zero-sequence velocity %.3g c and surge impedance %.4g ohm at %g Hz (L0 %.4g mH/km, C0 %.4g nF/km%s) are far from %s, common practice; check the value and its unit",
			v0, z0, f, l0*1e6, c0*1e12, derivedWord(derived), overheadZeroRange.usual())
	}
}

func derivedWord(derived bool) string {
	if derived {
		return ", from the geometry"
	}
	return ""
}

// faster refuses per-length constants (sequence seq: "" or "0") whose wave velocity
// 1/sqrt(LC) exceeds the speed of light, and reports whether it did. A geometry's
// constants cannot exceed it (air is the fastest medium a tower has); were one to,
// through the numerics, it is warned about, never refused.
func (ld *Loader) faster(t *Table, seq, kind string, l, c float64, derived bool) bool {
	v := 1 / math.Sqrt(l*c)
	if !(v > lightSpeed) {
		return false
	}
	key := ld.suspectKey(t, seq, kind, l, c, derived)
	what := "positive-sequence"
	if seq == "0" {
		what = "zero-sequence"
	}
	if derived {
		ld.Warnf(key, "%s wave velocity %.4g km/s = %.4g c from the geometry, faster than light", what, v/1e3, v/lightSpeed)
		return true
	}
	lk, ck := ld.givenKey(t, "l"+seq+"_mh_per_km", "x"+seq+"_ohm_per_km"), ld.givenKey(t, "c"+seq+"_nf_per_km", "b"+seq+"_us_per_km")
	ld.Errorf(key, "the %s wave velocity 1/sqrt(LC) = %.4g km/s = %.4g c (L %.4g mH/km, C %.4g nF/km) is faster than light, which no line can be; check %s and %s and their units (nF/km, not uF/km; mH/km, not H/km)",
		what, v/1e3, v/lightSpeed, l*1e6, c*1e12, lk, ck)
	return true
}

// givenKey returns the full path of key, or of its alternative alt when that is the
// one the section gives.
func (ld *Loader) givenKey(t *Table, key, alt string) string {
	if !t.Has(key) && t.Has(alt) {
		return t.KeyPath(alt)
	}
	return t.KeyPath(key)
}

// suspectKey names the key most likely wrong when L and C (per metre) do not go
// together: the one further (on a log scale) from what a line of its kind has. The
// kind is read from C, which separates overhead lines (a few to 20 nF/km) from cables
// (50 to 1000 nF/km) by more than an order of magnitude; typical L is 0.6 to 5 mH/km
// overhead (zero sequence included), 0.1 to 1 mH/km in a cable (common practice, no
// source); a section whose kind is known (its name) uses that kind's ranges. On a tie
// the capacitance is named: nF against uF is the usual slip. For a
// geometry the geometry table is named.
func (ld *Loader) suspectKey(t *Table, seq, kind string, l, c float64, derived bool) string {
	if derived {
		if t.Has(geometryKey) {
			return t.KeyPath(geometryKey)
		}
		return t.Path()
	}
	lmh, cnf := l*1e6, c*1e12
	lr, cr := [2]float64{0.6, 5}, [2]float64{3, 20}
	if kind == "cable" || kind == "" && cnf >= 50 {
		lr, cr = [2]float64{0.1, 1}, [2]float64{50, 1000}
	}
	if logOutside(lmh, lr) > logOutside(cnf, cr) {
		return ld.givenKey(t, "l"+seq+"_mh_per_km", "x"+seq+"_ohm_per_km")
	}
	return ld.givenKey(t, "c"+seq+"_nf_per_km", "b"+seq+"_us_per_km")
}

// logOutside is how far x lies outside r on a log scale (0 inside).
func logOutside(x float64, r [2]float64) float64 {
	switch {
	case x < r[0]:
		return math.Log(r[0] / x)
	case x > r[1]:
		return math.Log(x / r[1])
	}
	return 0
}

// Warnf records a warning `key.path: problem` (Study.Warnings): a value the study
// may use but that is far from what such lines have.
func (ld *Loader) Warnf(key, format string, a ...any) {
	ld.Study.Warnings = append(ld.Study.Warnings, key+": "+fmt.Sprintf(format, a...))
}
