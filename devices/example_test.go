package devices_test

import (
	"fmt"

	"tangent/devices"
)

// The input transistor of a Brightwater Instruments river-level gauge
// preamp, evaluated at its bias point on a 40 °C summer day.
func ExampleBJT_Eval() {
	model := map[string]float64{
		"saturation_current":    5e-15,
		"forward_beta":          180,
		"forward_early_voltage": 90,
		"be_capacitance":        8e-12,
		"bc_capacitance":        3e-12,
		"forward_transit_time":  0.3e-9,
	}
	q := devices.NewBJT(devices.KindNPN, model, 1, 313.15)
	vbe, vbc := 0.62, -4.0
	s := q.Eval(vbe, vbc)
	cbe, cbc := q.Capacitances(vbe, vbc, s)
	fmt.Println("region:", q.Region(vbe, vbc))
	fmt.Printf("Ic = %.4g A, Ib = %.4g A\n", s.Ic, s.Ib)
	fmt.Printf("∂Ic/∂Vbe = %.4g S, ∂Ib/∂Vbe = %.4g S\n", s.DIcDVbe, s.DIbDVbe)
	fmt.Printf("cbe = %.4g F, cbc = %.4g F\n", cbe, cbc)
	// Output:
	// region: forward_active
	// Ic = 0.000335 A, Ib = 1.782e-06 A
	// ∂Ic/∂Vbe = 0.01241 S, ∂Ib/∂Vbe = 6.602e-05 S
	// cbe = 1.595e-11 F, cbc = 1.631e-12 F
}

// The reverse-polarity protection diode of a soil-probe supply: forward
// current at 0.7 V, and where a Newton solver would be allowed to go from
// there when it asks for 3 V.
func ExampleDiode_Current() {
	d := devices.NewDiode(map[string]float64{"saturation_current": 2e-14}, 1, 300.15)
	i, g := d.Current(0.7)
	v, limited := d.LimitStep(3, 0.7)
	fmt.Printf("I = %.4g A, g = %.4g S, region %s\n", i, g, d.Region(0.7))
	fmt.Printf("step to 3 V limited to %.4f V: %v\n", v, limited)
	// Output:
	// I = 0.01134 A, g = 0.4385 S, region forward
	// step to 3 V limited to 0.8164 V: true
}

// A weather-mast sensor's pmos load in saturation, with its small-signal
// derivatives and Meyer gate capacitances.
func ExampleMOSFET_Eval() {
	model := map[string]float64{
		"threshold_voltage": -0.8, "process_transconductance": 40e-6,
		"width": 20e-6, "length": 2e-6, "channel_length_modulation": 0.04,
		"body_effect": 0.5, "oxide_capacitance": 1.7e-3, "overlap_capacitance": 2e-10,
	}
	m := devices.NewMOSFET(devices.KindPMOS, model, 0, 0, 1, 300.15)
	s := m.Eval(-1.5, -3, 0.5)
	cgs, cgd, cgb := m.Capacitances(-1.5, -3, 0.5)
	fmt.Printf("%s: Id = %.4g A, gm = %.4g S, gds = %.4g S, gmb = %.4g S\n", s.Region, s.Id, s.Gm, s.Gds, s.Gmb)
	fmt.Printf("cgs = %.4g F, cgd = %.4g F, cgb = %.4g F\n", cgs, cgd, cgb)
	// Output:
	// saturation: Id = -7.293e-05 A, gm = 0.0002556 S, gds = 2.605e-06 S, gmb = 5.834e-05 S
	// cgs = 4.933e-14 F, cgd = 4e-15 F, cgb = 0 F
}
