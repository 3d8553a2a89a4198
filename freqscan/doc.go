// Package freqscan models the network around a line (source, shunts, termination) at a
// complex frequency s and scans it over frequency for voltage magnification, driving-
// point impedances and resonances.
//
// The circuit, from the sending end: the source EMF behind the source impedance; the
// sending bus with its bus-connected shunts; the breaker; the line with its
// line-connected shunts at both ends; at the receiving end the bus-connected shunts and
// the load. The source resistance is constant with frequency; inductances and
// capacitances keep their values, so reactances scale with frequency.
//
// What it covers:
//   - Network.At: the response at any complex s (the numerical Laplace transform and
//     the energisation models use it too);
//   - LinearGrid, LogGrid and Scan: gains |Vr/E|, |Vr/Vs|, |Vs/E| and the driving-point
//     impedances over a frequency grid, spread over the cores;
//   - Peaks and ImpedanceResonances: resonances refined between grid points, with
//     half-power bandwidth and Q, and unbounded resonances of lossless networks flagged;
//   - Screen: integer harmonics against a watch list, a gain limit and planning levels
//     (IEC TR 61000-3-6), triplen harmonics on the zero-sequence network;
//   - SourceStrength: the first resonance and the gain over a range of source
//     short-circuit levels.
package freqscan
