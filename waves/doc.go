// Package waves computes time-domain transients on the line model shared with the
// frequency scans: the energisation of an open-ended line by a Bewley lattice diagram,
// by Bergeron's method of characteristics with trapezoidal lumped elements, and by the
// numerical Laplace transform of the frequency-domain network, plus the three-phase
// statistical switching studies.
//
// Voltages are in per unit of the peak phase-to-earth source EMF; times in seconds.
// Every method returns a Waveform sampled evenly from t = 0. The methods agree with
// each other where their assumptions overlap (a lossless line with a resistive source:
// lattice = Bergeron = Laplace away from wavefronts); the tests hold them to that.
//
// The package never prints, exits or reads files; data that cannot be treated returns
// an error, programmer errors panic with a "waves:" prefix.
package waves
