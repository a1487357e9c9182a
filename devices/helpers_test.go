package devices

import (
	"math"
	"testing"
)

// centralDifference returns (f(x+h) − f(x−h))/(2h) and the size of the
// rounding error it may carry, a few ulps of the larger |f| divided by h.
func centralDifference(f func(float64) float64, x, h float64) (d, roundoff float64) {
	fp, fm := f(x+h), f(x-h)
	const eps = 0x1p-52
	return (fp - fm) / (2 * h), 8 * eps * math.Max(math.Abs(fp), math.Abs(fm)) / h
}

// checkDerivative compares an analytic derivative with a central difference
// of f at x: they must agree within rel·|analytic| plus the difference's own
// rounding error.
func checkDerivative(t *testing.T, name string, f func(float64) float64, x, h, analytic, rel float64) {
	t.Helper()
	fd, roundoff := centralDifference(f, x, h)
	if tol := rel*math.Abs(analytic) + roundoff; math.Abs(fd-analytic) > tol || math.IsNaN(analytic) {
		t.Errorf("%s: analytic %.12g, central difference %.12g (tolerance %.3g)", name, analytic, fd, tol)
	}
}

// relClose reports whether got is within rel of want (relative to |want|).
func relClose(got, want, rel float64) bool {
	return math.Abs(got-want) <= rel*math.Abs(want)
}

func finite(xs ...float64) bool {
	for _, x := range xs {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

// extremeVoltages spans the range a wild Newton iteration may try, ±1e3 V.
var extremeVoltages = []float64{-1e3, -100, -10, -1, 0, 1, 10, 100, 1e3}
