package explain_test

import (
	"fmt"

	"tangent/cases"
	"tangent/explain"
)

// The pickup amplifier of a Brightwater Instruments weather-mast
// anemometer: a common-emitter stage, here already as its hybrid-π model
// (rπ = 2.5 kΩ, Cπ = 10 pF, Cμ = 1 pF, gm = 40 mS) between the 1 kΩ
// pickup and a 5 kΩ load. Which element sets the upper corner, what the
// open-circuit time constants predict, and what the output looks like
// from the next stage.
func Example() {
	parts := []*cases.Part{
		{Name: "VPICK", Kind: cases.VoltageSource, Nodes: []string{"pick", "gnd"}},
		{Name: "RS", Kind: cases.Resistor, Value: 1e3, Nodes: []string{"pick", "b"}},
		{Name: "Q1_r_pi", Kind: cases.Resistor, Value: 2.5e3, Nodes: []string{"b", "gnd"}},
		{Name: "Q1_c_pi", Kind: cases.Capacitor, Value: 10e-12, Nodes: []string{"b", "gnd"}},
		{Name: "Q1_c_mu", Kind: cases.Capacitor, Value: 1e-12, Nodes: []string{"b", "col"}},
		{Name: "Q1_gm", Kind: cases.VCCS, Value: 40e-3, Nodes: []string{"col", "gnd", "b", "gnd"}},
		{Name: "RL", Kind: cases.Resistor, Value: 5e3, Nodes: []string{"col", "gnd"}},
	}
	c := &cases.Circuit{
		Nodes: []string{"pick", "b", "col"},
		Parts: parts,
		Ports: []*cases.Port{{Name: "pickup", Source: "VPICK"}, {Name: "out", Plus: "col", Minus: "gnd"}},
	}
	x, err := explain.Explain(c, &cases.Transfer{From: "pickup", To: "out", Kind: cases.VoltageGain},
		explain.Options{Devices: []string{"Q1"}})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, line := range x.Summary.Lines {
		fmt.Println(line)
	}
	for _, it := range x.Open.Items {
		fmt.Printf("%s sees %.4g Ω: τ = %.4g ns\n", x.Elements[it.Element].Label(), it.R, it.Tau*1e9)
	}
	fmt.Printf("Σ τ = %.4g ns = b1\n", x.Open.Sum*1e9)

	pe, err := explain.PortAt(c, "pickup", "out", true)
	if err != nil {
		fmt.Println(err)
		return
	}
	voc, _ := pe.Voc.DCGain()
	zth, _ := pe.Zth.DCGain()
	fmt.Printf("Thevenin at out: Voc = %.4g V per volt of pickup, Zth = %.4g Ω at DC, %d poles\n", voc, zth, len(pe.Zth.Poles))
	// Output:
	// mid-band gain −142.9 V/V (43.10 dB) at DC
	// f_high 1.024 MHz: the pole at 1.024 MHz is set by Q1 c_mu 96 % (Miller ×26); most sensitive to RL (−0.95), Q1 gm (−0.92)
	// open-circuit time constants estimate f_high 1.022 MHz (−0.1 % against the exact 1.024 MHz, −0.1 % against the pole); largest: Q1 c_mu, 95 % of Σ τ
	// Q1 c_mu sees 1.486e+05 Ω: τ = 148.6 ns
	// Q1 c_pi sees 714.3 Ω: τ = 7.143 ns
	// Σ τ = 155.7 ns = b1
	// Thevenin at out: Voc = -142.9 V per volt of pickup, Zth = 5000 Ω at DC, 2 poles
}
