package analysis

import (
	"context"
	"errors"
	"path/filepath"
	"testing"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
)

func load(t *testing.T, name string) *study.Study {
	t.Helper()
	st, err := study.Load(filepath.Join("..", "..", "..", "..", "testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	return st
}

// A cancelled context makes the long computations return context.Canceled.
func TestCancelled(t *testing.T) {
	t.Parallel()
	st := load(t, "switching_study.toml")
	cancelled, cancel := context.WithCancel(context.Background())
	cancel()
	for _, tc := range []struct {
		name string
		run  func() error
	}{
		{"scan", func() error { _, err := Scan(cancelled, st); return err }},
		{"source strength", func() error { _, err := SourceStrength(cancelled, st); return err }},
		{"switching, before the first shot", func() error { _, err := Switching(cancelled, st, nil); return err }},
		{"switching, during the shots", func() error {
			ctx, cancel := context.WithCancel(context.Background())
			defer cancel()
			_, err := Switching(ctx, st, func(done, total int, pass string) { cancel() })
			return err
		}},
		{"switching figures", func() error {
			ml, err := ModalLine(st)
			if err != nil {
				return err
			}
			_, err = SwitchingFiguresOf(cancelled, st, ml, false, 0)
			return err
		}},
	} {
		if err := tc.run(); !errors.Is(err, context.Canceled) {
			t.Errorf("%s: error %v, want context.Canceled", tc.name, err)
		}
	}
}

// The remedy's switching figures (SwitchingFiguresOf) are those of the switching
// study (Switching) on the same study: one computation.
func TestSwitchingFiguresOfIsSwitching(t *testing.T) {
	t.Parallel()
	st := load(t, "switching_study.toml")
	st.Switching.Shots = 40
	sw, err := Switching(context.Background(), st, nil)
	if err != nil {
		t.Fatal(err)
	}
	ml, err := ModalLine(st)
	if err != nil {
		t.Fatal(err)
	}
	f, err := SwitchingFiguresOf(context.Background(), st, ml, false, 0)
	if err != nil {
		t.Fatal(err)
	}
	if f.Stats != sw.Figures.Stats {
		t.Errorf("figures %+v, want the switching study's %+v", f.Stats, sw.Figures.Stats)
	}
	if (f.Margin == nil) != (sw.Figures.Margin == nil) || (f.Margin != nil && *f.Margin != *sw.Figures.Margin) {
		t.Errorf("margin %v, want %v", f.Margin, sw.Figures.Margin)
	}
}

// A setting the library refuses is an input error naming its study key (the
// settingKeys table), per command.
func TestSettingKeys(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		name string
		edit func(*study.Study)
		run  func(*study.Study) error
		key  string
	}{
		{"switching time step beyond the travel time", func(st *study.Study) { st.Switching.TimeStep = 5e-3 },
			func(st *study.Study) error { _, err := Switching(context.Background(), st, nil); return err },
			"switching.time_step_us"},
		{"energise time step longer than the duration", func(st *study.Study) {
			st.Energise.TimeStep, st.Energise.Duration, st.Energise.DurationGiven = 0.05, 0.02, true
		},
			func(st *study.Study) error {
				e, _ := Energisation(st)
				_, _, _, err := EnergiseWaveform(st, "laplace", e)
				return err
			},
			"energise.time_step_us"},
		{"energise bergeron time step beyond the travel time", func(st *study.Study) { st.Energise.TimeStep = 5e-3 },
			func(st *study.Study) error {
				e, _ := Energisation(st)
				_, _, _, err := EnergiseWaveform(st, "bergeron", e)
				return err
			},
			"energise.time_step_us"},
	} {
		st := load(t, "switching_study.toml")
		tc.edit(st)
		err := tc.run(st)
		var ie *InputError
		if !errors.As(err, &ie) {
			t.Errorf("%s: error %v, want an *InputError", tc.name, err)
			continue
		}
		if ie.Key != tc.key {
			t.Errorf("%s: key %q, want %q (%v)", tc.name, ie.Key, tc.key, err)
		}
	}
}

// A method that cannot treat the study is a *MethodError, an input error.
func TestMethodError(t *testing.T) {
	t.Parallel()
	st := load(t, "switching_study.toml") // an inductive source: no lattice diagram
	e, _ := Energisation(st)
	_, _, _, err := EnergiseWaveform(st, "lattice", e)
	var me *MethodError
	if !errors.As(err, &me) || me.Method != "lattice" || !IsInputError(err) {
		t.Fatalf("error %v, want a *MethodError of lattice", err)
	}
}
