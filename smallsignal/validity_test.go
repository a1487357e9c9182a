package smallsignal

import (
	"math"
	"testing"
)

// For i = Is·exp(v/VT) the departure is e^x − 1 − x = 0.1·x with x = δ/VT;
// its nonzero roots, x ≈ +0.1877 (e^x − 1 − 1.1x = 0) and x ≈ −0.2146
// (e^x − 1 − 0.9x = 0), are checked below by substitution into those
// elementary equations (closed form, no outside value needed).
// For i = (β/2)·v² the departure is (β/2)δ² = 0.1·β·v0·δ, δ = ±0.2·v0.
func TestValidityClosedForms(t *testing.T) {
	const vt = 0.025852
	exp := func(d float64) float64 { return 1e-14 * math.Exp((0.65+d)/vt) }
	g := exp(0) / vt
	minus, plus := Validity(exp, g)
	for _, tc := range []struct {
		name     string
		x        float64
		residual func(x float64) float64
	}{
		{"plus", plus / vt, func(x float64) float64 { return math.Exp(x) - 1 - 1.1*x }},
		{"minus", minus / vt, func(x float64) float64 { return math.Exp(x) - 1 - 0.9*x }},
	} {
		if r := tc.residual(tc.x); math.Abs(r) > 1e-9 {
			t.Errorf("%s: x = %.6f leaves residual %g", tc.name, tc.x, r)
		}
	}
	if math.Abs(plus/vt-0.1877) > 1e-4 || math.Abs(minus/vt+0.2146) > 1e-4 {
		t.Errorf("exponential: δ = %g, %g VT", minus/vt, plus/vt)
	}

	const beta, vov = 2e-3, 0.3
	sq := func(d float64) float64 { return beta / 2 * (vov + d) * (vov + d) }
	minus, plus = Validity(sq, beta*vov)
	if math.Abs(plus-0.2*vov) > 1e-9 || math.Abs(minus+0.2*vov) > 1e-9 {
		t.Errorf("square law: δ = %g, %g, want ±%g", minus, plus, 0.2*vov)
	}

	if m, p := Validity(func(float64) float64 { return 0 }, 0); !math.IsNaN(m) || !math.IsNaN(p) {
		t.Errorf("no tangent: got %g, %g, want NaN", m, p)
	}
	if m, p := Validity(func(d float64) float64 { return 3 * d }, 3); !math.IsInf(m, -1) || !math.IsInf(p, 1) {
		t.Errorf("linear: got %g, %g, want ±Inf", m, p)
	}
}
