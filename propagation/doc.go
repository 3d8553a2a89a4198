// Package propagation gives the per-length constants of an overhead line, its
// propagation constant and surge impedance, and its two-port (ABCD) models, all at a
// complex frequency s.
//
// Everything is in SI units: ohm/m, H/m, S/m, F/m, metres, seconds and hertz. A line's
// constants are evaluated at any complex frequency s = c + jω, so the same model serves
// frequency scans (s = jω) and the numerical Laplace transform (c > 0).
//
// Per-length constants given directly (RLGC) are constant with frequency. The exact
// hyperbolic two-port is the model every analysis uses; the nominal pi, nominal T and
// short-line models exist to show their error against it.
//
// Constants from tower geometry (Geometry) vary with frequency: conductor internal
// impedance by Schelkunoff's formula in modified Bessel functions of complex argument
// (skin.go, bessel.go), earth return by the complex-depth method (earth.go), potential
// coefficients with images, earth wires eliminated by Kron reduction, and the
// positive- and zero-sequence constants of the transposed line (geometry.go). The
// complex-depth method holds at any s; measured against Carson's series on s = jω over
// 1 Hz to 1 MHz and earth of 10 to 10,000 ohm·m (TestComplexDepthAgainstCarson) its
// earth-return term is within 2.6 % and a conductor's self impedance within 0.62 %.
//
// Loading (loading.go, loadability.go): both ends held at 1 pu with the exact lossy
// two-port, the open-end rise and the reactor that limits it, and the loadability
// against length of Dunlop, Gutman and Marchenko (1979).
//
// Numerical safety: for an electrically long lossy line, cosh(γl) and sinh(γl) exceed a
// float64 once Re(γl) > ~710. TwoPort therefore carries a common scale factor
// exp(LogScale) factored out of all four elements; ratios (voltage ratios, input
// impedances) are formed from the scaled elements and stay finite.
//
// The line core, written once and called by freqscan and waves: PrincipalSqrt (the
// complex square root for γ and Zc), ExpForm and ExactExp (the exact two-port in the
// exponential form, e^{-2γl}, for per-frequency kernels that must not allocate; Line.Exact
// takes its long-line branch from it), and in sequence.go the Clarke transformation and
// the symmetrical components.
package propagation
