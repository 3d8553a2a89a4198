package waves

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
)

// A chosen step never exceeds the shortest travel time, even where the sample cap of
// the default choice would stretch it (a short line over a long run): a 10 m line over
// 20 ms runs at the travel time, an open-ended line from an ideal source still doubles
// the step; a run too long for any accepted step is refused naming the duration.
func TestBergeronChosenStepShortLine(t *testing.T) {
	t.Parallel()
	short := func(length float64) freqscan.Network {
		n := testNetwork(0.03, 0, 0)
		n.Line = propagation.Cascade{{Length: length, Constants: propagation.RLGC{R: 0.03e-3, L: testL, C: testC}}}
		return n
	}
	w, err := Bergeron(short(10), stepSettings(20e-3, 0), BergeronOptions{})
	if err != nil {
		t.Fatalf("10 m line, 20 ms, chosen step: %v", err)
	}
	tau := 10 * math.Sqrt(testL*testC) / 2 // the half-line pieces
	if w.Step > tau*(1+1e-12) {
		t.Errorf("step %g s exceeds the shortest travel time %g s", w.Step, tau)
	}
	// Open end from an ideal source: the receiving end settles near 1 pu after
	// ringing up to at most 2 pu (lossless limit; the line's resistance damps it).
	peak := 0.0
	for _, v := range w.Receiving {
		peak = math.Max(peak, math.Abs(v))
	}
	if !(peak > 1.5 && peak <= 2+1e-9) {
		t.Errorf("receiving-end peak %g pu, want between 1.5 and 2", peak)
	}
	_, err = Bergeron(short(10), stepSettings(5, 0), BergeronOptions{})
	if !errors.Is(err, ErrSettings) || !strings.Contains(err.Error(), "duration_ms") || strings.Contains(err.Error(), "time step") {
		t.Errorf("10 m line over 5 s: err %v, want a settings error naming duration_ms", err)
	}
}
