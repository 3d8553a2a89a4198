package propagation

import (
	"math"
	"math/cmplx"
)

// eulerGamma is the Euler–Mascheroni constant γ.
const eulerGamma = 0.57721566490153286060651209008240243

// besselIK returns the exponentially scaled modified Bessel functions of the first and
// second kind, orders 0 and 1, of the complex argument z:
//
//	i0 = I0(z)·exp(-z),  i1 = I1(z)·exp(-z),  k0 = K0(z)·exp(z),  k1 = K1(z)·exp(z)
//
// The scaling keeps the ratios the conductor formulas need finite for any |z| (I grows
// and K decays like exp(±z)); for Re z >= 0 it is the scaling of scipy.special.ive and
// kve. Valid for z != 0 with Re z >= 0 (|arg z| <= π/2); full double precision for
// |arg z| <= 3π/8, which covers z = m·r with m = sqrt(s·μ/ρ) for every Re s >= 0
// (|arg z| <= π/4). At z = 0 the K functions are infinite and (0, 0, +Inf, +Inf) is
// returned.
//
// Method, by |z|:
//   - |z| <= 2: the ascending power series (Abramowitz & Stegun 9.6.10, 9.6.11);
//   - 2 < |z| < 25: I0, I1 by Miller's backward recurrence normalised with
//     exp(z) = I0(z) + 2·Σ I_k(z) (A&S 9.6.37 with t = 1), and K0, K1 by the trapezoidal
//     rule on K_ν(z)·exp(z) = ∫_0^∞ exp(-z(cosh t - 1))·cosh(νt) dt (A&S 9.6.24), which
//     converges exponentially for an integrand analytic in a strip (Trefethen and
//     Weideman 2014);
//   - |z| >= 25: the asymptotic expansions for large argument (A&S 9.7.1, 9.7.2), whose
//     neglected exponentially small part of I is below 1e-15 once Re z >= 17.5 (else
//     the recurrence is used for I up to |z| = 2000).
//
// References:
//   - M. Abramowitz and I. A. Stegun, Handbook of Mathematical Functions (1964), ch. 9.
//   - J. C. P. Miller, in British Association Mathematical Tables, vol. X (1952): the
//     backward recurrence.
//   - L. N. Trefethen and J. A. C. Weideman, "The exponentially convergent trapezoidal
//     rule", SIAM Review 56 (2014) 385-458.
func besselIK(z complex128) (i0, i1, k0, k1 complex128) {
	r := cmplx.Abs(z)
	switch {
	case r == 0:
		return 0, 0, complex(math.Inf(1), 0), complex(math.Inf(1), 0)
	case r <= 2:
		return besselSeries(z)
	}
	if r >= 25 {
		k0, k1 = besselKAsymptotic(z)
		if real(z) >= 17.5 || r > 2000 {
			i0, i1 = besselIAsymptotic(z)
		} else {
			i0, i1 = besselIMiller(z)
		}
		return i0, i1, k0, k1
	}
	i0, i1 = besselIMiller(z)
	k0, k1 = besselKIntegral(z)
	return i0, i1, k0, k1
}

// besselSeries evaluates the ascending series of I0, I1, K0, K1 (A&S 9.6.10, 9.6.11)
// and scales them; for |z| <= 2.
//
//	I0 = Σ t^k/(k!)²,  I1 = (z/2) Σ t^k/(k!(k+1)!),  t = z²/4
//	K0 = -(ln(z/2) + γ)·I0 + Σ H_k t^k/(k!)²
//	K1 = 1/z + (ln(z/2) + γ)·I1 - (z/4) Σ (H_k + H_{k+1}) t^k/(k!(k+1)!)
//
// with H_k the harmonic numbers (H_0 = 0).
func besselSeries(z complex128) (i0, i1, k0, k1 complex128) {
	t := z * z / 4
	var s0, s1, sk0, sk1 complex128
	term0 := complex(1, 0) // t^k/(k!)²
	term1 := complex(1, 0) // t^k/(k!(k+1)!)
	h := 0.0               // H_k
	for k := 0; k < 60; k++ {
		hNext := h + 1/float64(k+1)
		s0 += term0
		s1 += term1
		sk0 += term0 * complex(h, 0)
		sk1 += term1 * complex(h+hNext, 0)
		if cmplx.Abs(term0) < 1e-18*cmplx.Abs(s0) && cmplx.Abs(term1) < 1e-18*cmplx.Abs(s1) {
			break
		}
		kf := float64(k + 1)
		term0 *= t / complex(kf*kf, 0)
		term1 *= t / complex(kf*(kf+1), 0)
		h = hNext
	}
	I0 := s0
	I1 := z / 2 * s1
	lg := cmplx.Log(z/2) + eulerGamma
	K0 := -lg*I0 + sk0
	K1 := 1/z + lg*I1 - z/4*sk1
	em, ep := cmplx.Exp(-z), cmplx.Exp(z)
	return I0 * em, I1 * em, K0 * ep, K1 * ep
}

// besselIMiller returns I0(z)e^{-z} and I1(z)e^{-z} by Miller's backward recurrence
// I_{k-1} = (2k/z)·I_k + I_{k+1}, started far above the orders wanted, normalised by
// Σ_{k=-∞}^{∞} I_k(z) = exp(z). For 2 < |z| <= 2000 with Re z > 0.
func besselIMiller(z complex128) (i0, i1 complex128) {
	r := cmplx.Abs(z)
	n := int(r+10*math.Sqrt(r)) + 30
	inv2z := 2 / z
	var next complex128        // I_{k+1}, unnormalised
	var cur complex128 = 1e-30 // I_k
	var sum complex128         // I_0 + 2 Σ_{k>=1} I_k, accumulated from the top
	for k := n; k >= 1; k-- {
		sum += 2 * cur
		next, cur = cur, complex(float64(k), 0)*inv2z*cur+next
		if math.Abs(real(cur))+math.Abs(imag(cur)) > 1e250 {
			const sc = 1e-250
			cur *= sc
			next *= sc
			sum *= sc
		}
	}
	// cur is now I_0 and next I_1.
	sum += cur
	return cur / sum, next / sum
}

// besselKIntegral returns K0(z)e^{z} and K1(z)e^{z} by the trapezoidal rule on
//
//	K_ν(z)·e^{z} = ∫_0^∞ exp(-z(cosh t - 1))·cosh(νt) dt,   Re z > 0.
//
// The integrand is analytic and decaying in the strip |Im t| < π/2 - |arg z|, so the
// error of step h falls like exp(-2π·d/h) for a usable half-width d (Trefethen and
// Weideman 2014, theorem 5.1); h is chosen for exp(-40).
func besselKIntegral(z complex128) (k0, k1 complex128) {
	// Along Im t = d the integrand grows by exp(Re z·(1 - cos d)) near t = 0 and decays
	// only while d < π/2 - |arg z|; the trapezoidal error is about
	// exp(Re z·(1 - cos d) - 2π·d/h). Take the d that allows the largest h for exp(-40).
	dMax := math.Pi/2 - math.Abs(cmplx.Phase(z)) - 0.1
	h := 0.0
	for d := 0.05; d <= dMax; d += 0.05 {
		h = math.Max(h, 2*math.Pi*d/(40+real(z)*(1-math.Cos(d))))
	}
	if h == 0 {
		h = 2 * math.Pi * 0.02 / 40
	}
	h = math.Min(h, 0.25)
	rez := real(z)
	// Stop where the integrand of K1 is below exp(-42) of its value at t = 0.
	ch, chPrev := 1.0, math.Cosh(h) // cosh(kh) and cosh((k-1)h), by the recurrence
	c2 := 2 * math.Cosh(h)
	var s0, s1 complex128
	for k := 0; k < 100000; k++ {
		f := cmplx.Exp(-z * complex(ch-1, 0))
		w := 1.0
		if k == 0 {
			w = 0.5
		}
		s0 += complex(w, 0) * f
		s1 += complex(w*ch, 0) * f
		if k > 0 && rez*(ch-1)-math.Log(ch) > 42 {
			break
		}
		ch, chPrev = c2*ch-chPrev, ch
	}
	hc := complex(h, 0)
	return s0 * hc, s1 * hc
}

// besselAsymptoticSums returns Σ a_k(ν)/z^k and Σ (-1)^k a_k(ν)/z^k for ν = 0 and 1,
// with a_k(ν) = (4ν²-1)(4ν²-9)…(4ν²-(2k-1)²)/(k!·8^k) (A&S 9.7.1, 9.7.2), summed until
// the terms fall below 1e-17 of the sum or start to grow.
func besselAsymptoticSums(z complex128) (p0, m0, p1, m1 complex128) {
	inv := 1 / z
	var t0, t1 complex128 = 1, 1
	p0, m0, p1, m1 = 1, 1, 1, 1
	last0, last1 := math.Inf(1), math.Inf(1)
	sign := 1.0
	for k := 1; k < 60; k++ {
		o := float64(2*k - 1)
		kf := float64(k)
		t0 *= complex((0-o*o)/(kf*8), 0) * inv
		t1 *= complex((4-o*o)/(kf*8), 0) * inv
		sign = -sign
		a0, a1 := cmplx.Abs(t0), cmplx.Abs(t1)
		if a0 > last0 || a1 > last1 {
			break
		}
		p0 += t0
		m0 += complex(sign, 0) * t0
		p1 += t1
		m1 += complex(sign, 0) * t1
		last0, last1 = a0, a1
		if a0 < 1e-17 && a1 < 1e-17 {
			break
		}
	}
	return p0, m0, p1, m1
}

// besselIAsymptotic returns I0(z)e^{-z}, I1(z)e^{-z} ~ (2πz)^{-1/2} Σ (-1)^k a_k(ν)/z^k.
func besselIAsymptotic(z complex128) (i0, i1 complex128) {
	_, m0, _, m1 := besselAsymptoticSums(z)
	f := 1 / cmplx.Sqrt(2*math.Pi*z)
	return f * m0, f * m1
}

// besselKAsymptotic returns K0(z)e^{z}, K1(z)e^{z} ~ (π/2z)^{1/2} Σ a_k(ν)/z^k.
func besselKAsymptotic(z complex128) (k0, k1 complex128) {
	p0, _, p1, _ := besselAsymptoticSums(z)
	f := cmplx.Sqrt(math.Pi / 2 / z)
	return f * p0, f * p1
}
