package devices

import (
	"math"
	"testing"
)

// Reference values printed by testdata/temperature_reference.py (Python
// decimal arithmetic, 40 digits) from the exact SI values of k and q
// (SI Brochure, 9th edition) and the scaling laws of DESIGN.md.
func TestThermalVoltage(t *testing.T) {
	for _, c := range []struct{ t, want float64 }{
		{300.15, 0.02586492578632875006714147349124303856250}, // SI Brochure 9th ed. k, q
		{273.15, 0.02353824580554955216005228547104126597817}, // SI Brochure 9th ed. k, q
	} {
		if got := ThermalVoltage(c.t); !relClose(got, c.want, 1e-15) {
			t.Errorf("ThermalVoltage(%g) = %.17g, want %.17g", c.t, got, c.want)
		}
	}
}

func TestSaturationCurrentScaling(t *testing.T) {
	// Reference: testdata/temperature_reference.py (DESIGN.md's Is(T) law).
	for _, c := range []struct{ is, n, eta, eg, t, t0, want float64 }{
		{1e-14, 1, 3, 1.11, 350, 300.15, 7.157360874291907952236681731496067193516e-12},
		{2e-15, 1.8, 3, 1.11, 233.15, 300.15, 1.388901312519507906618532722765390390876e-18},
		{5e-15, 1, 2, 1.12, 398.15, 298.15, 5.071836454793210309529370199255340864989e-10},
	} {
		d := NewDiode(map[string]float64{
			"saturation_current": c.is, "emission_coefficient": c.n,
			"saturation_current_temperature_exponent": c.eta, "bandgap_energy": c.eg,
			"nominal_temperature": c.t0,
		}, 1, c.t)
		if !relClose(d.SaturationCurrent, c.want, 1e-12) {
			t.Errorf("diode Is at %g K (n=%g) = %.15g, want %.15g", c.t, c.n, d.SaturationCurrent, c.want)
		}
		if c.n != 1 {
			continue
		}
		q := NewBJT(KindNPN, map[string]float64{
			"saturation_current": c.is, "saturation_current_temperature_exponent": c.eta,
			"bandgap_energy": c.eg, "nominal_temperature": c.t0,
		}, 1, c.t)
		if !relClose(q.SaturationCurrent, c.want, 1e-12) {
			t.Errorf("bjt Is at %g K = %.15g, want %.15g", c.t, q.SaturationCurrent, c.want)
		}
	}
	// At the nominal temperature nothing changes (DESIGN.md: T = T0).
	d := NewDiode(map[string]float64{"saturation_current": 3e-15}, 1, NominalTemperature)
	if d.SaturationCurrent != 3e-15 {
		t.Errorf("Is at T0 = %g, want 3e-15", d.SaturationCurrent)
	}
}

func TestGainAndMOSFETTemperatureScaling(t *testing.T) {
	// Reference: testdata/temperature_reference.py (DESIGN.md's β(T), k′(T)).
	q := NewBJT(KindPNP, map[string]float64{
		"saturation_current": 1e-15, "forward_beta": 180, "reverse_beta": 180,
		"beta_temperature_exponent": 1.5,
	}, 1, 350)
	const wantBeta = 226.6559112636061398900472900929342849927
	if !relClose(q.ForwardBeta, wantBeta, 1e-13) || !relClose(q.ReverseBeta, wantBeta, 1e-13) {
		t.Errorf("β(350 K) = %.15g, %.15g, want %.15g", q.ForwardBeta, q.ReverseBeta, wantBeta)
	}
	m := NewMOSFET(KindNMOS, map[string]float64{
		"threshold_voltage": 0.7, "process_transconductance": 2e-4,
		"threshold_temperature_coefficient": -2e-3, "mobility_temperature_exponent": -1.5,
	}, 20e-6, 2e-6, 3, 350)
	const wantKp = 0.0001588310659947057625976242887811991841745
	if want := wantKp * 10 * 3; !relClose(m.Beta, want, 1e-13) {
		t.Errorf("Beta(350 K) = %.15g, want %.15g", m.Beta, want)
	}
	// DESIGN.md: Vt0(T) = Vt0 + tc·(T − T0) = 0.7 − 2e-3·49.85
	if want := 0.7 - 2e-3*(350-300.15); math.Abs(m.ThresholdVoltage-want) > 1e-15 {
		t.Errorf("Vt0(350 K) = %.15g, want %.15g", m.ThresholdVoltage, want)
	}
}

func TestBadConstructorInputDoesNotPanic(t *testing.T) {
	// Values package cases rejects must still give finite devices.
	d := NewDiode(map[string]float64{"junction_potential": 0, "breakdown_voltage": 0}, -1, -5)
	i, g := d.Current(0.7)
	q := NewBJT("bogus", map[string]float64{"forward_early_voltage": 0}, 0, math.NaN())
	s := q.Eval(0.7, -1)
	m := NewMOSFET(KindNMOS, nil, 0, 0, 0, 0)
	ms := m.Eval(1, 1, 0)
	if !finite(i, g, d.CriticalVoltage, s.Ic, s.Ib, s.DIcDVbc, ms.Id, m.Beta, m.Width) {
		t.Errorf("non-finite result from fallback values: %v %v %+v %+v", i, g, s, ms)
	}
}
