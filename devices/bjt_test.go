package devices

import (
	"fmt"
	"math"
	"testing"
)

var (
	earlyModel = map[string]float64{
		"saturation_current": 1e-15, "forward_beta": 150, "reverse_beta": 2,
		"forward_early_voltage": 60, "reverse_early_voltage": 15,
		"be_capacitance": 2e-12, "bc_capacitance": 1e-12, "forward_transit_time": 0.4e-9,
		"reverse_transit_time": 20e-9,
	}
	plainModel = map[string]float64{"saturation_current": 5e-15, "forward_beta": 180}
)

// bjtBiases are device-sense (Vbe, Vbc) points in every region, including
// the linear continuation of the exponentials (beyond 80·VT ≈ 2.07 V).
var bjtBiases = [][2]float64{
	{0.65, -3}, {0.72, -0.2}, // forward active
	{0.75, 0.62}, {0.8, 0.78}, // saturation
	{-0.5, -5}, {0, 0}, {0.1, -0.1}, // cutoff
	{-3, 0.66}, {-0.1, 0.7}, // reverse active
	{2.5, -1}, {3, 2.9}, {-1, 4}, // exponentials linearly continued
	{1e3, -1e3}, {-1e3, 1e3}, {1e3, 1e3}, {-1e3, -1e3},
}

func TestBJTDerivatives(t *testing.T) {
	// Reference: central finite differences of the same function.
	for _, model := range []map[string]float64{earlyModel, plainModel} {
		for _, kind := range []string{KindNPN, KindPNP} {
			q := NewBJT(kind, model, 2, 330)
			h := 1e-4 * q.VT
			for _, b := range bjtBiases {
				vbe, vbc := q.Polarity*b[0], q.Polarity*b[1]
				s := q.Eval(vbe, vbc)
				name := fmt.Sprintf("%s VA=%g (%g, %g)", kind, q.ForwardEarlyVoltage, vbe, vbc)
				ic := func(vbe, vbc float64) float64 { return q.Eval(vbe, vbc).Ic }
				ib := func(vbe, vbc float64) float64 { return q.Eval(vbe, vbc).Ib }
				checkDerivative(t, name+" ∂Ic/∂Vbe", func(x float64) float64 { return ic(x, vbc) }, vbe, h, s.DIcDVbe, 1e-7)
				checkDerivative(t, name+" ∂Ic/∂Vbc", func(x float64) float64 { return ic(vbe, x) }, vbc, h, s.DIcDVbc, 1e-7)
				checkDerivative(t, name+" ∂Ib/∂Vbe", func(x float64) float64 { return ib(x, vbc) }, vbe, h, s.DIbDVbe, 1e-7)
				checkDerivative(t, name+" ∂Ib/∂Vbc", func(x float64) float64 { return ib(vbe, x) }, vbc, h, s.DIbDVbc, 1e-7)
			}
		}
	}
}

func TestBJTMirror(t *testing.T) {
	// DESIGN.md: a pnp mirrors every voltage and current.
	n, p := NewBJT(KindNPN, earlyModel, 1, 300.15), NewBJT(KindPNP, earlyModel, 1, 300.15)
	for _, b := range bjtBiases {
		sn, sp := n.Eval(b[0], b[1]), p.Eval(-b[0], -b[1])
		if sp.Ic != -sn.Ic || sp.Ib != -sn.Ib || sp.DIcDVbe != sn.DIcDVbe || sp.DIcDVbc != sn.DIcDVbc ||
			sp.DIbDVbe != sn.DIbDVbe || sp.DIbDVbc != sn.DIbDVbc {
			t.Errorf("(%g, %g): npn %+v, pnp %+v", b[0], b[1], sn, sp)
		}
		if n.Region(b[0], b[1]) != p.Region(-b[0], -b[1]) {
			t.Errorf("(%g, %g): regions differ", b[0], b[1])
		}
	}
}

func TestBJTTextbook(t *testing.T) {
	q := NewBJT(KindNPN, plainModel, 1, 300.15)
	vt := ThermalVoltage(300.15)
	for _, vbe := range []float64{0.55, 0.65, 0.75} {
		s := q.Eval(vbe, vbe-5) // Vce = 5 V, forward active
		// From memory: with no Early effect in forward active Ic/Ib = βF and
		// gm = ∂Ic/∂Vbe = Ic/VT, up to terms of size Is (the leakage Is/βR
		// out of the reverse-biased collector junction is 1e-7 of Ib here).
		if !relClose(s.Ic/s.Ib, 180, 1e-6) {
			t.Errorf("Vbe %g: Ic/Ib = %.12g, want βF = 180", vbe, s.Ic/s.Ib)
		}
		if !relClose(s.DIcDVbe, s.Ic/vt, 1e-9) {
			t.Errorf("Vbe %g: ∂Ic/∂Vbe = %g, Ic/VT = %g", vbe, s.DIcDVbe, s.Ic/vt)
		}
		// DESIGN.md: Ic = Is·(e^(Vbe/VT) − e^(Vbc/VT)) − (Is/βR)·(e^(Vbc/VT) − 1).
		ef, er := math.Exp(vbe/vt), math.Exp((vbe-5)/vt)
		if want := 5e-15*(ef-er) - 5e-15*(er-1); !relClose(s.Ic, want, 1e-13) {
			t.Errorf("Vbe %g: Ic = %g, want %g", vbe, s.Ic, want)
		}
	}
	// From memory: with an Early voltage, ro = 1/(∂Ic/∂Vce at fixed Vbe)
	// = (VA + Vcb)/Ic for this linear Early factor, i.e. VA/Ic at Vcb = 0.
	// DESIGN.md: 1/ro = −∂Ic/∂Vbc − 1/rμ.
	e := NewBJT(KindNPN, map[string]float64{"saturation_current": 1e-15, "forward_early_voltage": 60}, 1, 300.15)
	for _, vcb := range []float64{0.5, 3, 10} {
		s := e.Eval(0.68, -vcb)
		ro := 1 / (-s.DIcDVbc - s.DIbDVbc)
		if want := (60 + vcb) / s.Ic; !relClose(ro, want, 1e-9) {
			t.Errorf("Vcb %g: ro = %g, want (VA + Vcb)/Ic = %g", vcb, ro, want)
		}
	}
}

func TestBJTAreaScaling(t *testing.T) {
	p := map[string]float64{"saturation_current": 1e-15, "base_resistance": 200, "collector_resistance": 20,
		"emitter_resistance": 2, "be_capacitance": 1e-12, "bc_capacitance": 0.5e-12}
	q := NewBJT(KindNPN, p, 2, 300.15)
	// DESIGN.md: area multiplies Is and the junction capacitances, divides resistances.
	if q.SaturationCurrent != 2e-15 || q.BaseResistance != 100 || q.CollectorResistance != 10 ||
		q.EmitterResistance != 1 || q.BECapacitance != 2e-12 || q.BCCapacitance != 1e-12 {
		t.Errorf("area 2: %+v", q)
	}
}

func TestBJTCapacitances(t *testing.T) {
	q := NewBJT(KindNPN, earlyModel, 1, 300.15)
	vt := q.VT
	// Forward active: cbe = Cje(Vbe) + τF·gmF, gmF = Is·e^(Vbe/VT)·(1 − Vbc/VA − Vbe/VB)/VT,
	// cbc = Cjc(Vbc) + τR·Is·e^(Vbc/VT)·(...)/VT (documented definition).
	vbe, vbc := 0.66, -4.0
	s := q.Eval(vbe, vbc)
	cbe, cbc := q.Capacitances(vbe, vbc, s)
	early := 1 + 4.0/60 - 0.66/15
	wantBE := depletionCapacitance(vbe, 2e-12, 0.75, 0.33) + 0.4e-9*1e-15*math.Exp(vbe/vt)*early/vt
	wantBC := 1e-12*math.Pow(1+4/0.75, -0.33) + 20e-9*1e-15*math.Exp(vbc/vt)*early/vt
	if !relClose(cbe, wantBE, 1e-12) || !relClose(cbc, wantBC, 1e-12) {
		t.Errorf("cbe %g want %g, cbc %g want %g", cbe, wantBE, cbc, wantBC)
	}
	// DESIGN.md's Cπ = Cje + τF·gm with the hybrid-π gm = ∂Ic/∂Vbe − 1/ro
	// differs from it by terms of relative size VT/VA.
	gm := s.DIcDVbe + s.DIcDVbc + s.DIbDVbc
	if diff := cbe - (depletionCapacitance(vbe, 2e-12, 0.75, 0.33) + 0.4e-9*gm); math.Abs(diff) > 2*vt/15*cbe {
		t.Errorf("cbe %g differs from Cje + τF·gm by %g", cbe, diff)
	}
	// Zero bias, no diffusion worth counting: the zero-bias capacitances.
	s0 := q.Eval(0, 0)
	if cbe, cbc := q.Capacitances(0, 0, s0); !relClose(cbe, 2e-12, 1e-6) || !relClose(cbc, 1e-12, 1e-6) {
		t.Errorf("zero bias: cbe %g, cbc %g", cbe, cbc)
	}
	// pnp mirrors.
	p := NewBJT(KindPNP, earlyModel, 1, 300.15)
	if pbe, pbc := p.Capacitances(-vbe, -vbc, p.Eval(-vbe, -vbc)); pbe != cbe || pbc != cbc {
		t.Errorf("pnp capacitances %g, %g, npn %g, %g", pbe, pbc, cbe, cbc)
	}
	// Never negative, even where the linear Early factor goes below zero.
	for _, b := range bjtBiases {
		if cbe, cbc := q.Capacitances(b[0], b[1], q.Eval(b[0], b[1])); !(cbe >= 0 && cbc >= 0) || !finite(cbe, cbc) {
			t.Errorf("(%g, %g): cbe %g, cbc %g", b[0], b[1], cbe, cbc)
		}
	}
}

func TestBJTRegion(t *testing.T) {
	q := NewBJT(KindNPN, map[string]float64{"saturation_current": 1e-14, "forward_beta": 100}, 1, 300.15)
	// Common practice: an amplifier at Vbe ≈ 0.65 V with Vce of volts is in
	// forward active, a switch at Vce ≈ 0.1 V in saturation, Vbe = 0 is off.
	// The documented border (βF = 100, βR = 1): Vce = VT·ln(1e4) ≈ 0.238 V.
	for _, c := range []struct {
		vbe, vbc float64
		want     string
	}{
		{0.65, -3, RegionForwardActive},
		{0.65, 0, RegionForwardActive}, // diode-connected
		{0.7, 0.4, RegionForwardActive},
		{0.7, 0.5, RegionSaturation},
		{0.75, 0.65, RegionSaturation},
		{0.7, 0.7, RegionSaturation},
		{0, -9, RegionCutoff},
		{0.01, 0.01, RegionCutoff},
		{-9, 0, RegionCutoff},
		{-3, 0.65, RegionReverseActive},
		{0.3, 0.65, RegionReverseActive},
		{1e3, -1e3, RegionForwardActive},
		{-1e3, 1e3, RegionReverseActive},
	} {
		if got := q.Region(c.vbe, c.vbc); got != c.want {
			t.Errorf("Region(%g, %g) = %s, want %s", c.vbe, c.vbc, got, c.want)
		}
	}
}

func TestBJTLimitStep(t *testing.T) {
	q := NewBJT(KindPNP, plainModel, 1, 300.15)
	vt := q.VT
	// Each junction like Diode.LimitStep in its own sense: pnp voltages negated.
	vbe, vbc, ch := q.LimitStep(-3, -0.7, 5, -2)
	if !ch || !relClose(vbe, -(0.7+vt*math.Log1p(2.3/vt)), 1e-14) || vbc != 5 {
		t.Errorf("pnp limit = %g, %g, %v", vbe, vbc, ch)
	}
	vbe, vbc, ch = q.LimitStep(-0.6, -0.7, -0.5, 0)
	if ch || vbe != -0.6 || vbc != -0.5 {
		t.Errorf("small step changed: %g, %g", vbe, vbc)
	}
	if _, vbc, ch = q.LimitStep(0, 0, -4, 1); !ch || vbc != -q.CriticalVoltage {
		t.Errorf("bc from reverse: %g, want %g", vbc, -q.CriticalVoltage)
	}
}

func TestBJTExtremeVoltages(t *testing.T) {
	for _, kind := range []string{KindNPN, KindPNP} {
		q := NewBJT(kind, earlyModel, 1, 300.15)
		for _, vbe := range extremeVoltages {
			for _, vbc := range extremeVoltages {
				s := q.Eval(vbe, vbc)
				cbe, cbc := q.Capacitances(vbe, vbc, s)
				l1, l2, _ := q.LimitStep(vbe, -vbe, vbc, -vbc)
				if !finite(s.Ic, s.Ib, s.DIcDVbe, s.DIcDVbc, s.DIbDVbe, s.DIbDVbc, cbe, cbc, l1, l2, s.Ic*vbc) ||
					q.Region(vbe, vbc) == "" {
					t.Errorf("%s (%g, %g): %+v %g %g", kind, vbe, vbc, s, cbe, cbc)
				}
			}
		}
	}
}
