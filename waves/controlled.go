package waves

import (
	"math"
	"math/rand/v2"
)

// ControlledShots returns the shots of controlled (point-on-wave) closing: each pole
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
				z = r.NormFloat64()
				for math.Abs(z) > 3 {
					z = r.NormFloat64()
				}
			}
			out[i].Offset[k] = t[k] + z*s.ControlledSigma
		}
	}
	return out
}
