package dc

import (
	"math"
	"testing"

	"tangent/cases"
	"tangent/devices"
)

// lambertW returns the principal branch W0(x) for x ≥ 0, given as
// L = ln(x) so that huge arguments do not overflow. Halley's iteration on
// f(w) = w + ln(w) − L (the logarithm of w·e^w = x) for x > e, and on
// f(w) = w·e^w − x below (R. M. Corless et al., "On the Lambert W
// function", Adv. Comput. Math. 5, 1996, from memory).
func lambertW(L float64) float64 {
	if L > 1 {
		w := L - math.Log(L)
		for k := 0; k < 50; k++ {
			f := w + math.Log(w) - L
			f1 := 1 + 1/w
			f2 := -1 / (w * w)
			dw := 2 * f * f1 / (2*f1*f1 - f*f2)
			w -= dw
			if math.Abs(dw) <= 1e-16*w {
				break
			}
		}
		return w
	}
	x := math.Exp(L)
	w := math.Log1p(x) // a start below W for x ≤ e
	for k := 0; k < 50; k++ {
		e := math.Exp(w)
		f := w*e - x
		f1 := e * (w + 1)
		f2 := e * (w + 2)
		dw := 2 * f * f1 / (2*f1*f1 - f*f2)
		w -= dw
		if math.Abs(dw) <= 1e-16*math.Abs(w) {
			break
		}
	}
	return w
}

func TestLambertW(t *testing.T) {
	// W(e) = 1 and W(1) = Ω = 0.5671432904097838 (the omega constant,
	// from memory); W(x·e^x) = x by definition.
	cases := []struct{ L, want float64 }{
		{1, 1},
		{0, 0.5671432904097838},
		{math.Log(5) + 5, 5},
		{math.Log(200) + 200, 200},
		{math.Log(1e-3) + 1e-3, 1e-3},
	}
	for _, c := range cases {
		if got := lambertW(c.L); !near(got, c.want, 1e-14, 0) {
			t.Errorf("W(exp(%g)) = %.17g, want %.17g", c.L, got, c.want)
		}
	}
}

// A diode in series with a resistor across a source: the current is
// I = (n·VT/R)·W((Is·R/(n·VT))·exp((Vs + Is·R)/(n·VT))) − Is
// (T. C. Banwell, A. Jayakumar, "Exact analytical solution for current
// flow through diode with series resistance", Electronics Letters 36(4),
// 2000). The diode's series resistance, when given, adds to R.
func TestDiodeResistorLambertW(t *testing.T) {
	tests := []struct {
		name          string
		vs, r, is, n  float64
		seriesR, area float64
	}{
		{"forward 5 V 1k", 5, 1e3, 1e-14, 1, 0, 1},
		{"forward 1 V 100R", 1, 100, 2.52e-9, 1.752, 0, 1},
		{"low drive 0.3 V 10k", 0.3, 1e4, 1e-12, 1.2, 0, 1},
		{"reverse −5 V", -5, 1e3, 1e-14, 1, 0, 1},
		{"high drive 50 V 10R", 50, 10, 1e-15, 1, 0, 1},
		{"series resistance 2 Ω, area 2", 3, 47, 4e-15, 1.05, 2, 2},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			params := map[string]float64{"saturation_current": tt.is, "emission_coefficient": tt.n}
			if tt.seriesR > 0 {
				params["series_resistance"] = tt.seriesR
			}
			c := build(map[string]*cases.Model{"d": model(cases.DeviceDiode, params)},
				vsrc("VS", "in", "gnd", tt.vs),
				res("R1", "in", "a", tt.r),
				diode("D1", "d", "a", "gnd"))
			c.Parts[2].Area = tt.area
			op, err := Solve(c)
			if err != nil {
				t.Fatal(err)
			}
			nvt := tt.n * vtRoom
			is := tt.is * tt.area
			r := tt.r + tt.seriesR/tt.area // area divides the series resistance (DESIGN.md)
			L := math.Log(is*r/nvt) + (tt.vs+is*r)/nvt
			want := nvt/r*lambertW(L) - is
			got := op.Part("D1").Current
			if !near(got, want, 1e-9, 1e-20) {
				t.Errorf("I(D1) = %.12g A, Lambert W gives %.12g A (method %s)", got, want, op.Method)
			}
			if got := op.Part("R1").Current; !near(got, want, 1e-9, 1e-20) {
				t.Errorf("I(R1) = %.12g A, want %.12g A", got, want)
			}
			checkBalance(t, op, 1e-9, 1e-18)
		})
	}
}

// A square-law NMOS with source degeneration Rs, in saturation, gate held
// at VG: Id = (β/2)·(VG − Id·Rs − Vt)², whose root with VG − Id·Rs > Vt is
// Id = ((1 + β·u·Rs) − √(1 + 2·β·u·Rs))/(β·Rs²), u = VG − Vt (algebra on
// the square law of DESIGN.md).
func TestDegeneratedNMOS(t *testing.T) {
	tests := []struct {
		name              string
		vdd, vg, rd, rs   float64
		vt, kp, w, l      float64
		wantRegionSatured bool
	}{
		{"1 mA class", 10, 3, 2e3, 1e3, 0.8, 200e-6, 20e-6, 2e-6, true},
		{"light", 5, 1.5, 10e3, 4.7e3, 0.6, 100e-6, 10e-6, 1e-6, true},
		{"strong", 12, 5, 470, 220, 1.1, 60e-6, 100e-6, 1e-6, true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			m := model(cases.DeviceNMOS, map[string]float64{
				"threshold_voltage": tt.vt, "process_transconductance": tt.kp, "width": tt.w, "length": tt.l})
			c := build(map[string]*cases.Model{"n": m},
				vsrc("VDD", "vdd", "gnd", tt.vdd),
				vsrc("VG", "g", "gnd", tt.vg),
				res("RD", "vdd", "d", tt.rd),
				mos("M1", "n", "d", "g", "s", "gnd"),
				res("RS", "s", "gnd", tt.rs))
			op, err := Solve(c)
			if err != nil {
				t.Fatal(err)
			}
			beta := tt.kp * tt.w / tt.l
			u := tt.vg - tt.vt
			want := ((1 + beta*u*tt.rs) - math.Sqrt(1+2*beta*u*tt.rs)) / (beta * tt.rs * tt.rs)
			p := op.Part("M1")
			if got := p.Current; !near(got, want, 1e-9, 1e-18) {
				t.Errorf("Id = %.12g A, closed form %.12g A", got, want)
			}
			if p.Device.Region != devices.RegionSaturation {
				t.Errorf("region %s, want saturation", p.Device.Region)
			}
			if got := nodeV(t, op, "s"); !near(got, want*tt.rs, 1e-9, 1e-15) {
				t.Errorf("V(s) = %g, want %g", got, want*tt.rs)
			}
			checkBalance(t, op, 1e-9, 1e-18)
		})
	}
}

// A diode-connected NMOS fed by a current source sits at
// Vgs = Vt + √(2·I/β) (square law in saturation, λ = 0, DESIGN.md).
func TestDiodeConnectedNMOS(t *testing.T) {
	for _, i := range []float64{1e-6, 100e-6, 2e-3} {
		m := model(cases.DeviceNMOS, map[string]float64{
			"threshold_voltage": 0.7, "process_transconductance": 120e-6, "width": 8e-6, "length": 1e-6})
		c := build(map[string]*cases.Model{"n": m},
			isrc("IREF", "gnd", "d", i),
			mos("M1", "n", "d", "d", "gnd", "gnd"))
		op, err := Solve(c)
		if err != nil {
			t.Fatal(err)
		}
		beta := 120e-6 * 8
		want := 0.7 + math.Sqrt(2*i/beta)
		if got := nodeV(t, op, "d"); !near(got, want, 1e-9, 1e-12) {
			t.Errorf("I = %g: Vgs = %.12g V, want %.12g V (method %s)", i, got, want, op.Method)
		}
		checkBalance(t, op, 1e-9, 1e-18)
	}
}

// emBJT is the Ebers-Moll transport model of DESIGN.md for an npn with
// infinite Early voltages (J. J. Ebers, J. L. Moll, Proc. IRE 42(12),
// 1954; transport form, from memory).
func emBJT(is, bf, br, vt, vbe, vbc float64) (ic, ib float64) {
	ef, er := math.Exp(vbe/vt), math.Exp(vbc/vt)
	ic = is*(ef-er) - is/br*(er-1)
	ib = is/bf*(ef-1) + is/br*(er-1)
	return
}

// A divider-biased npn with collector and emitter resistors, solved
// independently: bisection on Vbe, with Vbc found for each Vbe by a fixed
// point (it barely affects the currents when the collector junction is
// reverse biased), until the base current equals the Thévenin divider's
// (VTH − Vb)/RTH. Terminal resistances add to the external resistors.
func TestDividerBiasedNPN(t *testing.T) {
	tests := []struct {
		name                  string
		vcc, rb1, rb2, rc, re float64
		is, bf, br            float64
		rbb, rcc, ree         float64 // model terminal resistances
	}{
		{"textbook stage", 12, 82e3, 22e3, 4.7e3, 1.2e3, 1e-15, 150, 2, 0, 0, 0},
		{"high beta low current", 9, 330e3, 47e3, 22e3, 5.6e3, 5e-16, 400, 1, 0, 0, 0},
		{"with terminal resistances", 12, 82e3, 22e3, 4.7e3, 1.2e3, 1e-15, 150, 2, 250, 20, 2},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			params := map[string]float64{"saturation_current": tt.is, "forward_beta": tt.bf, "reverse_beta": tt.br}
			if tt.rbb > 0 {
				params["base_resistance"] = tt.rbb
				params["collector_resistance"] = tt.rcc
				params["emitter_resistance"] = tt.ree
			}
			c := build(map[string]*cases.Model{"q": model(cases.DeviceNPN, params)},
				vsrc("VCC", "vcc", "gnd", tt.vcc),
				res("RB1", "vcc", "b", tt.rb1),
				res("RB2", "b", "gnd", tt.rb2),
				res("RC", "vcc", "c", tt.rc),
				bjt("Q1", "q", "c", "b", "e"),
				res("RE", "e", "gnd", tt.re))
			op, err := Solve(c)
			if err != nil {
				t.Fatal(err)
			}
			vth := tt.vcc * tt.rb2 / (tt.rb1 + tt.rb2)
			rth := tt.rb1*tt.rb2/(tt.rb1+tt.rb2) + tt.rbb
			rc, re := tt.rc+tt.rcc, tt.re+tt.ree
			solveAt := func(vbe float64) (h, ic, ib, vb float64) {
				vbc := -1.0
				for k := 0; k < 100; k++ {
					ic, ib = emBJT(tt.is, tt.bf, tt.br, vtRoom, vbe, vbc)
					ve := (ic + ib) * re
					vb = ve + vbe
					vc := tt.vcc - ic*rc
					next := vb - vc
					if next == vbc {
						break
					}
					vbc = next
				}
				return (vth-vb)/rth - ib, ic, ib, vb
			}
			lo, hi := 0.3, 0.9
			for k := 0; k < 200 && hi-lo > 1e-16; k++ {
				mid := (lo + hi) / 2
				if h, _, _, _ := solveAt(mid); h > 0 {
					lo = mid
				} else {
					hi = mid
				}
			}
			_, ic, ib, _ := solveAt((lo + hi) / 2)
			q := op.Part("Q1")
			if got := q.Terminals[0].Current; !near(got, ic, 1e-8, 0) {
				t.Errorf("Ic = %.12g A, Ebers-Moll gives %.12g A", got, ic)
			}
			if got := q.Terminals[1].Current; !near(got, ib, 1e-8, 0) {
				t.Errorf("Ib = %.12g A, Ebers-Moll gives %.12g A", got, ib)
			}
			if q.Device.Region != devices.RegionForwardActive {
				t.Errorf("region %s, want forward_active", q.Device.Region)
			}
			checkBalance(t, op, 1e-9, 1e-18)
		})
	}
}
