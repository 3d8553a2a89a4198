package propagation

// GoldenMax returns the maximum of f on [a, b], where f is unimodal, by golden-section
// search: each step keeps the part of the bracket that holds the larger of two interior
// values (the lower part on a tie), until stop(a, b) says the bracket is narrow enough
// or after maxIter steps. It returns the better of the last two interior points. The
// one golden-section search of the module: freqscan refines resonance peaks and band
// maxima with it, Loading the voltage extremes along the line, and the remedy search
// the pre-insertion resistor.
//
// References:
//   - Kiefer, J., Sequential minimax search for a maximum, Proc. AMS 4 (1953) 502-506.
func GoldenMax(f func(float64) float64, a, b float64, stop func(a, b float64) bool, maxIter int) (x, fx float64) {
	const invPhi = 0.6180339887498949 // (√5 - 1)/2
	c := b - invPhi*(b-a)
	d := a + invPhi*(b-a)
	fc, fd := f(c), f(d)
	for it := 0; it < maxIter && !stop(a, b); it++ {
		if fc >= fd {
			b, d, fd = d, c, fc
			c = b - invPhi*(b-a)
			fc = f(c)
		} else {
			a, c, fc = c, d, fd
			d = a + invPhi*(b-a)
			fd = f(d)
		}
	}
	if fd > fc {
		return d, fd
	}
	return c, fc
}
