package waves

import (
	"context"
	"errors"
	"testing"
)

// A cancelled context stops the shots: RunContext and Simulate return
// context.Canceled, whether it was cancelled before the first shot or during the run.
func TestSwitchingCancelled(t *testing.T) {
	t.Parallel()
	tp, _ := swThreePhase(100, 0.01, 0.1, 0.5, 0.05)
	s := SwitchingSettings{Shots: 400, Seed: 3, Duration: 0.01, Workers: 1}
	sim, err := NewSwitchingSimulator(tp, s)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name   string
		afterN int // cancel once this many shots are done; 0 = before the run
		useRun bool
	}{
		{"before, RunContext", 0, true},
		{"during, RunContext", 3, true},
		{"before, Simulate", 0, false},
		{"during, Simulate", 3, false},
	} {
		ctx, cancel := context.WithCancel(context.Background())
		if tc.afterN == 0 {
			cancel()
		}
		done := 0
		progress := func(d int) {
			done = d
			if d == tc.afterN {
				cancel()
			}
		}
		if tc.useRun {
			_, err = sim.RunContext(ctx, DrawShots(s), 1, progress)
		} else {
			_, err = sim.Simulate(ctx, progress)
		}
		cancel()
		if !errors.Is(err, context.Canceled) {
			t.Errorf("%s: error %v, want context.Canceled", tc.name, err)
		}
		// One worker: the shot under way when cancelled is the last.
		if done > tc.afterN+1 {
			t.Errorf("%s: %d shots ran after the cancellation at %d", tc.name, done-tc.afterN, tc.afterN)
		}
	}
}

// Simulate gives the shots of Switching (which builds its own simulator).
func TestSimulateMatchesSwitching(t *testing.T) {
	t.Parallel()
	tp, _ := swThreePhase(100, 0.01, 0.1, 0.5, 0.05)
	s := SwitchingSettings{Shots: 20, Seed: 5, Duration: 0.01}
	want, err := Switching(tp, s, nil)
	if err != nil {
		t.Fatal(err)
	}
	sim, err := NewSwitchingSimulator(tp, s)
	if err != nil {
		t.Fatal(err)
	}
	got, err := sim.Simulate(context.Background(), nil)
	if err != nil {
		t.Fatal(err)
	}
	for i := range want.Shots {
		if got.Shots[i].Peak != want.Shots[i].Peak {
			t.Fatalf("shot %d: peaks %v, want %v (identical: the same simulation)", i, got.Shots[i].Peak, want.Shots[i].Peak)
		}
	}
}

// Setting errors carry the setting they concern, read with errors.As, and still
// wrap their sentinel.
func TestSettingErrors(t *testing.T) {
	t.Parallel()
	tp, n := swThreePhase(100, 0.01, 0.1, 0.5, 0.05)
	for _, tc := range []struct {
		name     string
		err      error
		setting  string
		sentinel error
	}{
		{"switching time step", func() error {
			_, err := NewSwitchingSimulator(tp, SwitchingSettings{Shots: 1, Duration: 0.01, TimeStep: 1})
			return err
		}(), "TimeStep", ErrSwitching},
		{"switching shots", func() error {
			_, err := NewSwitchingSimulator(tp, SwitchingSettings{Shots: 0, Duration: 0.01})
			return err
		}(), "Shots", ErrSwitching},
		{"neutral reactor without a reactor", func() error {
			tp := tp
			tp.Shunts, tp.NeutralL = nil, [2]float64{0, 1}
			_, err := NewSwitchingSimulator(tp, SwitchingSettings{Shots: 1, Duration: 0.01})
			return err
		}(), "NeutralL[1]", ErrSwitching},
		{"energisation duration", func() error {
			_, err := Bergeron(n, Energisation{Excitation: Step, Omega: 314, Duration: -1}, BergeronOptions{})
			return err
		}(), "Duration", ErrSettings},
		{"energisation time step", func() error {
			_, err := Bergeron(n, Energisation{Excitation: Step, Omega: 314, Duration: 0.02, TimeStep: 0.01}, BergeronOptions{})
			return err
		}(), "TimeStep", ErrSettings},
	} {
		var se *SettingError
		if !errors.As(tc.err, &se) {
			t.Errorf("%s: %v is not a *SettingError", tc.name, tc.err)
			continue
		}
		if se.Setting != tc.setting {
			t.Errorf("%s: setting %q, want %q", tc.name, se.Setting, tc.setting)
		}
		if !errors.Is(tc.err, tc.sentinel) {
			t.Errorf("%s: %v does not wrap %v", tc.name, tc.err, tc.sentinel)
		}
	}
}
