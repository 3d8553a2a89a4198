// Package freqscan models the network around a line (source, shunts, termination) at a
// complex frequency s and scans it over frequency for voltage magnification, driving-
// point impedances and resonances.
//
// The circuit, from the sending end: the source EMF behind the source impedance; the
// sending bus with its bus-connected shunts; the breaker; the line with its
// line-connected shunts at both ends; at the receiving end the bus-connected shunts and
// the load. The source resistance is constant with frequency; inductances and
// capacitances keep their values, so reactances scale with frequency.
package freqscan
