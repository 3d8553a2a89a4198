package waves

import (
	"math"
	"math/rand/v2"
)

// ControlledShots returns the shots of controlled (point-on-wave) closing on a line
// that holds its trapped charge at the closing (no dead time simulated; after a dead
// time SwitchingSimulator.ControlledShots aims at the ringing line): each pole
// aims at the instant its source EMF equals the line voltage at closing (the trapped
// charge s.TrappedPU; 0 on an uncharged line, the EMF's voltage zero), so the voltage
// across its contacts is zero, the first such instant after phase a's; each pole's
// instant is then scattered normally with s.ControlledSigma (s), truncated at 3σ, from
// a PCG generator seeded with s.Seed. With |trapped| > 1 pu a pole aims at the EMF
// crest of the same sign. omega is the system angular frequency (rad/s). Phase a
// aims at its own target angle, so every shot has the same mean instant; only the
// scatter differs from shot to shot.
//
// References:
//   - CIGRE WG 13.07, Controlled switching of HVAC circuit breakers: guide for
//     application, Electra 183 (1999) and 185 (1999) (closing near voltage zero of
//     uncharged lines); from memory.
func ControlledShots(s SwitchingSettings, omega float64) []ShotSpec {
	aim := func(v float64) [2]float64 {
		v = math.Max(-1, math.Min(1, v))
		a := math.Asin(v)
		return [2]float64{a, math.Pi - a}
	}
	thA := aim(s.TrappedPU[0])[0]
	var t [3]float64
	for k := 1; k < 3; k++ {
		best := math.Inf(1)
		for _, phi := range aim(s.TrappedPU[k]) {
			x := math.Mod(phi-thA+float64(k)*2*math.Pi/3, 2*math.Pi)
			if x < 0 {
				x += 2 * math.Pi
			}
			best = math.Min(best, x/omega)
		}
		t[k] = best
	}
	r := rand.New(rand.NewPCG(s.Seed, 0x5eed_c0c0_a1b2_c3d4))
	out := make([]ShotSpec, s.Shots)
	for i := range out {
		out[i].CloseDeg = thA * 180 / math.Pi
		for k := 0; k < 3; k++ {
			z := 0.0
			if s.ControlledSigma > 0 {
				z = truncatedNormal(r)
			}
			out[i].Offset[k] = t[k] + z*s.ControlledSigma
		}
	}
	return out
}

// controlWindow is how long after the command (the mean closing instant) a
// controlled closing may wait for each pole's best instant (s): two cycles of the
// system frequency, where the contact voltage of an uncharged line or a line
// holding d.c. charge has every point on wave; with a ringing line charge the best
// instants are where the EMF and the ring-down are nearly in phase (the beat
// minimum of the contact voltage). Waiting longer, toward the beat minimum, spreads
// the poles apart, and the closed poles' coupling to the open ones then spoils the
// later poles' aim: on the 345 kV, 75 Mvar reactor case of the tests (45 Hz ring on
// 60 Hz, 15 Hz beat; 300 shots) u2 is 2.28 pu with one cycle, 2.03 with two, 2.14
// with four.
func controlWindow(omega float64) float64 { return controlCycles * 2 * math.Pi / omega }

// controlCycles is controlWindow in cycles of the system frequency.
const controlCycles = 2

// ControlledShots returns the shots of controlled closing for this simulation. Without
// a dead time to simulate (no trapped charge, or DeadTime 0) they are those of the
// package function ControlledShots. After a dead time the controller aims each pole
// at the real voltage across its contacts: the source EMF minus the line-side
// voltage the ring-down predicts (the de-energised line's own response, as the
// controller extrapolates it from the line-side voltage), at the instant within
// controlWindow after the command where the largest |contact voltage| over the
// pole's scatter (±3·ControlledSigma, at least one step) is least, the first such
// instant on a tie; then each pole is scattered normally with ControlledSigma,
// truncated at 3σ. The phase a EMF angle at the command is CloseDeg with
// HasCloseDeg, otherwise uniformly random over one cycle (the reclosing is not
// synchronised with the ring-down), drawn first per shot from a PCG generator seeded
// with Seed, then the three scatters. The poles' aims do not anticipate the coupling
// to the still open phases of the poles already closed.
func (sim *SwitchingSimulator) ControlledShots() []ShotSpec {
	s := sim.set
	if sim.ring == nil {
		return ControlledShots(s, sim.net.Omega)
	}
	rd, dt, w := sim.ring, sim.dt, sim.net.Omega
	nW := int(math.Ceil(controlWindow(w) / dt))
	h := max(1, int(math.Ceil(3*s.ControlledSigma/dt)))
	// Samples from the first to the last instant the criterion looks at.
	n0 := rd.nCmd - h
	m := nW + 2*h + 1
	var vline [3][]float64
	sn, cs := make([]float64, m), make([]float64, m)
	for i := 0; i < m; i++ {
		t := float64(n0+i-rd.nCmd) * dt
		sn[i], cs[i] = math.Sin(w*t), math.Cos(w*t)
		for k := 0; k < 3; k++ {
			vline[k] = append(vline[k], rd.sample(k, n0+i))
		}
	}
	r := rand.New(rand.NewPCG(s.Seed, 0x5eed_c0c0_a1b2_c3d4))
	out := make([]ShotSpec, s.Shots)
	u := make([]float64, m)
	worst := make([]float64, nW+1)
	dq := make([]int, 0, m)
	for i := range out {
		deg := s.CloseDeg
		if !s.HasCloseDeg {
			deg = 360 * r.Float64()
		}
		out[i].CloseDeg = deg
		for k := 0; k < 3; k++ {
			ph := deg*math.Pi/180 - float64(k)*2*math.Pi/3
			sp, cp := math.Sin(ph), math.Cos(ph)
			for j := range u {
				u[j] = math.Abs(sn[j]*cp + cs[j]*sp - vline[k][j])
			}
			// worst[c] = max u over [c, c+2h] (candidate c+h): a sliding maximum.
			dq = dq[:0]
			for j := range u {
				for len(dq) > 0 && u[dq[len(dq)-1]] <= u[j] {
					dq = dq[:len(dq)-1]
				}
				dq = append(dq, j)
				if dq[0] <= j-2*h-1 {
					dq = dq[1:]
				}
				if c := j - 2*h; c >= 0 {
					worst[c] = u[dq[0]]
				}
			}
			best := 0
			for c := 1; c <= nW; c++ {
				if worst[c] < worst[best] {
					best = c
				}
			}
			z := 0.0
			if s.ControlledSigma > 0 {
				z = truncatedNormal(r)
			}
			out[i].Offset[k] = float64(best)*dt + z*s.ControlledSigma
		}
	}
	return out
}
