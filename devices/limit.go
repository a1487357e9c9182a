package devices

import "math"

// expLimit is the largest argument for which boundedExp returns the exact
// exponential. exp(80) ≈ 5.5e34, so a junction with a saturation current
// as small as 1e-20 A already carries 5.5e14 A there: every bias a real
// circuit can reach lies on the exact branch, and the linear branch only
// keeps Newton's wild intermediate guesses finite. 80 rather than the
// float64 limit (about 709) leaves room for products: a current at ±1e3 V
// stays below 1e40 A and its square below 1e80, far from overflow (1.8e308).
const expLimit = 80

// expAtLimit is exp(expLimit), written out so that it is a constant (the
// tests check it against math.Exp).
const expAtLimit = 5.54062238439351e+34

// boundedExp returns e(x) and its derivative de/dx, where e is exp(x) up to
// x = expLimit and its tangent line beyond:
//
//	e(x) = exp(x)                          for x ≤ expLimit
//	e(x) = exp(expLimit)·(1 + x − expLimit) for x > expLimit
//
// Value and slope match at the joint, so e is continuously differentiable
// and the derivative returned is exact for the function actually used.
func boundedExp(x float64) (e, de float64) {
	if x <= expLimit {
		e = math.Exp(x)
		return e, e
	}
	return expAtLimit * (1 + (x - expLimit)), expAtLimit
}

// criticalVoltage returns the junction voltage at which the curve
// I = is·exp(V/nvt) bends most sharply (its radius of curvature is
// smallest there): Vcrit = nvt·ln(nvt/(√2·is)). Above it a Newton step on
// the exponential easily overshoots; below it the curve is gentle enough to
// take whole steps. The construction is L. W. Nagel's (1975 thesis on
// integrated-circuit simulation).
func criticalVoltage(nvt, is float64) float64 {
	return nvt * math.Log(nvt/(math.Sqrt2*is))
}

// limitJunctionStep limits a Newton update of a junction voltage from vold
// to vnew (nvt = n·VT, vcrit from criticalVoltage) so that the exponential
// cannot explode between iterations. Only rising steps above vcrit that are
// larger than 2·nvt are touched (a falling step shrinks the current and is
// harmless):
//
//   - from a conducting start (vold > 0, or vold ≥ vcrit where a very large
//     junction has a negative vcrit) the step becomes logarithmic,
//     v = vold + nvt·ln(1 + (vnew − vold)/nvt): the voltage at which the
//     exponential reaches the current that the linearization at vold
//     predicted for the full step, so the current follows Newton's
//     prediction instead of racing ahead along the exponential;
//   - from a non-conducting start (vold ≤ 0, below vcrit) the junction is
//     placed at vcrit, where the linearization is first trustworthy.
//
// Either way the result lies strictly between vold and vnew, so the
// iteration always moves.
//
// This is the logarithmic step limit published by L. W. Nagel (1975),
// described here in our own terms; it returns the voltage to use and
// whether it differs from vnew.
func limitJunctionStep(vnew, vold, nvt, vcrit float64) (float64, bool) {
	step := vnew - vold
	if vnew <= vcrit || step <= 2*nvt {
		return vnew, false
	}
	if vold > 0 || vold >= vcrit {
		return vold + nvt*math.Log1p(step/nvt), true
	}
	return vcrit, true
}
