package cases_test

import (
	"fmt"

	"tangent/cases"
)

// A river-level gauge's reference divider, read and checked.
func ExampleParse() {
	src := `
title = "River-level gauge, reference divider"

[parts.VREF]
kind = "voltage_source"
plus = "ref"
minus = "gnd"
dc = "2.5 V"

[parts.R1]
kind = "resistor"
a = "ref"
b = "mid"
value = "4k7"

[parts.R2]
kind = "resistor"
a = "mid"
b = "gnd"
value = "10 kΩ"

[variants.trimmed]
parts.R1.value = "5k6"
`
	c, err := cases.Parse("divider.toml", []byte(src))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(c.Title, c.Nodes, c.Temperature)
	for _, p := range c.Parts {
		fmt.Println(p.Name, p.Kind, p.Nodes, p.Value, p.DC)
	}
	v, _ := c.ApplyVariant("trimmed")
	fmt.Println(v.Variant, v.Parts[1].Value)

	// A bad value is reported with its file, line and key.
	_, err = cases.Parse("bad.toml", []byte("[parts.R1]\nkind = \"resistor\"\na = \"x\"\nb = \"gnd\"\nvalue = \"10 V\"\n"))
	fmt.Println(err)
	// Output:
	// River-level gauge, reference divider [ref mid] 300.15
	// VREF voltage_source [ref gnd] 0 2.5
	// R1 resistor [ref mid] 4700 0
	// R2 resistor [mid gnd] 10000 0
	// trimmed 5600
	// bad.toml:5: parts.R1.value: "10 V": unit "V" does not fit this key; expected a value in Ω such as "4k7" or "4.7 kΩ"
}

func ExampleParseValue() {
	for _, s := range []struct{ value, unit string }{
		{"4k7", "Ω"},           // IEC 60062 code
		{"1n5", "F"},           // IEC 60062 code
		{"100 nF", "F"},        // SI prefix and unit
		{"10u", "m"},           // a trailing prefix letter: 10 µm
		{"27 °C", "K"},         // Celsius, converted to kelvin
		{"8.6 fF/µm²", "F/m²"}, // the prefix binds before the exponent
		{"5 %", "%"},
		{"40 dB", "dB"},
	} {
		v, err := cases.ParseValue(s.value, s.unit)
		fmt.Println(s.value, "→", v, err)
	}
	_, err := cases.ParseValue("10 Meg", "Ω")
	fmt.Println(err)
	// Output:
	// 4k7 → 4700 <nil>
	// 1n5 → 1.5e-09 <nil>
	// 100 nF → 1e-07 <nil>
	// 10u → 1e-05 <nil>
	// 27 °C → 300.15 <nil>
	// 8.6 fF/µm² → 0.0086 <nil>
	// 5 % → 0.05 <nil>
	// 40 dB → 100 <nil>
	// "10 Meg": unknown unit "Meg" (prefixes are the case-sensitive SI ones: m is milli, M is mega); expected a value in Ω such as "4k7" or "4.7 kΩ"
}
