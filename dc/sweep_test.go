package dc

import (
	"errors"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"tangent/cases"
)

// linspace returns n values from a to b inclusive.
func linspace(a, b float64, n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = a + (b-a)*float64(i)/float64(n-1)
	}
	return v
}

// The I-V curve of a diode behind 1 kΩ, swept from −2 V to 5 V, matches
// the exact Lambert-W solution at every point (T. C. Banwell,
// A. Jayakumar, Electronics Letters 36(4), 2000; as in
// TestDiodeResistorLambertW).
func TestSweepDiodeLambertW(t *testing.T) {
	const is, r = 1e-14, 1e3
	c := build(map[string]*cases.Model{"d": model(cases.DeviceDiode, map[string]float64{"saturation_current": is})},
		vsrc("VS", "in", "gnd", 0),
		res("R1", "in", "a", r),
		diode("D1", "d", "a", "gnd"))
	values := linspace(-2, 5, 29)
	sw, err := SweepSource(c, "VS", values, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(sw.Points) != len(values) || sw.Kind != cases.VoltageSource {
		t.Fatalf("%d points of %s, want %d of a voltage source", len(sw.Points), sw.Kind, len(values))
	}
	for i, op := range sw.Points {
		vs := values[i]
		L := math.Log(is*r/vtRoom) + (vs+is*r)/vtRoom
		want := vtRoom/r*lambertW(L) - is
		if got := op.Part("D1").Current; !near(got, want, 1e-9, 1e-20) {
			t.Errorf("VS = %g V: I(D1) = %.12g A, Lambert W gives %.12g A", vs, got, want)
		}
		// The point's own circuit carries the swept value, and the
		// source's reported power is that of the swept value.
		if got := op.Circuit.Parts[0].DC; got != vs {
			t.Errorf("point %d: circuit's VS = %g V, want %g V", i, got, vs)
		}
		// (To the solver's current tolerance, 1 pA, far below it here.)
		if got, want := op.Part("VS").Power, -vs*op.Part("R1").Current; !near(got, want, 1e-12, 1e-18) {
			t.Errorf("VS = %g V: P(VS) = %g W, want %g W", vs, got, want)
		}
		checkBalance(t, op, 1e-9, 1e-18)
	}
	if c.Parts[0].DC != 0 {
		t.Error("SweepSource modified its input")
	}
}

// A current source swept over five decades into a diode: the junction
// voltage is Shockley's law inverted, V = VT·ln(1 + I/Is) (exact for the
// ideal diode), and the source's table entry reports the swept current.
func TestSweepCurrentSource(t *testing.T) {
	const is = 2e-15
	c := build(map[string]*cases.Model{"d": model(cases.DeviceDiode, map[string]float64{"saturation_current": is})},
		isrc("IB", "gnd", "a", 0),
		diode("D1", "d", "a", "gnd"))
	var values []float64
	for e := -8.0; e <= -2; e += 0.5 {
		values = append(values, math.Pow(10, e))
	}
	sw, err := SweepSource(c, "IB", values, Options{})
	if err != nil {
		t.Fatal(err)
	}
	for k, op := range sw.Points {
		i := values[k]
		if got, want := nodeV(t, op, "a"), vtRoom*math.Log1p(i/is); !near(got, want, 1e-9, 1e-12) {
			t.Errorf("I = %g A: V(a) = %.12g V, want %.12g V", i, got, want)
		}
		if got := op.Part("IB").Current; got != i {
			t.Errorf("I = %g A: the table says %g A", i, got)
		}
		checkBalance(t, op, 1e-9, 1e-18)
	}
}

// Every point of a sweep is the operating point of the circuit with that
// value, whatever start it came from: a fresh Solve of the changed
// circuit agrees to the solver's tolerance.
func TestSweepMatchesFreshSolves(t *testing.T) {
	c, err := cases.Example("ce_amplifier")
	if err != nil {
		t.Fatal(err)
	}
	var src string
	for _, p := range c.Parts {
		if p.Kind == cases.VoltageSource {
			src = p.Name // the first voltage source: the supply
			break
		}
	}
	values := linspace(0, 15, 16)
	sw, err := SweepSource(c, src, values, Options{})
	if err != nil {
		t.Fatal(err)
	}
	for i, v := range values {
		cc := *c
		cc.Parts = append([]*cases.Part(nil), c.Parts...)
		for k, p := range cc.Parts {
			if p.Name == src {
				q := *p
				q.DC = v
				cc.Parts[k] = &q
			}
		}
		want, err := Solve(&cc)
		if err != nil {
			t.Fatal(err)
		}
		got := sw.Points[i]
		for k, x := range want.X {
			if !near(got.X[k], x, 1e-8, 1e-9) {
				t.Errorf("%s = %g V: unknown %s = %.12g, fresh solve %.12g", src, v, want.System.Layout.Unknowns[k].Name, got.X[k], x)
			}
		}
	}
}

// An emitter-coupled Schmitt trigger remembers where it came from: swept
// up from 0 V its input at 2.3 V leaves Q2 on (output low: with
// VE ≈ 1.9 V, about 4 mA through the 1 kΩ load puts it near 5 V), swept
// down from 4 V it leaves Q1 on and Q2 off (output at the 9 V supply). The
// two states are the file's hand analysis (testdata/hard/schmitt_bjt.toml);
// that a sweep follows the branch it is on is the point of starting each
// point from the last (common practice).
func TestSweepFollowsHysteresis(t *testing.T) {
	c, err := cases.Load(filepath.Join("..", "testdata", "hard", "schmitt_bjt.toml"))
	if err != nil {
		t.Fatal(err)
	}
	up := linspace(0, 4, 41)
	down := linspace(4, 0, 41)
	at := func(sw *Sweep, v float64) *OperatingPoint {
		for i, x := range sw.Values {
			if math.Abs(x-v) < 1e-9 {
				return sw.Points[i]
			}
		}
		t.Fatalf("no point at %g V", v)
		return nil
	}
	rising, err := SweepSource(c, "VIN", up, Options{})
	if err != nil {
		t.Fatal(err)
	}
	falling, err := SweepSource(c, "VIN", down, Options{})
	if err != nil {
		t.Fatal(err)
	}
	lo, hi := nodeV(t, at(rising, 2.3), "out"), nodeV(t, at(falling, 2.3), "out")
	if !(lo > 4.5 && lo < 6 && hi > 8.5) {
		t.Errorf("V(out) at 2.3 V: %g V rising, %g V falling; want near 5 V rising and above 8.5 V falling", lo, hi)
	}
	// Far outside the band both directions agree.
	for _, v := range []float64{0.5, 3.8} {
		a, b := nodeV(t, at(rising, v), "out"), nodeV(t, at(falling, v), "out")
		if !near(a, b, 1e-8, 1e-9) {
			t.Errorf("V(out) at %g V: %g rising, %g falling", v, a, b)
		}
	}
}

// A point that does not converge is named by a *SweepError that still
// wraps the solver's own error.
func TestSweepErrorAtPoint(t *testing.T) {
	c, err := cases.Load(filepath.Join("..", "testdata", "dc", "starved_solver.toml"))
	if err != nil {
		t.Fatal(err)
	}
	_, err = SweepSource(c, "VIN", []float64{0, 1}, Options{})
	var se *SweepError
	var nc *NoConvergenceError
	if !errors.As(err, &se) || !errors.As(err, &nc) {
		t.Fatalf("err = %v, want a *SweepError wrapping a *NoConvergenceError", err)
	}
	if se.Index != 0 || se.Value != 0 || se.Source != "VIN" || !strings.Contains(err.Error(), "sweep of VIN at 0 V") {
		t.Errorf("SweepError %+v: %v", se, err)
	}
}

func TestSweepErrors(t *testing.T) {
	c := build(nil, vsrc("V1", "a", "gnd", 1), res("R1", "a", "gnd", 1e3))
	for _, tt := range []struct{ source, want string }{
		{"V9", `no part named "V9"`},
		{"R1", "only an independent source"},
	} {
		if _, err := SweepSource(c, tt.source, []float64{1}, Options{}); err == nil || !strings.Contains(err.Error(), tt.want) {
			t.Errorf("sweep %s: err = %v, want %q", tt.source, err, tt.want)
		}
	}
}
