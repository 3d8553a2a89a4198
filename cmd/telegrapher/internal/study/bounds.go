package study

// Bounds of the [switching] and [[switching.arrester]] keys beyond those ParseSwitching
// checks as it reads them: smaller values are not physical and break the numerics (a
// pre-insertion resistor of 1e-320 ohm, a neutral reactor of 1e-320 ohm, a time step
// of 1e-320 us). README's [switching] table lists them.

import (
	"fmt"
	"math"
)

// switchingBound is the range of one [switching] key as the user writes it; zeroOK
// lets 0 stand for "none" beside the range.
type switchingBound struct {
	key    string
	lo, hi float64
	zeroOK bool
}

var switchingBounds = []switchingBound{
	{"close_deg", -360, 360, false},
	{"preinsertion_ohm", 1, 1e5, true},
	{"preinsertion_ms", 0.01, 100, false},
	{"siwl_kv", 1, 1e4, true},
	{"ks", 1, 2, false},
	{"kcd", 1, 2, false},
	{"duration_ms", 0.01, 1e4, false},
	{"time_step_us", 1e-3, 1e4, true},
	{"neutral_reactor_sending_ohm", 1, 1e6, true},
	{"neutral_reactor_receiving_ohm", 1, 1e6, true},
	{"dead_time_ms", 0.01, 1e4, true},
}

// Bounds of an arrester (rated voltage Ur, rms kV; a V-I table's points).
var (
	arresterKVBounds = [2]float64{1, 2000}
	viCurrentKA      = [2]float64{1e-6, 1000}
	viVoltageKV      = [2]float64{1, 1e4}
)

// checkSwitchingBounds checks the numbers of a [switching] table (tbl, decoded TOML)
// already read by ParseSwitching against switchingBounds and the arrester bounds.
func checkSwitchingBounds(file string, tbl map[string]any) error {
	for _, b := range switchingBounds {
		x, ok := swFloat(tbl[b.key])
		if !ok || (b.zeroOK && x == 0) || (x >= b.lo && x <= b.hi) {
			continue
		}
		zero := ""
		if b.zeroOK {
			zero = "0 or "
		}
		return swErrorf(file, "switching."+b.key, "must be %sbetween %s and %s, got %s", zero, num(b.lo), num(b.hi), num(x))
	}
	list, _ := swTables(tbl["arrester"])
	for i, a := range list {
		ap := fmt.Sprintf("switching.arrester[%d]", i)
		if x, ok := swFloat(a["rated_kv"]); ok && !(x >= arresterKVBounds[0] && x <= arresterKVBounds[1]) {
			return swErrorf(file, ap+".rated_kv", "must be between %s and %s kV, got %s", num(arresterKVBounds[0]), num(arresterKVBounds[1]), num(x))
		}
		rows, _ := a["vi_ka_kv"].([]any)
		for j, r := range rows {
			pair, _ := r.([]any)
			if len(pair) != 2 {
				continue
			}
			i, _ := swFloat(pair[0])
			v, _ := swFloat(pair[1])
			if !(i >= viCurrentKA[0] && i <= viCurrentKA[1] && v >= viVoltageKV[0] && v <= viVoltageKV[1]) || math.IsNaN(i+v) {
				return swErrorf(file, fmt.Sprintf("%s.vi_ka_kv[%d]", ap, j), "must be a pair [current_ka, voltage_kv] with current %s to %s kA and voltage %s to %s kV, got %v",
					num(viCurrentKA[0]), num(viCurrentKA[1]), num(viVoltageKV[0]), num(viVoltageKV[1]), r)
			}
		}
	}
	return nil
}
