package freqscan

import "math"

// LinearGrid returns n frequencies (Hz) evenly spaced from fMin to fMax inclusive,
// reusing dst when it has the capacity. It panics unless 0 < fMin < fMax and n >= 2.
func LinearGrid(dst []float64, fMin, fMax float64, n int) []float64 {
	checkGrid(fMin, fMax, n)
	dst = grow(dst, n)
	step := (fMax - fMin) / float64(n-1)
	for i := range dst {
		dst[i] = fMin + float64(i)*step
	}
	dst[n-1] = fMax
	return dst
}

// LogGrid returns n frequencies (Hz) evenly spaced in log f from fMin to fMax
// inclusive, reusing dst when it has the capacity. It panics unless 0 < fMin < fMax
// and n >= 2.
func LogGrid(dst []float64, fMin, fMax float64, n int) []float64 {
	checkGrid(fMin, fMax, n)
	dst = grow(dst, n)
	lo, hi := math.Log(fMin), math.Log(fMax)
	step := (hi - lo) / float64(n-1)
	for i := range dst {
		dst[i] = math.Exp(lo + float64(i)*step)
	}
	dst[0], dst[n-1] = fMin, fMax
	return dst
}

func checkGrid(fMin, fMax float64, n int) {
	if !(fMin > 0 && fMax > fMin && !math.IsInf(fMax, 0)) || n < 2 {
		panic("freqscan: grid needs 0 < fMin < fMax and at least 2 points")
	}
}

func grow[T any](dst []T, n int) []T {
	if cap(dst) >= n {
		return dst[:n]
	}
	return make([]T, n)
}
