package waves

import (
	"math"
	"math/cmplx"
	"testing"

	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
)

// onePoleLaplace returns the receiving-end phase voltages (pu of swEMF) when only pole
// a closes at t = 0 on the open transposed line (poles b and c stay open), by an
// independent frequency-domain solution: the exact hyperbolic admittance matrix of each
// mode (Clarke frame) assembled in phase co-ordinates, the source seen by phase a
// alone as its self impedance (Z0 + 2·Z1)/3, solved at s = c + jω and inverted by a
// numerical Laplace transform (damped Fourier sum with a Hanning window; Wedepohl
// 1983, Moreno & Ramirez 2008).
//
// The receiving end may carry a line-connected reactor (rR ohm, lR H per phase; lR = 0
// none) with a neutral reactor lN (H): modal admittances 1/(Zr + 3·s·lN) for the ground
// mode and 1/Zr for the aerial ones.
func onePoleLaplace(pos, zero propagation.Cascade, srcR, srcL, x0, rR, lR, lN float64, closeDeg, duration, dt float64) [3][]float64 {
	const nFreq = 8192
	T := 2 * duration
	dw := 2 * math.Pi / T
	c := math.Log(float64(nFreq)*float64(nFreq)) / T
	th := closeDeg * math.Pi / 180
	lines := [3]propagation.Line{zero[0], pos[0], pos[0]}
	clarke := propagation.ClarkeMatrix()
	spec := make([][3]complex128, nFreq)
	for k := 0; k < nFreq; k++ {
		s := complex(c, float64(k)*dw)
		// modal self and transfer admittances of the line
		var y11, y12 [3]complex128
		for m, l := range lines {
			g, zc := l.GammaZc(s)
			gl := g * complex(l.Length, 0)
			y11[m] = 1 / (zc * cmplx.Tanh(gl))
			y12[m] = -1 / (zc * cmplx.Sinh(gl))
		}
		ph := func(y [3]complex128) [3][3]complex128 {
			var out [3][3]complex128
			for i := 0; i < 3; i++ {
				for j := 0; j < 3; j++ {
					for m := 0; m < 3; m++ {
						out[i][j] += complex(clarke[m][i]*clarke[m][j], 0) * y[m]
					}
				}
			}
			return out
		}
		a, b := ph(y11), ph(y12)
		ar := a // receiving-end block
		if lR > 0 {
			zr := complex(rR, 0) + s*complex(lR, 0)
			yr := ph([3]complex128{1 / (zr + 3*s*complex(lN, 0)), 1 / zr, 1 / zr})
			for i := 0; i < 3; i++ {
				for j := 0; j < 3; j++ {
					ar[i][j] += yr[i][j]
				}
			}
		}
		// 6×6 nodal matrix [[A, B], [B, A]] with the source admittance at node S_a.
		z1 := complex(srcR, 0) + s*complex(srcL, 0)
		zself := (complex(x0, 0)*z1 + 2*z1) / 3
		ea := (s*complex(math.Sin(th), 0) + complex(swOmega*math.Cos(th), 0)) / (s*s + complex(swOmega*swOmega, 0))
		var m [6][7]complex128
		for i := 0; i < 3; i++ {
			for j := 0; j < 3; j++ {
				m[i][j], m[i][j+3] = a[i][j], b[i][j]
				m[i+3][j], m[i+3][j+3] = b[i][j], ar[i][j]
			}
		}
		m[0][0] += 1 / zself
		m[0][6] = ea / zself
		// Gaussian elimination with partial pivoting
		for col := 0; col < 6; col++ {
			p := col
			for r := col + 1; r < 6; r++ {
				if cmplx.Abs(m[r][col]) > cmplx.Abs(m[p][col]) {
					p = r
				}
			}
			m[col], m[p] = m[p], m[col]
			for r := col + 1; r < 6; r++ {
				f := m[r][col] / m[col][col]
				for j := col; j < 7; j++ {
					m[r][j] -= f * m[col][j]
				}
			}
		}
		var x [6]complex128
		for r := 5; r >= 0; r-- {
			v := m[r][6]
			for j := r + 1; j < 6; j++ {
				v -= m[r][j] * x[j]
			}
			x[r] = v / m[r][r]
		}
		w := (1 + math.Cos(math.Pi*float64(k)/nFreq)) / 2
		if k == 0 {
			w /= 2
		}
		for p := 0; p < 3; p++ {
			spec[k][p] = x[3+p] * complex(w, 0)
		}
	}
	n := samples(duration, dt)
	var out [3][]float64
	for p := 0; p < 3; p++ {
		out[p] = make([]float64, n)
	}
	for i := 0; i < n; i++ {
		t := float64(i) * dt
		step := cmplx.Exp(complex(0, dw*t))
		rot := complex(1, 0)
		var acc [3]complex128
		for k := 0; k < nFreq; k++ {
			for p := 0; p < 3; p++ {
				acc[p] += spec[k][p] * rot
			}
			rot *= step
		}
		for p := 0; p < 3; p++ {
			out[p][i] = math.Exp(c*t) / math.Pi * real(acc[p]) * dw
		}
	}
	return out
}

// With only pole a closed the ground mode and the coupling to the open phases b and c
// are excited: the modal Bergeron simulation against the frequency-domain solution.
func TestOnePoleClosedAgainstLaplace(t *testing.T) {
	t.Parallel()
	// lumped R/4-R/2-R/4 against distributed losses, linear delay interpolation and
	// the window's smoothing of the fronts: 2 % of the phase a peak, on peaks and rms.
	const tol = 0.02
	const duration = 0.015
	r, l := swSource()
	xr := swVoltage * swVoltage / 100e6 // 100 Mvar reactor, Q factor 300
	rR, lR := xr/300, xr/swOmega
	for _, tc := range []struct {
		x0      float64
		reactor bool
		lN      float64
	}{{1, false, 0}, {2.5, false, 0}, {1.2, true, 0}, {1.2, true, 1.5}} {
		x0 := tc.x0
		tp, _ := swThreePhase(200, 0.025, 0.25, r, l)
		tp.X0OverX1 = x0
		var lr float64
		if tc.reactor {
			tp.Shunts = []freqscan.Shunt{{End: freqscan.Receiving, OnLine: true, R: rR, L: lR}}
			tp.NeutralL[freqscan.Receiving] = tc.lN
			lr = lR
		}
		pos, zero := swLines(200, 0.025, 0.25)
		s := SwitchingSettings{Shots: 1, Duration: duration}
		sim, err := NewSwitchingSimulator(tp, s)
		if err != nil {
			t.Fatal(err)
		}
		// A shot whose poles b and c close after the window: the first duration of it
		// is the one-pole circuit.
		spec := ShotSpec{CloseDeg: 60, Offset: [3]float64{0, 0.05, 0.05}}
		_, w, err := sim.Shot(spec, true)
		if err != nil {
			t.Fatal(err)
		}
		ref := onePoleLaplace(pos, zero, r, l, x0, rR, lr, tc.lN, 60, duration, sim.Step())
		pa, _ := Peak(ref[0])
		for p := 0; p < 3; p++ {
			n := len(ref[p])
			// both extremes (a coupled phase swings nearly as far each way)
			gl, gh := extremes(w.Receiving[p][:n])
			rl, rh := extremes(ref[p])
			if math.Abs(gl-rl) > tol*math.Abs(pa) || math.Abs(gh-rh) > tol*math.Abs(pa) {
				t.Errorf("%+v, phase %c: extremes %.4f/%.4f pu, Laplace %.4f/%.4f pu", tc, 'a'+p, gl, gh, rl, rh)
			}
			var ss float64
			for i := 0; i < n; i++ {
				d := w.Receiving[p][i] - ref[p][i]
				ss += d * d
			}
			if rms := math.Sqrt(ss / float64(n)); rms > tol*math.Abs(pa) {
				t.Errorf("%+v, phase %c: rms difference %.4f pu", tc, 'a'+p, rms)
			}
		}
	}
}

func extremes(v []float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, x := range v {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	return lo, hi
}
