package smallsignal

import (
	"math"
	"testing"

	"tangent/devices"
)

func near(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if math.Abs(got-want) > rel*math.Abs(want) {
		t.Errorf("%s = %.12g, want %.12g (rel. diff %.2g)", what, got, want, math.Abs(got-want)/math.Abs(want))
	}
}

// Each small-signal parameter against its textbook formula at a known
// bias (Sedra & Smith, Microelectronic Circuits, and Gray, Hurst, Lewis &
// Meyer, Analysis and Design of Analog Integrated Circuits; formulas from
// memory).
func TestBJTTextbook(t *testing.T) {
	const vbe, vbc = 0.65, -5.0
	// No Early effect: gm = Ic/VT, r_pi = βF/gm.
	q := devices.NewBJT("npn", map[string]float64{"saturation_current": 1e-15, "forward_beta": 150}, 1, 300.15)
	p := HybridPi(&q, vbe, vbc)
	near(t, "gm", p.Gm, p.Ic/q.VT, 1e-10)
	near(t, "r_pi", 1/p.GPi, 150/p.Gm, 1e-10)
	if r := Resistance(p.GO); !math.IsInf(r, 1) {
		t.Errorf("r_o = %g without Early effect, want open (1/r_o = %g)", r, p.GO)
	}
	near(t, "beta_ac", p.BetaAC, 150, 1e-10)

	// Transport-form Early factor (1 − Vbc/VA): r_o = (VA − Vbc)/Ic.
	const va = 80.0
	q = devices.NewBJT("npn", map[string]float64{"saturation_current": 1e-15, "forward_beta": 150,
		"forward_early_voltage": va, "be_capacitance": 2e-12, "bc_capacitance": 1e-12,
		"forward_transit_time": 400e-12}, 1, 300.15)
	p = HybridPi(&q, vbe, vbc)
	near(t, "r_o", 1/p.GO, (va-vbc)/p.Ic, 1e-10)
	// Cπ = Cje(Vbe) + τF·gm, Cje(V) = Cje0/(1 − V/φ)^m beyond φ/2 continued
	// linearly: at 0.65 V > φ/2 = 0.375 V the tangent line at φ/2 applies,
	// Cje0·2^m·(1 + m·(V − φ/2)/(φ/2)) (depletion approximation with the
	// usual linear continuation, from memory). The device's τF term uses the
	// forward transport conductance, within VT/VA of gm.
	const phi, m = 0.75, 0.33
	cje := 2e-12 * math.Pow(2, m) * (1 + m*(vbe-phi/2)/(phi/2))
	near(t, "c_pi", p.CPi, cje+400e-12*p.Gm, 1e-3)
	near(t, "c_mu", p.CMu, 1e-12/math.Pow(1-vbc/phi, m), 1e-10)
	near(t, "f_t", p.FT, p.Gm/(2*math.Pi*(p.CPi+p.CMu)), 1e-12)

	// pnp mirrors: the same magnitudes at mirrored voltages.
	qp := devices.NewBJT("pnp", map[string]float64{"saturation_current": 1e-15, "forward_beta": 150, "forward_early_voltage": va}, 1, 300.15)
	pp := HybridPi(&qp, -vbe, -vbc)
	near(t, "pnp gm", pp.Gm, -pp.Ic/qp.VT*(1-qp.VT/(va-vbc)), 1e-9)
	near(t, "pnp r_o", 1/pp.GO, (va-vbc)/-pp.Ic, 1e-10)
}

func TestMOSFETTextbook(t *testing.T) {
	params := map[string]float64{"threshold_voltage": 0.5, "process_transconductance": 200e-6,
		"width": 10e-6, "length": 1e-6, "channel_length_modulation": 0.05, "body_effect": 0.4,
		"surface_potential": 0.7, "oxide_capacitance": 5e-3, "overlap_capacitance": 3e-10}
	m := devices.NewMOSFET("nmos", params, 0, 0, 1, 300.15)
	const vgs, vds, vbs = 1.0, 1.5, -0.5
	p := SquareLaw(&m, vgs, vds, vbs)
	if p.Region != devices.RegionSaturation {
		t.Fatalf("region %s, want saturation", p.Region)
	}
	beta := 200e-6 * 10
	// gm = √(2k′(W/L)·Id·(1 + λVds)) in saturation (square law, from memory).
	near(t, "gm", p.Gm, math.Sqrt(2*beta*p.Id*(1+0.05*vds)), 1e-12)
	// gmb = γ·gm/(2√(2φF − Vbs)) (from memory).
	near(t, "gmb", p.Gmb, 0.4*p.Gm/(2*math.Sqrt(0.7-vbs)), 1e-12)
	// gds = λ·Id/(1 + λVds) (from memory).
	near(t, "gds", p.Gds, 0.05*p.Id/(1+0.05*vds), 1e-12)
	// Meyer, saturation: Cgs = ⅔WLCox + W·Cov, Cgd = W·Cov, Cgb = 0 (DESIGN.md).
	wl, ov := 10e-6*1e-6*5e-3, 10e-6*3e-10
	near(t, "cgs", p.Cgs, 2*wl/3+ov, 1e-12)
	near(t, "cgd", p.Cgd, ov, 1e-12)
	// Triode: Cgs = Cgd = ½WLCox + W·Cov.
	pt := SquareLaw(&m, 2.0, 0.1, 0)
	if pt.Region != devices.RegionTriode {
		t.Fatalf("region %s, want triode", pt.Region)
	}
	near(t, "triode cgs", pt.Cgs, wl/2+ov, 1e-12)
	near(t, "triode cgd", pt.Cgd, wl/2+ov, 1e-12)
	// Cutoff: Cgb = WLCox.
	pc := SquareLaw(&m, 0, 1, 0)
	near(t, "cutoff cgb", pc.Cgb, wl, 1e-12)
	if pc.Gm != 0 {
		t.Errorf("cutoff gm = %g, want 0", pc.Gm)
	}
}

func TestDiodeTextbook(t *testing.T) {
	d := devices.NewDiode(map[string]float64{"saturation_current": 2e-14, "emission_coefficient": 1.3,
		"transit_time": 5e-9, "junction_capacitance": 4e-12}, 2, 300.15)
	p := Junction(&d, 0.55)
	// gd = (Id + area·Is)/(n·VT) (Shockley, from memory).
	near(t, "gd", p.Gd, (p.Id+2*2e-14)/(1.3*d.VT), 1e-12)
	near(t, "c_d", p.CD, 5e-9*p.Gd, 1e-12)
	r := Junction(&d, -2)
	// Reverse bias: Cj = area·Cj0/(1 − V/φ)^m with φ = 0.75 V, m = 0.5.
	near(t, "c_j", r.CJ, 2*4e-12/math.Sqrt(1+2/0.75), 1e-12)
}
