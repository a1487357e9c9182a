package devices

import (
	"fmt"
	"math"
	"testing"
)

var (
	nmosModel = map[string]float64{
		"threshold_voltage": 0.7, "process_transconductance": 120e-6,
		"width": 10e-6, "length": 1e-6, "channel_length_modulation": 0.05,
		"body_effect": 0.4, "surface_potential": 0.7,
		"oxide_capacitance": 2e-3, "overlap_capacitance": 3e-10,
	}
	pmosModel = map[string]float64{
		"threshold_voltage": -0.8, "process_transconductance": 40e-6,
		"width": 30e-6, "length": 1.5e-6, "channel_length_modulation": 0.08,
		"body_effect": 0.55, "surface_potential": 0.75,
		"oxide_capacitance": 2e-3, "overlap_capacitance": 3e-10,
	}
)

// mosBiases are device-sense (Vgs, Vds, Vbs) points in every region, with
// and without body effect, past the body-effect clamp and with source and
// drain swapped; all keep clear of region borders by more than the
// difference step.
var mosBiases = [][3]float64{
	{0.3, 1, 0}, {0.5, 2, -1}, // cutoff
	{2, 0.3, 0}, {2.5, 1, -2}, {1.5, 0.01, 0}, // triode
	{1.5, 3, 0}, {1.2, 2, -1.5}, {3, 5, -0.5}, // saturation
	{1.5, 2, 0.3}, {1.5, 2, 0.66}, {1.5, 2, 5}, // forward body bias, past the clamp
	{2, -0.3, 0}, {2, -3, -1}, {0.5, -2, 0}, {1, -0.01, -0.4}, {1.2, -1.5, 0.2}, // reversed
	{1e3, 1e3, -1e3}, {-1e3, -1e3, 1e3}, {1e3, -1e3, 0},
}

func TestMOSFETDerivatives(t *testing.T) {
	// Reference: central finite differences of the same function.
	for _, c := range []struct {
		kind  string
		model map[string]float64
	}{{KindNMOS, nmosModel}, {KindPMOS, pmosModel}} {
		m := NewMOSFET(c.kind, c.model, 0, 0, 2, 310)
		for _, b := range mosBiases {
			vgs, vds, vbs := m.Polarity*b[0], m.Polarity*b[1], m.Polarity*b[2]
			s := m.Eval(vgs, vds, vbs)
			id := func(vgs, vds, vbs float64) float64 { return m.Eval(vgs, vds, vbs).Id }
			name := fmt.Sprintf("%s (%g, %g, %g) %s reversed=%v", c.kind, vgs, vds, vbs, s.Region, s.Reversed)
			const h = 1e-6
			checkDerivative(t, name+" gm", func(x float64) float64 { return id(x, vds, vbs) }, vgs, h, s.Gm, 1e-6)
			checkDerivative(t, name+" gds", func(x float64) float64 { return id(vgs, x, vbs) }, vds, h, s.Gds, 1e-6)
			checkDerivative(t, name+" gmb", func(x float64) float64 { return id(vgs, vds, x) }, vbs, h, s.Gmb, 1e-6)
		}
	}
}

func TestMOSFETSquareLaw(t *testing.T) {
	m := NewMOSFET(KindNMOS, nmosModel, 0, 0, 1, 300.15)
	b := 120e-6 * 10 // k′·W/L
	vt := func(vbs float64) float64 { return 0.7 + 0.4*(math.Sqrt(0.7-vbs)-math.Sqrt(0.7)) }
	for _, c := range []struct{ vgs, vds, vbs float64 }{{2, 0.3, 0}, {2, 0.8, -1}, {1.5, 3, 0}, {1.4, 2, -2}, {0.5, 2, 0}} {
		s := m.Eval(c.vgs, c.vds, c.vbs)
		vov := c.vgs - vt(c.vbs)
		// DESIGN.md square law.
		var want float64
		switch {
		case vov <= 0:
		case c.vds < vov:
			want = b * (vov*c.vds - c.vds*c.vds/2) * (1 + 0.05*c.vds)
		default:
			want = b / 2 * vov * vov * (1 + 0.05*c.vds)
		}
		if math.Abs(s.Id-want) > 1e-14*math.Abs(want) {
			t.Errorf("Id(%v) = %g, want %g", c, s.Id, want)
		}
		if s.Region == RegionSaturation {
			// From memory: gm = √(2β·Id·(1 + λVds)) in saturation, and
			// gmb = γ·gm/(2√(2φF − Vbs)).
			if want := math.Sqrt(2 * b * s.Id * (1 + 0.05*c.vds)); !relClose(s.Gm, want, 1e-12) {
				t.Errorf("gm(%v) = %g, √(2β·Id·(1+λVds)) = %g", c, s.Gm, want)
			}
		}
		if s.Region != RegionCutoff {
			if want := 0.4 * s.Gm / (2 * math.Sqrt(0.7-c.vbs)); !relClose(s.Gmb, want, 1e-12) {
				t.Errorf("gmb(%v) = %g, γ·gm/(2√(2φF − Vbs)) = %g", c, s.Gmb, want)
			}
		}
	}
	// Current and slope are continuous at the triode–saturation border
	// (Vds = Vgs − Vt) and at threshold (closed form of the square law).
	below, above := m.Eval(1.7, 1-1e-9, 0), m.Eval(1.7, 1+1e-9, 0)
	if !relClose(below.Id, above.Id, 1e-8) || !relClose(below.Gds, above.Gds, 1e-6) || below.Region == above.Region {
		t.Errorf("border: %+v vs %+v", below, above)
	}
}

func TestMOSFETReversal(t *testing.T) {
	// DESIGN.md: source and drain swap when Vds < 0, so
	// Id(Vgs, Vds, Vbs) = −Id(Vgd, Vsd, Vbd) with Vgd = Vgs − Vds, Vbd = Vbs − Vds.
	for _, kind := range []string{KindNMOS, KindPMOS} {
		model := nmosModel
		if kind == KindPMOS {
			model = pmosModel
		}
		m := NewMOSFET(kind, model, 0, 0, 1, 300.15)
		for _, b := range mosBiases {
			vgs, vds, vbs := m.Polarity*b[0], m.Polarity*b[1], m.Polarity*b[2]
			if b[1] >= 0 {
				continue
			}
			s, w := m.Eval(vgs, vds, vbs), m.Eval(vgs-vds, -vds, vbs-vds)
			if !s.Reversed || w.Reversed || s.Id != -w.Id || s.Region != w.Region {
				t.Errorf("%s %v: %+v vs swapped %+v", kind, b, s, w)
			}
		}
	}
	// The mirror: a pmos is an nmos with every voltage and current negated.
	n, p := NewMOSFET(KindNMOS, nmosModel, 0, 0, 1, 300.15), NewMOSFET(KindPMOS, nmosModel, 0, 0, 1, 300.15)
	p.ThresholdVoltage = -p.ThresholdVoltage
	for _, b := range mosBiases {
		sn, sp := n.Eval(b[0], b[1], b[2]), p.Eval(-b[0], -b[1], -b[2])
		if sp.Id != -sn.Id || sp.Gm != sn.Gm || sp.Gds != sn.Gds || sp.Gmb != sn.Gmb || sp.Region != sn.Region {
			t.Errorf("%v: nmos %+v, pmos %+v", b, sn, sp)
		}
	}
}

func TestMOSFETGeometry(t *testing.T) {
	// Part width and length win over the model's; multiplier scales Beta.
	m := NewMOSFET(KindNMOS, nmosModel, 40e-6, 2e-6, 3, 300.15)
	if m.Width != 40e-6 || m.Length != 2e-6 || !relClose(m.Beta, 120e-6*20*3, 1e-15) {
		t.Errorf("geometry: W %g, L %g, Beta %g", m.Width, m.Length, m.Beta)
	}
	m = NewMOSFET(KindNMOS, nmosModel, 0, 0, 0, 300.15)
	if m.Width != 10e-6 || m.Length != 1e-6 || m.Multiplier != 1 {
		t.Errorf("model geometry: W %g, L %g, multiplier %g", m.Width, m.Length, m.Multiplier)
	}
}

func TestMOSFETCapacitances(t *testing.T) {
	m := NewMOSFET(KindNMOS, nmosModel, 0, 0, 2, 300.15)
	// DESIGN.md (Meyer): C = W·L·Cox, O = W·Cov, times the multiplier.
	c := 10e-6 * 1e-6 * 2e-3 * 2
	o := 10e-6 * 3e-10 * 2
	for _, k := range []struct {
		v             [3]float64
		cgs, cgd, cgb float64
		region        string
	}{
		{[3]float64{0.3, 1, 0}, o, o, c, RegionCutoff},
		{[3]float64{2, 0.3, 0}, c/2 + o, c/2 + o, 0, RegionTriode},
		{[3]float64{1.5, 3, 0}, 2*c/3 + o, o, 0, RegionSaturation},
		{[3]float64{-0.5, -3, -3}, o, 2*c/3 + o, 0, RegionSaturation}, // reversed: swapped
		{[3]float64{1.5, 3, -10}, o, o, c, RegionCutoff},              // body effect raised Vt
	} {
		cgs, cgd, cgb := m.Capacitances(k.v[0], k.v[1], k.v[2])
		if r := m.Eval(k.v[0], k.v[1], k.v[2]).Region; r != k.region {
			t.Errorf("%v: region %s, want %s", k.v, r, k.region)
		}
		if !relClose(cgs, k.cgs, 1e-14) || !relClose(cgd, k.cgd, 1e-14) || !relClose(cgb, k.cgb, 1e-14) {
			t.Errorf("%v: cgs %g cgd %g cgb %g, want %g %g %g", k.v, cgs, cgd, cgb, k.cgs, k.cgd, k.cgb)
		}
	}
	// pmos mirrors.
	p := NewMOSFET(KindPMOS, pmosModel, 0, 0, 1, 300.15)
	cgs, cgd, cgb := p.Capacitances(-2, -4, 0)
	cp := 30e-6 * 1.5e-6 * 2e-3
	if op := 30e-6 * 3e-10; !relClose(cgs, 2*cp/3+op, 1e-14) || !relClose(cgd, op, 1e-14) || cgb != 0 {
		t.Errorf("pmos saturation: %g %g %g", cgs, cgd, cgb)
	}
}

func TestMOSFETLimitStep(t *testing.T) {
	m := NewMOSFET(KindPMOS, pmosModel, 0, 0, 1, 300.15) // device-sense Vt = 0.8 V
	for _, c := range []struct {
		name                     string
		vgs, vgsOld, vds, vdsOld float64
		wantGS, wantDS           float64
		changed                  bool
	}{
		{"small", -1.2, -1, -2, -2.2, -1.2, -2, false},
		{"gate turns on", -6, 0, -1, -1, -1.3, -1, true},
		{"gate turns off", 3, -1.5, -1, -1, -0.3, -1, true},
		{"overdrive triples at most", -9, -1.3, -1, -1, -1.3 - 1.5, -1, true},
		{"drain step", -1.2, -1.2, -20, -2, -1.2, -7, true},
		{"drain reversal", -1.2, -1.2, 5, -0.5, -1.2, 1.5, true},
	} {
		gs, ds, ch := m.LimitStep(c.vgs, c.vgsOld, c.vds, c.vdsOld)
		if ch != c.changed || !relClose(gs, c.wantGS, 1e-14) || !relClose(ds, c.wantDS, 1e-14) {
			t.Errorf("%s: got %g, %g, %v; want %g, %g, %v", c.name, gs, ds, ch, c.wantGS, c.wantDS, c.changed)
		}
	}
}

func TestMOSFETExtremeVoltages(t *testing.T) {
	for _, kind := range []string{KindNMOS, KindPMOS} {
		m := NewMOSFET(kind, nmosModel, 0, 0, 1, 300.15)
		for _, vgs := range extremeVoltages {
			for _, vds := range extremeVoltages {
				for _, vbs := range extremeVoltages {
					s := m.Eval(vgs, vds, vbs)
					cgs, cgd, cgb := m.Capacitances(vgs, vds, vbs)
					l1, l2, _ := m.LimitStep(vgs, -vgs, vds, -vds)
					if !finite(s.Id, s.Gm, s.Gds, s.Gmb, cgs, cgd, cgb, l1, l2, s.Id*vds) || s.Region == "" {
						t.Errorf("%s (%g, %g, %g): %+v", kind, vgs, vds, vbs, s)
					}
				}
			}
		}
	}
}
