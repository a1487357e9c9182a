package plot

import (
	"math"
	"math/cmplx"
)

// UnwrapPhaseDeg returns the phase of h in degrees, continuous from point
// to point: each value is arg h[i] plus the multiple of 360° that brings it
// within 180° of the value before it, so a response whose phase runs past
// −180° keeps going (−190°, −270°, −360° ...) instead of jumping back to
// +170°. The first value is the principal argument in (−180°, 180°].
//
// The samples must be dense enough that the true phase moves less than
// 180° between neighbours; a sweep of a few points per decade is ample for
// poles and zeros off the jω axis. A sample that is zero or not finite has
// no phase: its value is NaN and unwrapping continues from the last valid
// sample.
func UnwrapPhaseDeg(h []complex128) []float64 {
	out := make([]float64, len(h))
	prev, have := 0.0, false
	for i, v := range h {
		if v == 0 || cmplx.IsNaN(v) || cmplx.IsInf(v) {
			out[i] = math.NaN()
			continue
		}
		a := cmplx.Phase(v) * 180 / math.Pi
		if !have {
			if a == -180 { // −1 − 0i: keep the principal value at +180°
				a = 180
			}
			out[i], prev, have = a, a, true
			continue
		}
		a -= 360 * math.Round((a-prev)/360)
		out[i], prev = a, a
	}
	return out
}

// magnitudeDB returns 20·log10|h| for each sample; −Inf for h = 0 and NaN
// for a sample that is not finite.
func magnitudeDB(h []complex128) []float64 {
	out := make([]float64, len(h))
	for i, v := range h {
		if cmplx.IsNaN(v) || cmplx.IsInf(v) {
			out[i] = math.NaN()
			continue
		}
		out[i] = 20 * math.Log10(cmplx.Abs(v))
	}
	return out
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
