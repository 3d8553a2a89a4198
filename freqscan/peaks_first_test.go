package freqscan

import "testing"

// FirstResonance skips a local maximum that does not magnify (gain <= 1) and takes the
// lowest peak that does, or an unbounded one.
func TestFirstResonance(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		name  string
		peaks []Peak
		want  float64 // F of the first resonance; 0 = none
	}{
		{"none", nil, 0},
		{"only a shallow bump", []Peak{{F: 1.3, Gain: 0.16}}, 0},
		{"bump then resonance", []Peak{{F: 1.3, Gain: 0.16}, {F: 362, Gain: 15.8}, {F: 743, Gain: 18.3}}, 362},
		{"unbounded", []Peak{{F: 2, Gain: 0.5}, {F: 250, Unbounded: true}}, 250},
		{"gain exactly 1 does not magnify", []Peak{{F: 100, Gain: 1}, {F: 200, Gain: 1.01}}, 200},
	} {
		p, ok := FirstResonance(tc.peaks)
		if ok != (tc.want > 0) || p.F != tc.want {
			t.Errorf("%s: got %v (ok %v), want F = %g", tc.name, p.F, ok, tc.want)
		}
	}
}
