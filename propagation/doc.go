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
// Numerical safety: for an electrically long lossy line, cosh(γl) and sinh(γl) exceed a
// float64 once Re(γl) > ~710. TwoPort therefore carries a common scale factor
// exp(LogScale) factored out of all four elements; ratios (voltage ratios, input
// impedances) are formed from the scaled elements and stay finite.
package propagation
