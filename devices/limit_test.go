package devices

import (
	"math"
	"testing"
)

func TestBoundedExp(t *testing.T) {
	if want := math.Exp(expLimit); !relClose(expAtLimit, want, 2e-16) {
		t.Fatalf("expAtLimit = %.17g, want exp(%d) = %.17g", float64(expAtLimit), expLimit, want)
	}
	// Exact below the limit (closed form: exp itself).
	for _, x := range []float64{-800, -50, -1, 0, 1, 40, 79.9} {
		if e, de := boundedExp(x); e != math.Exp(x) || de != math.Exp(x) {
			t.Errorf("boundedExp(%g) = %g, %g, want exp = %g", x, e, de, math.Exp(x))
		}
	}
	// Tangent line beyond: value and slope match at the joint.
	for _, x := range []float64{expLimit + 1e-9, 81, 200, 1e5} {
		e, de := boundedExp(x)
		if want := expAtLimit * (1 + x - expLimit); !relClose(e, want, 1e-15) || de != expAtLimit {
			t.Errorf("boundedExp(%g) = %g, %g, want %g, %g", x, e, de, want, float64(expAtLimit))
		}
	}
	// Reference: central finite difference.
	for _, x := range []float64{70, 79.99, 80.01, 90, 1e4} {
		_, de := boundedExp(x)
		checkDerivative(t, "boundedExp", func(x float64) float64 { e, _ := boundedExp(x); return e }, x, 1e-6, de, 1e-8)
	}
	if e, de := boundedExp(1e3 / ThermalVoltage(200)); !finite(e, de, e*e) {
		t.Errorf("boundedExp at 1e3 V over VT(200 K) not finite with a finite square: %g %g", e, de)
	}
}

func TestCriticalVoltage(t *testing.T) {
	// Closed form (L. W. Nagel, 1975): Vcrit = nVT·ln(nVT/(√2·Is)).
	vt := ThermalVoltage(300.15)
	want := vt * math.Log(vt/(math.Sqrt(2)*1e-14))
	d := NewDiode(map[string]float64{"saturation_current": 1e-14}, 1, 300.15)
	if !relClose(d.CriticalVoltage, want, 1e-14) {
		t.Errorf("Vcrit = %.15g, want %.15g", d.CriticalVoltage, want)
	}
	// Closed form: the exponential's curvature κ = f''/(1 + f'²)^1.5 is
	// largest where f' = 1/√2, which is Vcrit.
	curv := func(v float64) float64 {
		f1 := 1e-14 / vt * math.Exp(v/vt)
		return f1 / vt / math.Pow(1+f1*f1, 1.5)
	}
	if c := curv(want); !(c > curv(want-0.005) && c > curv(want+0.005)) {
		t.Errorf("curvature at Vcrit %g is not a maximum", c)
	}
}

func TestLimitJunctionStep(t *testing.T) {
	vt := ThermalVoltage(300.15)
	const is = 1e-14
	vcrit := criticalVoltage(vt, is)
	cases := []struct {
		name       string
		vnew, vold float64
		want       float64
		changed    bool
	}{
		{"below vcrit", 0.6, 0, 0.6, false},
		{"small rising step", vcrit + vt, vcrit, vcrit + vt, false},
		{"falling step", 0.2, 1.5, 0.2, false},
		{"from reverse", 5, -1, vcrit, true},
		// Closed form of the logarithmic step.
		{"from conducting", 5, 0.7, 0.7 + vt*math.Log(1+4.3/vt), true},
	}
	for _, c := range cases {
		got, changed := limitJunctionStep(c.vnew, c.vold, vt, vcrit)
		if changed != c.changed || !relClose(got, c.want, 1e-14) {
			t.Errorf("%s: limit(%g from %g) = %.12g, %v; want %.12g, %v", c.name, c.vnew, c.vold, got, changed, c.want, c.changed)
		}
	}
	// The limited voltage carries the current that the linearization at vold
	// predicted for the full step: Is·e^(v/VT) = Is·e^(vold/VT)·(1 + Δ/VT).
	v, _ := limitJunctionStep(2, 0.75, vt, vcrit)
	if got, want := is*math.Exp(v/vt), is*math.Exp(0.75/vt)*(1+1.25/vt); !relClose(got, want, 1e-12) {
		t.Errorf("current at limited voltage %g A, linear prediction %g A", got, want)
	}
	// Whatever it does, the result lies between vold and vnew (or equals vnew).
	for _, vold := range []float64{-1e3, -2, 0, 0.3, 0.7, 0.9, 3, 1e3} {
		for _, vnew := range []float64{-1e3, -1, 0, 0.5, 0.8, 1, 5, 1e3} {
			got, changed := limitJunctionStep(vnew, vold, vt, vcrit)
			lo, hi := math.Min(vold, vnew), math.Max(vold, vnew)
			if !finite(got) || (changed && !(got > lo && got < hi)) || (!changed && got != vnew) {
				t.Errorf("limit(%g from %g) = %g, %v: outside the step", vnew, vold, got, changed)
			}
		}
	}
	// A junction so large that vcrit < 0 still moves.
	big := criticalVoltage(vt, 1)
	if got, changed := limitJunctionStep(1, big/2, vt, big); !changed || !(got > big/2 && got < 1) {
		t.Errorf("negative vcrit %g: limit(1 from %g) = %g, %v", big, big/2, got, changed)
	}
}
