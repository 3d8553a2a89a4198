package waves

import (
	"fmt"
	"math"
)

// The dead time of a reclosing: from the line's opening to the mean closing instant.
//
// At the opening the line is left charged at SwitchingSettings.TrappedPU with no
// current in the line or in its line-connected shunts (the line opened at current
// zero; with line-connected reactors, reactor current zero: the crest of the
// ring-down). From then on the de-energised line is a free linear circuit: its
// capacitance (phase to earth and phase to phase, so the ground and aerial modes
// separately) rings with the line-connected reactors (and their neutral reactor, in
// the ground mode) at about
//
//	f = 1 / (2π·sqrt(L_reactor·C_line))
//
// per mode (sub-synchronous for a compensation below 100 %), damped by the reactors'
// resistance, the line's series resistance and its conductance; without reactors the
// charge stays as d.c., leaking away through the line's conductance only.
//
// The ring-down is computed by the same nodal simulation as the shots (the same
// modal Bergeron lines, trapezoidal lumped elements and arresters, all poles open,
// the same time step), once per study from the opening instant through the dead
// time, and not by a lumped circuit: the same model gives the shots a state that is
// consistent in every detail (travelling-wave history of every mode, reactor and
// capacitor states, star-point voltages), whatever the line's length, sections and
// shunts. The state is kept at every step of the window in which a shot can start
// (checkpoints, thinned to bound their memory); a shot copies the last checkpoint
// before its first contact and steps on from there with the poles open. So the dead
// time costs one simulation of its length per study, not per shot.

// ringMemory bounds the memory of the checkpoints of one ring-down (bytes).
const ringMemory = 64 << 20

// ringDown is the de-energised line's free response through the dead time.
type ringDown struct {
	sim   *SwitchingSimulator
	nCmd  int // ring step of the mean closing instant (the dead time in steps)
	lo    int // ring step of the first checkpoint
	every int // ring steps between checkpoints
	snaps []*shotState
	// s0 is the ring step of the first sample; send and recv are the line-side
	// voltages (pu of EMFPeak) of each phase at the sending and receiving end after
	// each ring step from s0.
	s0         int
	send, recv [3][]float64
	// reactorI is the current (A, phase to star point) of the line-connected reactors
	// of each phase at each end (0 sending, 1 receiving) at the mean closing instant.
	reactorI [2][3]float64
}

// stepAt returns the ring step whose state is at time t (s) from the mean closing
// instant, rounded to the time step and at least 0 (the opening).
func (rd *ringDown) stepAt(t, dt float64) int {
	return max(0, int(math.Round(t/dt))+rd.nCmd)
}

// stateAt returns a copy of the line's state after ring step n (the source side at
// rest; the shot sets it).
func (rd *ringDown) stateAt(sim *SwitchingSimulator, n int) (*shotState, error) {
	var st *shotState
	at := 0
	if len(rd.snaps) > 0 && n >= rd.lo {
		i := min((n-rd.lo)/rd.every, len(rd.snaps)-1)
		st, at = rd.snaps[i].clone(sim.ideal), rd.lo+i*rd.every
	} else {
		st = sim.openingState(sim.trappedV())
	}
	for ; at < n; at++ {
		if err := sim.advance(st, sim.topo[0], [3]float64{}); err != nil {
			return nil, fmt.Errorf("at %.6g ms after the opening: %w", float64(at+1)*sim.dt*1e3, err)
		}
	}
	return st, nil
}

// sample returns the sending-end line voltage (pu) of phase k after ring step n.
func (rd *ringDown) sample(k, n int) float64 {
	i := min(max(n-rd.s0, 0), len(rd.send[k])-1)
	return rd.send[k][i]
}

// ringSampleSpan is how long before the mean closing instant the ring-down is
// sampled for the summary (the largest voltage of the last ring cycles).
const ringSampleSpan = 0.05

// newRingDown simulates the de-energised line from the opening through the dead time
// and past it to the latest first contact any shot can have: [minT, maxT] (s, from
// the mean closing instant) bounds the first contacts.
func newRingDown(sim *SwitchingSimulator, minT, maxT float64) (*ringDown, error) {
	dt := sim.dt
	rd := &ringDown{sim: sim, nCmd: int(math.Round(sim.set.DeadTime / dt))}
	rd.lo = max(0, int(math.Floor(minT/dt))+rd.nCmd-2)
	hi := max(rd.lo, int(math.Ceil(maxT/dt))+rd.nCmd+2)
	rd.s0 = max(0, min(rd.lo, rd.nCmd-int(math.Ceil(ringSampleSpan/dt))))
	st := sim.openingState(sim.trappedV())
	size := 8 * (len(st.v) + 8*len(st.branches))
	for _, ln := range st.lines {
		size += 8 * 12 * ln.size
	}
	rd.every = max(1, int(math.Ceil(float64(hi-rd.lo+1)*float64(size)/ringMemory)))
	nj := len(sim.endNode)
	base := sim.net.EMFPeak
	for n := 0; ; n++ {
		if n > 0 {
			if err := sim.advance(st, sim.topo[0], [3]float64{}); err != nil {
				return nil, fmt.Errorf("waves: switching: the dead time's ring-down at %.6g ms after the opening: %w (check the arresters' V-I tables, or try a smaller time step)", float64(n)*dt*1e3, err)
			}
		}
		if n >= rd.s0 {
			for k := 0; k < 3; k++ {
				rd.send[k] = append(rd.send[k], st.v[sim.endNode[0][k]]/base)
				rd.recv[k] = append(rd.recv[k], st.v[sim.endNode[nj-1][k]]/base)
			}
		}
		if n >= rd.lo && (n-rd.lo)%rd.every == 0 {
			rd.snaps = append(rd.snaps, st.clone(sim.ideal))
		}
		if n == rd.nCmd {
			for _, br := range st.branches {
				if br.a < 3 || br.l == 0 || br.a == sim.neutral[0] || br.a == sim.neutral[1] {
					continue
				}
				e := 0
				if br.a >= sim.endNode[nj-1][0] {
					e = 1
				}
				rd.reactorI[e][(br.a-3)%3] += br.i
			}
		}
		if n >= hi {
			break
		}
	}
	return rd, nil
}

// RingDown is the state of the de-energised line at the mean closing instant, after
// the dead time: what the closing meets.
type RingDown struct {
	DeadTime float64 // s
	// Sending and Receiving are each phase's line voltage at the mean closing instant,
	// pu of EMFPeak; Largest the largest |voltage| at the sending end over the last
	// RingSpan seconds of the dead time (the amplitude of a ring-down).
	Sending, Receiving, Largest [3]float64
	RingSpan                    float64 // s
	// ReactorI is the current (A) of each phase's line-connected reactors at the
	// sending (0) and receiving (1) end at the mean closing instant.
	ReactorI [2][3]float64
	// Sampled is the sending-end voltage of each phase (pu) every Step seconds from
	// Start (s from the mean closing instant, negative: during the dead time).
	Start, Step float64
	Sampled     [3][]float64
}

// RingDown returns the state of the line at the mean closing instant after the dead
// time, or nil when there is no dead time to simulate (no trapped charge, or a zero
// dead time: the line then meets the closing at the trapped voltages themselves).
func (sim *SwitchingSimulator) RingDown() *RingDown {
	rd := sim.ring
	if rd == nil {
		return nil
	}
	out := &RingDown{DeadTime: sim.set.DeadTime, ReactorI: rd.reactorI, Step: sim.dt,
		Start: float64(rd.s0-rd.nCmd) * sim.dt}
	for k := 0; k < 3; k++ {
		out.Sending[k] = rd.sample(k, rd.nCmd)
		out.Receiving[k] = rd.recv[k][min(max(rd.nCmd-rd.s0, 0), len(rd.recv[k])-1)]
		from := max(rd.nCmd-int(math.Ceil(ringSampleSpan/sim.dt)), 0)
		for n := from; n <= rd.nCmd; n++ {
			out.Largest[k] = math.Max(out.Largest[k], math.Abs(rd.sample(k, n)))
		}
		out.Sampled[k] = append([]float64(nil), rd.send[k]...)
	}
	out.RingSpan = float64(rd.nCmd-max(rd.nCmd-int(math.Ceil(ringSampleSpan/sim.dt)), 0)) * sim.dt
	return out
}

// RingEstimate returns the lumped estimate of the ring-down frequency (Hz) of the
// ground mode and the aerial modes of the de-energised line with its line-connected
// shunts,
//
//	f = 1 / (2π·sqrt(L·C))
//
// with C the mode's whole line capacitance plus the line-connected capacitors and L
// the line-connected reactors of both ends in parallel (a neutral reactor Ln adds 3·Ln
// in the ground mode); 0 for a mode with no reactor (the charge stays as d.c.). It
// holds where the line is electrically short at that frequency.
func (net ThreePhase) RingEstimate() (ground, aerial float64) {
	var c [2]float64 // ground, aerial
	for _, s := range net.Line.Sections {
		c[0] += s.Tau[ModeGround] / s.Zc[ModeGround]
		c[1] += s.Tau[ModeAlpha] / s.Zc[ModeAlpha]
	}
	var invL [2]float64
	for e := 0; e < 2; e++ {
		var y float64 // 1/L of the end's reactors, per phase
		for _, sh := range net.Shunts {
			if !sh.OnLine || int(sh.End) != e {
				continue
			}
			if sh.L > 0 {
				y += 1 / sh.L
			}
			if sh.C > 0 && sh.L == 0 {
				c[0] += sh.C
				c[1] += sh.C
			}
		}
		if y == 0 {
			continue
		}
		invL[1] += y
		invL[0] += 1 / (1/y + 3*net.NeutralL[e])
	}
	f := func(m int) float64 {
		if invL[m] == 0 || c[m] == 0 {
			return 0
		}
		return 1 / (2 * math.Pi * math.Sqrt(c[m]/invL[m]))
	}
	return f(0), f(1)
}
