package dc_test

import (
	"fmt"

	"tangent/cases"
	"tangent/dc"
)

// A diode thermometer's bias: 5 V through 47 kΩ into a silicon junction.
// By hand: I = (5 V − V)/47 kΩ and V = VT·ln(I/Is) give 0.635 V, 92.9 µA.
func Example() {
	c, err := cases.Parse("thermometer.toml", []byte(`
[models.sense]
device = "diode"
saturation_current = "2 fA"

[parts.VREF]
kind = "voltage_source"
plus = "ref"
minus = "gnd"
dc = "5 V"

[parts.R1]
kind = "resistor"
a = "ref"
b = "sense"
value = "47k"

[parts.D1]
kind = "diode"
model = "sense"
anode = "sense"
cathode = "gnd"
`))
	if err != nil {
		fmt.Println(err)
		return
	}
	op, err := dc.Solve(c)
	if err != nil {
		fmt.Println(err)
		return
	}
	v, _ := op.Node("sense")
	d := op.Part("D1")
	fmt.Printf("V(sense) = %.4f V, I(D1) = %.2f µA, %s, by %s\n", v, d.Current*1e6, d.Device.Region, op.Method)
	delivered, absorbed := op.PowerBalance()
	fmt.Printf("delivered %.4f mW, absorbed %.4f mW\n", delivered*1e3, absorbed*1e3)
	// Output:
	// V(sense) = 0.6353 V, I(D1) = 92.87 µA, forward, by newton
	// delivered 0.4643 mW, absorbed 0.4643 mW
}
