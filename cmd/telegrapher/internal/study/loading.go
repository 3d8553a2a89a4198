package study

// [loading]: settings of the loading analysis beyond the contract's.
//
//	[loading]
//	thermal_rating_a = 2000   # the line's current rating (A per phase); optional
//
// With a rating the loadability curve also has the thermal limit
// sqrt(3)·voltage_kv·thermal_rating_a, which governs short lines.

import "fmt"

// LoadingSettings is [loading] in SI units.
type LoadingSettings struct {
	ThermalRating float64 // A per phase; 0 = no thermal limit
}

// loading reads [loading] into Study.Loading.
func (ld *Loader) loading(t *Table) {
	if !t.Present() {
		return
	}
	t.Known("thermal_rating_a")
	if a, ok := t.Num("thermal_rating_a"); ok {
		ld.Study.Loading.ThermalRating = t.SI("thermal_rating_a", a)
		ld.Note("loading.thermal_rating_a", fmt.Sprintf("%g A per phase = %.4g MVA at voltage_kv", a, 1.7320508075688772*ld.Study.Voltage*a/1e6), "given")
	}
}
