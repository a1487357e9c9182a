package ac_test

import (
	"fmt"
	"math"

	"tangent/ac"
	"tangent/cases"
)

// The anti-alias filter of a Brightwater Instruments river-level gauge: a
// series RLC low-pass (R = 50 Ω, L = 10 mH, C = 100 nF) after the
// sensor's buffer, modelled as an ideal voltage source.
func Example() {
	c := &cases.Circuit{
		Nodes: []string{"in", "a", "out"},
		Parts: []*cases.Part{
			{Name: "VSENSE", Kind: cases.VoltageSource, Nodes: []string{"in", "gnd"}},
			{Name: "R1", Kind: cases.Resistor, Value: 50, Nodes: []string{"in", "a"}},
			{Name: "L1", Kind: cases.Inductor, Value: 10e-3, Nodes: []string{"a", "out"}},
			{Name: "C1", Kind: cases.Capacitor, Value: 100e-9, Nodes: []string{"out", "gnd"}},
		},
		Ports: []*cases.Port{{Name: "sensor", Source: "VSENSE"}, {Name: "adc", Plus: "out", Minus: "gnd"}},
	}
	p, err := ac.Setup(c, &cases.Transfer{From: "sensor", To: "adc", Kind: cases.VoltageGain})
	if err != nil {
		fmt.Println(err)
		return
	}
	h, err := ac.Analyze(p)
	if err != nil {
		fmt.Println(err)
		return
	}
	dc, _ := h.DCGain()
	fmt.Printf("order %d, DC gain %.3g\n", h.Order(), dc)
	for _, pr := range h.Pairs() {
		fmt.Printf("pole pair: f0 = %.1f Hz, Q = %.2f\n", pr.W0/(2*math.Pi), pr.Q)
	}
	fmt.Printf("denominator %.3g\n", h.Denominator())
	bw := h.Bandwidth()
	fmt.Printf("f_high = %.0f Hz\n", *bw.HighHz)

	sw, err := ac.NewSweeper(p)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, v := range sw.Response([]float64{100, 5033, 50e3}, nil) {
		fmt.Printf("|H| = %.4g\n", math.Hypot(real(v), imag(v)))
	}
	// Output:
	// order 2, DC gain 1
	// pole pair: f0 = 5032.9 Hz, Q = 6.32
	// denominator [1 5e-06 1e-09]
	// f_high = 7785 Hz
	// |H| = 1
	// |H| = 6.324
	// |H| = 0.01023
}
