package waves

import (
	"math"
	"testing"
)

// Controlled closing aims each pole at zero voltage across its contacts: on an
// uncharged line at its EMF zero, with trapped charge where the EMF equals the trapped
// voltage (the definition of controlled closing; CIGRE WG 13.07 guide, from memory).
func TestControlledShotsAimAtZeroContactVoltage(t *testing.T) {
	t.Parallel()
	const omega = 2 * math.Pi * 50
	const aimTol = 1e-12 // the aim is exact trigonometry; only rounding remains
	for _, trapped := range [][3]float64{{0, 0, 0}, {1, -0.5, -0.5}, {-0.8, 0.3, 0.6}} {
		specs := ControlledShots(SwitchingSettings{Shots: 3, Seed: 1, TrappedPU: trapped}, omega)
		for _, sp := range specs {
			for k := 0; k < 3; k++ {
				e := math.Sin(omega*sp.Offset[k] + sp.CloseDeg*math.Pi/180 - float64(k)*2*math.Pi/3)
				if math.Abs(e-trapped[k]) > aimTol {
					t.Errorf("trapped %v: pole %c closes at EMF %.6g, want %g", trapped, 'a'+k, e, trapped[k])
				}
			}
		}
	}
}

// The scatter is normal with the given sigma, truncated at 3 sigma, and the same seed
// gives the same shots.
func TestControlledShotsScatter(t *testing.T) {
	t.Parallel()
	const sigma = 1e-3
	s := SwitchingSettings{Shots: 4000, Seed: 7, Controlled: true, ControlledSigma: sigma}
	a, b := ControlledShots(s, 2*math.Pi*50), ControlledShots(s, 2*math.Pi*50)
	aim := ControlledShots(SwitchingSettings{Shots: 1, Seed: 7}, 2*math.Pi*50)[0]
	var sum, sum2 float64
	for i := range a {
		if a[i] != b[i] {
			t.Fatalf("shot %d differs between two draws with the same seed", i)
		}
		d := a[i].Offset[1] - aim.Offset[1]
		if math.Abs(d) > 3*sigma {
			t.Fatalf("shot %d scattered by %g s, beyond 3 sigma", i, d)
		}
		sum += d
		sum2 += d * d
	}
	n := float64(len(a))
	mean, sd := sum/n, math.Sqrt(sum2/n-(sum/n)*(sum/n))
	// A normal truncated at ±3σ has sd 0.98658σ (Johnson, Kotz & Balakrishnan,
	// Continuous Univariate Distributions; from memory); 4000 draws give about 1.1 %
	// of sampling error on the sd and 0.016σ on the mean, so allow 4 standard errors.
	if math.Abs(mean) > 0.065*sigma || math.Abs(sd/sigma-0.98658) > 0.045 {
		t.Errorf("scatter mean %g s, sd %g sigma; want 0 and 0.98658", mean, sd/sigma)
	}
}
