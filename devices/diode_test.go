package devices

import (
	"fmt"
	"math"
	"testing"
)

// testDiodes are the diode models the tests sweep: a small signal junction,
// a zener-like junction with n > 1 and breakdown near 5 V, and a rectifier
// with a 50 V breakdown and small IBV.
func testDiodes() map[string]Diode {
	return map[string]Diode{
		"signal": NewDiode(map[string]float64{"saturation_current": 1e-14}, 1, 300.15),
		"zener": NewDiode(map[string]float64{
			"saturation_current": 2e-9, "emission_coefficient": 1.8,
			"breakdown_voltage": 5.1, "breakdown_current": 1e-3,
		}, 1, 320),
		"rectifier": NewDiode(map[string]float64{
			"saturation_current": 5e-12, "breakdown_voltage": 50, "breakdown_current": 1e-5,
		}, 3, 260),
	}
}

func TestDiodeDerivative(t *testing.T) {
	// Reference: central finite differences of the same function.
	biases := []float64{-1e3, -60, -51, -50.2, -49.5, -6, -5.3, -5.1, -4.9, -4.5, -1,
		-0.2, 0, 0.05, 0.3, 0.6, 0.7, 0.8, 1.5, 3, 6, 1e3}
	for name, d := range testDiodes() {
		f := func(v float64) float64 { i, _ := d.Current(v); return i }
		h := 1e-4 * d.EmissionCoefficient * d.VT
		for _, v := range biases {
			_, g := d.Current(v)
			checkDerivative(t, fmt.Sprintf("%s dI/dV at %g V", name, v), f, v, h, g, 1e-7)
		}
	}
}

func TestDiodeTextbook(t *testing.T) {
	vt := ThermalVoltage(300.15)
	d := testDiodes()["signal"]
	// Common practice, no source: a small silicon junction (Is ≈ 1e-14 A,
	// n = 1) carries 1 mA at about 0.6–0.7 V.
	i6, _ := d.Current(0.6)
	i7, _ := d.Current(0.7)
	if !(i6 < 1e-3 && i7 > 1e-3) {
		t.Errorf("I(0.6 V) = %g A, I(0.7 V) = %g A: 1 mA not between", i6, i7)
	}
	// Shockley's law (from memory): I = Is·(exp(V/(n·VT)) − 1), so
	// gd = (Id + Is)/(n·VT).
	for _, dd := range []Diode{d, NewDiode(map[string]float64{"saturation_current": 1e-12, "emission_coefficient": 1.9}, 2, 300.15)} {
		nvt := dd.EmissionCoefficient * vt
		for _, v := range []float64{-2, -0.1, 0, 0.3, 0.65, 0.9} {
			i, g := dd.Current(v)
			if want := dd.SaturationCurrent * (math.Exp(v/nvt) - 1); !relClose(i, want, 1e-13) && math.Abs(i-want) > 1e-30 {
				t.Errorf("I(%g) = %g, Shockley %g", v, i, want)
			}
			// (the sum cancels in reverse; allow that rounding)
			if want := (i + dd.SaturationCurrent) / nvt; math.Abs(g-want) > 1e-12*g+1e-15*dd.SaturationCurrent/nvt {
				t.Errorf("gd(%g) = %g, (Id + Is)/(n·VT) = %g", v, g, want)
			}
		}
	}
	// DESIGN.md: at V = −BV the breakdown term is −IBV (less Is and the
	// forward term, negligible here).
	z := testDiodes()["zener"]
	if i, _ := z.Current(-5.1); !relClose(i, -1e-3-z.SaturationCurrent, 1e-9) {
		t.Errorf("zener I(−BV) = %g, want −IBV − Is", i)
	}
}

func TestDiodeAreaScaling(t *testing.T) {
	// DESIGN.md: area multiplies Is and Cj0, divides the series resistance.
	p := map[string]float64{"saturation_current": 1e-14, "series_resistance": 8, "junction_capacitance": 2e-12}
	one, four := NewDiode(p, 1, 300.15), NewDiode(p, 4, 300.15)
	if !relClose(four.SaturationCurrent, 4*one.SaturationCurrent, 1e-15) ||
		four.SeriesResistance != 2 || four.JunctionCapacitance != 8e-12 {
		t.Errorf("area 4: Is %g, Rs %g, Cj0 %g", four.SaturationCurrent, four.SeriesResistance, four.JunctionCapacitance)
	}
}

func TestDiodeCapacitance(t *testing.T) {
	d := NewDiode(map[string]float64{
		"saturation_current": 1e-14, "junction_capacitance": 10e-12,
		"junction_potential": 0.75, "grading_coefficient": 0.5, "transit_time": 5e-9,
	}, 1, 300.15)
	// DESIGN.md: Cj0/(1 − V/φ)^m up to φ/2, tangent line beyond; closed forms.
	c0 := 10e-12 / math.Sqrt(0.5) // Cj at φ/2
	for _, c := range []struct{ v, want float64 }{
		{0, 10e-12},
		{-2.25, 5e-12},                         // (1 + 3)^−½
		{0.375, c0},                            // φ/2
		{0.475, c0 * (1 + 0.5*0.1/0.375)},      // tangent line
		{2, c0 * (1 + 0.5*(2-0.375)/0.375)},    // far along it
		{-1e3, 10e-12 / math.Sqrt(1+1e3/0.75)}, // deep reverse
	} {
		if cj, _ := d.Capacitance(c.v, 0); !relClose(cj, c.want, 1e-13) {
			t.Errorf("Cj(%g) = %g, want %g", c.v, cj, c.want)
		}
	}
	// Continuous slope at φ/2 (the line is the tangent): one-sided differences.
	cj := func(v float64) float64 { c, _ := d.Capacitance(v, 0); return c }
	const h = 1e-7
	left, right := (cj(0.375)-cj(0.375-h))/h, (cj(0.375+h)-cj(0.375))/h
	if !relClose(left, right, 1e-5) {
		t.Errorf("dCj/dV at φ/2: %g from below, %g from above", left, right)
	}
	// Diffusion capacitance transit_time·gd (DESIGN.md).
	_, g := d.Current(0.65)
	if _, cd := d.Capacitance(0.65, g); !relClose(cd, 5e-9*g, 1e-15) {
		t.Errorf("Cd = %g, want τ·gd = %g", cd, 5e-9*g)
	}
}

func TestDiodeRegion(t *testing.T) {
	ds := testDiodes()
	z := NewDiode(map[string]float64{"saturation_current": 1e-14, "breakdown_voltage": 5.1}, 1, 300.15)
	// Documented rule: breakdown below −BV + n·VT·ln(IBV/Is) = −4.445 V here.
	for _, c := range []struct {
		d    Diode
		v    float64
		want string
	}{
		{ds["signal"], 0.65, RegionForward},
		{ds["signal"], 1e-3, RegionForward},
		{ds["signal"], 0, RegionReverse},
		{ds["signal"], -1e3, RegionReverse}, // no breakdown voltage given
		{z, -4.4, RegionReverse},
		{z, -4.5, RegionBreakdown},
		{z, -5.1, RegionBreakdown},
		{z, -1e3, RegionBreakdown},
		{ds["rectifier"], -40, RegionReverse},
		{ds["rectifier"], -50, RegionBreakdown},
	} {
		if got := c.d.Region(c.v); got != c.want {
			t.Errorf("Region(%g) = %s, want %s", c.v, got, c.want)
		}
	}
}

func TestDiodeLimitStep(t *testing.T) {
	z := testDiodes()["zener"]
	nvt := z.EmissionCoefficient * z.VT
	// Forward: same rule as limitJunctionStep with CriticalVoltage.
	if got, ch := z.LimitStep(3, 0.2); !ch || !relClose(got, 0.2+nvt*math.Log1p(2.8/nvt), 1e-14) {
		t.Errorf("forward limit = %g, %v", got, ch)
	}
	// Reverse past −BV: the same logarithmic rule in −(V + BV).
	want := -5.1 - (0.1 + nvt*math.Log1p(14.8/nvt))
	if got, ch := z.LimitStep(-20, -5.2); !ch || !relClose(got, want, 1e-14) {
		t.Errorf("breakdown limit = %g, %v, want %g", got, ch, want)
	}
	// Ordinary reverse steps stay untouched.
	if got, ch := z.LimitStep(-3, 0.6); ch || got != -3 {
		t.Errorf("reverse step changed: %g", got)
	}
	// No breakdown voltage: a deep reverse step is not limited.
	s := testDiodes()["signal"]
	if got, ch := s.LimitStep(-1e3, 0.6); ch || got != -1e3 {
		t.Errorf("signal diode reverse step changed: %g", got)
	}
}

func TestDiodeExtremeVoltages(t *testing.T) {
	for name, d := range testDiodes() {
		for _, v := range extremeVoltages {
			i, g := d.Current(v)
			cj, cd := d.Capacitance(v, g)
			lv, _ := d.LimitStep(v, -v)
			if !finite(i, g, cj, cd, lv, i*v) || d.Region(v) == "" {
				t.Errorf("%s at %g V: I %g, g %g, Cj %g, Cd %g, limit %g", name, v, i, g, cj, cd, lv)
			}
		}
	}
}
