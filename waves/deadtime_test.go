package waves

import (
	"bufio"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
)

// deadLine is a de-energised test line with its line-connected reactors: per-length
// sequence constants (per km), reactors as rating (Mvar at kV, Hz) and q factor, a
// neutral reactor (ohm at Hz) per end.
type deadLine struct {
	kv, hz, km         float64
	r1, l1, c1         float64 // ohm/km, mH/km, nF/km
	r0, l0, c0         float64
	g1, g0             float64    // µS/km
	mvar, q            [2]float64 // sending, receiving; 0 = no reactor
	neutralOhm         [2]float64
	trapped            [3]float64
	deadTime, timeStep float64 // s
	sections           int     // equal sections in cascade; 0 = 1
}

// circuit returns the three-phase circuit (ideal source; the source does not matter
// with the poles open) and the settings of a ring-down.
func (d deadLine) circuit(t *testing.T) (ThreePhase, SwitchingSettings) {
	t.Helper()
	w := 2 * math.Pi * d.hz
	var pos, zero propagation.Cascade
	ns := max(d.sections, 1)
	for i := 0; i < ns; i++ {
		m := d.km * 1e3 / float64(ns)
		pos = append(pos, propagation.Line{Length: m, Constants: propagation.RLGC{R: d.r1 / 1e3, L: d.l1 * 1e-6, C: d.c1 * 1e-12, G: d.g1 * 1e-9}})
		zero = append(zero, propagation.Line{Length: m, Constants: propagation.RLGC{R: d.r0 / 1e3, L: d.l0 * 1e-6, C: d.c0 * 1e-12, G: d.g0 * 1e-9}})
	}
	ml, err := NewModalLine(pos, zero, w)
	if err != nil {
		t.Fatal(err)
	}
	tp := ThreePhase{Omega: w, EMFPeak: d.kv * 1e3 * math.Sqrt2 / math.Sqrt(3), Line: ml, X0OverX1: 1}
	for e := 0; e < 2; e++ {
		if d.mvar[e] == 0 {
			continue
		}
		x := d.kv * d.kv / d.mvar[e] // ohm: (kV)²/Mvar
		tp.Shunts = append(tp.Shunts, freqscan.Shunt{End: freqscan.End(e), OnLine: true, L: x / w, R: x / d.q[e]})
		tp.NeutralL[e] = d.neutralOhm[e] / w
	}
	return tp, SwitchingSettings{Shots: 1, Duration: 0.01, TrappedPU: d.trapped, DeadTime: d.deadTime, TimeStep: d.timeStep}
}

// ringDownWave steps the de-energised line from the opening for span seconds with
// the simulator's own step (all poles open) and returns the sending- and
// receiving-end voltages (pu) after every step, index 0 the opening.
func ringDownWave(sim *SwitchingSimulator, span float64) (send, recv [3][]float64) {
	st := sim.openingState(sim.trappedV())
	nj := len(sim.endNode)
	n := int(math.Round(span / sim.dt))
	for i := 0; i <= n; i++ {
		if i > 0 {
			sim.advance(st, sim.topo[0], [3]float64{})
		}
		for k := 0; k < 3; k++ {
			send[k] = append(send[k], st.v[sim.endNode[0][k]]/sim.net.EMFPeak)
			recv[k] = append(recv[k], st.v[sim.endNode[nj-1][k]]/sim.net.EMFPeak)
		}
	}
	return send, recv
}

// ringFrequency returns the mean frequency (Hz) of the oscillation x sampled every dt
// from its zero crossings (linear interpolation between samples), and the ratio of
// the largest |x| in the last period to the largest in the first.
func ringFrequency(x []float64, dt float64) (f, decay float64) {
	var cross []float64
	for i := 1; i < len(x); i++ {
		if (x[i-1] < 0) != (x[i] < 0) {
			cross = append(cross, (float64(i-1)+x[i-1]/(x[i-1]-x[i]))*dt)
		}
	}
	if len(cross) < 3 {
		return 0, 0
	}
	f = float64(len(cross)-1) / 2 / (cross[len(cross)-1] - cross[0])
	per := int(math.Round(1 / f / dt))
	peak := func(a []float64) (m float64) {
		for _, v := range a {
			m = math.Max(m, math.Abs(v))
		}
		return m
	}
	return f, peak(x[len(x)-per:]) / peak(x[:per])
}

// readDeadTimeRef reads an ngspice ring-down table: t, then va, vb, vc at the sending
// end and at the receiving end.
func readDeadTimeRef(t *testing.T, path string) (tt []float64, v [6][]float64) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	sc.Scan() // header
	for sc.Scan() {
		p := strings.Split(sc.Text(), ",")
		x, err := strconv.ParseFloat(p[0], 64)
		if err != nil {
			t.Fatal(err)
		}
		tt = append(tt, x)
		for i := range v {
			y, err := strconv.ParseFloat(p[i+1], 64)
			if err != nil {
				t.Fatal(err)
			}
			v[i] = append(v[i], y)
		}
	}
	return tt, v
}

// The ring-down of the de-energised line through a 300 ms dead time agrees with an
// ngspice transient of the same line (a chain of 40 pi sections in the phase domain
// with an earth-return conductor, testdata/ngspice/gen_deadtime.sh) with its
// reactors: the frequency and decay of the aerial (line-to-line) and ground
// (phase-sum) oscillations, and every phase's voltage at the closing instant.
func TestDeadTimeRingDownAgainstNgspice(t *testing.T) {
	t.Parallel()
	// Frequency: both are fine discretisations of the same distributed line (Bergeron
	// with the time step, 40 pi sections at 6-8 km) whose errors at 30-60 Hz are far
	// below 0.1 %; 0.3 % leaves room for the zero-crossing count.
	// Decay (ratio of the last ring cycle's peak to the first's over 300 ms) and
	// voltages, in pu of a 1 pu charge. A whole line as one section lumps its
	// resistance R/4-R/2-R/4 per mode; in a ring-down the current along the line is
	// its own charging current, zero at an open end, so the lumped resistance
	// dissipates 3/8·R·I² against 1/3·R·I² spread (reactor at one end), and up to 1.5
	// times the spread loss with reactors at both ends: the ground mode (R0 ten times
	// R1) ends the dead time up to 0.075 lower than ngspice's, the phase voltages up to
	// 0.06 pu. Cut into 8 sections the same line agrees within 0.01 pu.
	const (
		freqTol    = 0.003
		decayLumpR = 0.08
		voltLumpR  = 0.065
		decayFine  = 0.005
		voltFine   = 0.01
	)
	l345 := deadLine{kv: 345, hz: 60, km: 250, r1: 0.03, l1: 1.0, c1: 11.5, r0: 0.3, l0: 3.2, c0: 7.5,
		mvar: [2]float64{0, 75}, q: [2]float64{0, 300}, trapped: [3]float64{-1, 1, -1}, deadTime: 0.3}
	l400 := deadLine{kv: 400, hz: 50, km: 320, r1: 0.025, l1: 0.95, c1: 12, r0: 0.25, l0: 3.0, c0: 7.5,
		mvar: [2]float64{100, 150}, q: [2]float64{300, 300}, neutralOhm: [2]float64{0, 300},
		trapped: [3]float64{1, -0.4, 0.7}, deadTime: 0.3}
	fine := func(d deadLine) deadLine { d.sections = 8; return d }
	for _, tc := range []struct {
		name              string
		file              string
		line              deadLine
		decayTol, voltTol float64
	}{
		{"345 kV, 75 Mvar receiving reactor, solid", "deadtime_345kv.csv", l345, decayLumpR, voltLumpR},
		{"345 kV, in 8 sections", "deadtime_345kv.csv", fine(l345), decayFine, voltFine},
		{"400 kV, reactors at both ends, neutral reactor", "deadtime_400kv.csv", l400, decayLumpR, voltLumpR},
		{"400 kV, in 8 sections", "deadtime_400kv.csv", fine(l400), decayFine, voltFine},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			tp, set := tc.line.circuit(t)
			sim, err := NewSwitchingSimulator(tp, set)
			if err != nil {
				t.Fatal(err)
			}
			rt, ref := readDeadTimeRef(t, "../testdata/ngspice/"+tc.file)
			dt := sim.Step()
			send, recv := ringDownWave(sim, tc.line.deadTime)
			// Resample ours on the reference grid (the grid is a multiple of the step).
			at := func(x []float64, tt float64) float64 { return x[int(math.Round(tt/dt))] }
			n := 0
			for n < len(rt) && rt[n] <= tc.line.deadTime+1e-9 {
				n++
			}
			var aerial, ground [2][]float64 // ours, ngspice
			for i := 0; i < n; i++ {
				aerial[0] = append(aerial[0], at(send[0], rt[i])-at(send[1], rt[i]))
				aerial[1] = append(aerial[1], ref[0][i]-ref[1][i])
				ground[0] = append(ground[0], at(send[0], rt[i])+at(send[1], rt[i])+at(send[2], rt[i]))
				ground[1] = append(ground[1], ref[0][i]+ref[1][i]+ref[2][i])
			}
			step := rt[1] - rt[0]
			for _, m := range []struct {
				name string
				x    [2][]float64
			}{{"aerial (va - vb)", aerial}, {"ground (va + vb + vc)", ground}} {
				f0, d0 := ringFrequency(m.x[0], step)
				f1, d1 := ringFrequency(m.x[1], step)
				t.Logf("%s: %.3f Hz, decay %.4f; ngspice %.3f Hz, decay %.4f", m.name, f0, d0, f1, d1)
				if f1 == 0 || math.Abs(f0/f1-1) > freqTol {
					t.Errorf("%s rings at %.3f Hz, ngspice %.3f Hz", m.name, f0, f1)
				}
				if math.Abs(d0-d1) > tc.decayTol {
					t.Errorf("%s decays to %.4f over the dead time, ngspice %.4f", m.name, d0, d1)
				}
			}
			// The state at the closing instant, as the shots receive it.
			rd := sim.RingDown()
			last := n - 1
			if math.Abs(rt[last]-tc.line.deadTime) > 1e-9 {
				t.Fatalf("reference has no sample at %g s", tc.line.deadTime)
			}
			for k := 0; k < 3; k++ {
				if d := rd.Sending[k] - ref[k][last]; math.Abs(d) > tc.voltTol {
					t.Errorf("phase %c sending end at closing %+.4f pu, ngspice %+.4f", 'a'+k, rd.Sending[k], ref[k][last])
				}
				if d := rd.Receiving[k] - ref[3+k][last]; math.Abs(d) > tc.voltTol {
					t.Errorf("phase %c receiving end at closing %+.4f pu, ngspice %+.4f", 'a'+k, rd.Receiving[k], ref[3+k][last])
				}
				if rd.Sending[k] != at(send[k], tc.line.deadTime) || rd.Receiving[k] != at(recv[k], tc.line.deadTime) {
					t.Errorf("phase %c: the ring-down the shots start from differs from the stepped one", 'a'+k)
				}
			}
			// The whole waveform, for the record.
			var worst float64
			for i := 0; i < n; i++ {
				for k := 0; k < 3; k++ {
					worst = math.Max(worst, math.Abs(at(send[k], rt[i])-ref[k][i]))
					worst = math.Max(worst, math.Abs(at(recv[k], rt[i])-ref[3+k][i]))
				}
			}
			t.Logf("largest difference over the dead time %.4f pu", worst)
			if worst > tc.voltTol {
				t.Errorf("ring-down differs from ngspice by up to %.4f pu", worst)
			}
		})
	}
}

// A short line with a reactor rings at the lumped frequency f = 1/(2π·sqrt(L·C)),
// with C the whole line capacitance of the mode and L the reactor (plus three times
// the neutral reactor in the ground mode): the textbook LC circuit (any circuits
// text; from memory). Trapped [1, -1, 0] excites only the aerial modes, [1, 1, 1]
// only the ground mode. RingEstimate gives the same lumped figure.
func TestDeadTimeShortLineRingsAtLumpedLC(t *testing.T) {
	t.Parallel()
	// A 50 km line is electrically short at 40 Hz (βl about 0.04 rad): its own series
	// inductance shifts the frequency by about (βl)²/6 < 0.05 %, the damping by less;
	// 0.2 % covers both and the zero-crossing count.
	const tol = 0.002
	const estTol = 1e-12 // the same sum, computed apart
	base := deadLine{kv: 400, hz: 50, km: 50, r1: 0.025, l1: 0.95, c1: 12, r0: 0.25, l0: 3.0, c0: 7.5,
		mvar: [2]float64{0, 12}, q: [2]float64{0, 300}, neutralOhm: [2]float64{0, 1500}, deadTime: 0.3}
	x := 400.0 * 400.0 / 12 // ohm: (kV)²/Mvar
	w := 2 * math.Pi * 50
	lr, ln := x/w, 1500/w
	for _, tc := range []struct {
		name    string
		trapped [3]float64
		ground  bool
		want    float64
	}{
		{"aerial", [3]float64{1, -1, 0}, false, 1 / (2 * math.Pi * math.Sqrt(lr*12e-12*50e3))},
		{"ground, neutral reactor", [3]float64{1, 1, 1}, true, 1 / (2 * math.Pi * math.Sqrt((lr+3*ln)*7.5e-12*50e3))},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			d := base
			d.trapped = tc.trapped
			tp, set := d.circuit(t)
			sim, err := NewSwitchingSimulator(tp, set)
			if err != nil {
				t.Fatal(err)
			}
			send, _ := ringDownWave(sim, d.deadTime)
			x := send[0]
			if tc.ground {
				x = make([]float64, len(send[0]))
				for i := range x {
					x[i] = send[0][i] + send[1][i] + send[2][i]
				}
			}
			f, _ := ringFrequency(x, sim.Step())
			if math.Abs(f/tc.want-1) > tol {
				t.Errorf("rings at %.4f Hz, 1/(2π√(LC)) = %.4f Hz", f, tc.want)
			}
			g, a := tp.RingEstimate()
			est := a
			if tc.ground {
				est = g
			}
			if math.Abs(est/tc.want-1) > estTol {
				t.Errorf("RingEstimate %.6f Hz, want %.6f Hz", est, tc.want)
			}
		})
	}
}

// Without reactors the trapped charge stays as d.c., leaking away through the line's
// conductance alone: v(t) = v0·exp(−t·G/C) per mode (an RC discharge; from memory),
// with G = 0 it stays.
func TestDeadTimeDCChargeLeaks(t *testing.T) {
	t.Parallel()
	// The conductance is lumped G/2 at each end of the Bergeron line, which discharges
	// the same total capacitance; the trapezoidal rule's error at dt/τ ~ 1e-4 is
	// negligible. 1e-4 relative covers the rounding of the dead time to the step.
	const tol = 1e-4
	for _, tc := range []struct {
		name   string
		g1, g0 float64 // µS/km
	}{{"no conductance", 0, 0}, {"leaky", 0.05, 0.04}} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			d := deadLine{kv: 400, hz: 50, km: 200, r1: 0.025, l1: 0.95, c1: 12, r0: 0.25, l0: 3.0, c0: 7.5,
				g1: tc.g1, g0: tc.g0, trapped: [3]float64{1, -0.5, 0.8}, deadTime: 0.3}
			tp, set := d.circuit(t)
			sim, err := NewSwitchingSimulator(tp, set)
			if err != nil {
				t.Fatal(err)
			}
			rd := sim.RingDown()
			// modal: ground (Σ/√3) decays with G0/C0, aerial with G1/C1
			m := toModal(d.trapped)
			m[0] *= math.Exp(-0.3 * tc.g0 * 1e-6 / (7.5e-9))
			m[1] *= math.Exp(-0.3 * tc.g1 * 1e-6 / (12e-9))
			m[2] *= math.Exp(-0.3 * tc.g1 * 1e-6 / (12e-9))
			want := toPhase(m)
			for k := 0; k < 3; k++ {
				if math.Abs(rd.Sending[k]-want[k]) > tol || math.Abs(rd.Receiving[k]-want[k]) > tol {
					t.Errorf("phase %c at closing %+.6f (sending), %+.6f (receiving), want %+.6f", 'a'+k, rd.Sending[k], rd.Receiving[k], want[k])
				}
			}
		})
	}
}

// Without trapped charge the dead time changes nothing: the same shots, bit for bit,
// random and controlled.
func TestDeadTimeNoTrappedChargeUnchanged(t *testing.T) {
	t.Parallel()
	r, l := swSource()
	tp, _ := swThreePhase(320, 0.025, 0.25, r, l)
	xr := swVoltage * swVoltage / 150e6
	tp.Shunts = []freqscan.Shunt{{End: freqscan.Receiving, OnLine: true, L: xr / swOmega, R: xr / 300}}
	for _, controlled := range []bool{false, true} {
		s := SwitchingSettings{Shots: 20, Seed: 3, PoleSigma: 1e-3, Duration: 0.01, Controlled: controlled, ControlledSigma: 1e-3}
		a, err := Switching(tp, s, nil)
		if err != nil {
			t.Fatal(err)
		}
		s.DeadTime = 0.3
		b, err := Switching(tp, s, nil)
		if err != nil {
			t.Fatal(err)
		}
		for i := range a.Shots {
			if a.Shots[i] != b.Shots[i] {
				t.Fatalf("controlled %v, shot %d: %+v with a dead time, %+v without", controlled, i, b.Shots[i], a.Shots[i])
			}
		}
	}
}
