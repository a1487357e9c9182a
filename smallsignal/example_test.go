package smallsignal_test

import (
	"fmt"

	"tangent/cases"
	"tangent/dc"
	"tangent/smallsignal"
)

// Linearize the embedded common-emitter example and read its transistor's
// hybrid-π parameters. beta_ac exceeds forward_beta (180) by the Early
// factor 1 − Vbc/VA ≈ 1.056: the transport form scales Ic, not Ib.
func ExampleLinearize() {
	c, err := cases.Example("ce_amplifier")
	if err != nil {
		fmt.Println(err)
		return
	}
	op, err := dc.Solve(c)
	if err != nil {
		fmt.Println(err)
		return
	}
	eq, err := smallsignal.Linearize(op)
	if err != nil {
		fmt.Println(err)
		return
	}
	q := eq.Devices[0]
	fmt.Printf("%s %s: gm = %.1f mS, r_pi = %.2f kΩ, beta_ac = %.0f\n",
		q.Name, q.Region, q.BJT.Gm*1e3, 1/q.BJT.GPi/1e3, q.BJT.BetaAC)
	// Output:
	// Q1 forward_active: gm = 35.5 mS, r_pi = 5.36 kΩ, beta_ac = 190
}
