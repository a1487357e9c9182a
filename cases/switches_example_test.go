package cases_test

import (
	"fmt"

	"tangent/cases"
)

// A switch turns one effect off in every model that has it: here the Early
// effect of a soil probe's input transistor, once in a variant of the file
// and once as a one-off override (what the command line's --set passes).
func ExampleCircuit_WithOverrides() {
	src := `
[models.bw_npn]
device = "npn"
saturation_current = "5 fA"
forward_early_voltage = "90 V"

[parts.VCC]
kind = "voltage_source"
plus = "vcc"
minus = "gnd"
dc = "9 V"

[parts.RB]
kind = "resistor"
a = "vcc"
b = "base"
value = "1M"

[parts.RC]
kind = "resistor"
a = "vcc"
b = "col"
value = "4k7"

[parts.Q1]
kind = "bjt"
model = "bw_npn"
collector = "col"
base = "base"
emitter = "gnd"

[variants.ideal]
early_effect = false
`
	c, err := cases.Parse("probe.toml", []byte(src))
	if err != nil {
		fmt.Println(err)
		return
	}
	v, _ := c.ApplyVariant("ideal")
	fmt.Println(v.Models["bw_npn"].Params["forward_early_voltage"], v.Models["bw_npn"].Params["reverse_early_voltage"])

	o, _ := c.WithOverrides([]cases.Override{{Path: []string{"early_effect"}, Value: false}})
	fmt.Println(o.Models["bw_npn"].Params["forward_early_voltage"])

	_, err = c.WithOverrides([]cases.Override{{Path: []string{"body_effect"}, Value: map[string]any{"value": false, "models": []any{"bw_npn"}}}})
	fmt.Println(err)
	// Output:
	// +Inf +Inf
	// +Inf
	// probe.toml: body_effect.models[1]: model bw_npn is an npn model, which has no body effect; body_effect applies to nmos, pmos models
}
