package cases

import (
	"math"
	"strings"
	"testing"

	"tangent/devices"
)

// Sources of the reference values below:
//
//	SI-T7   SI Brochure, 9th edition (BIPM 2019), table 7: SI prefixes.
//	SI-3    SI Brochure, 9th ed., section 3: a prefix joins its unit symbol
//	        into a new symbol, which an exponent raises as a whole
//	        ("cm³ = (10⁻² m)³"); compound prefixes are not allowed.
//	SI-T4   SI Brochure, 9th ed., table 4 and 2.3.1: degree Celsius,
//	        t/°C = T/K − 273.15.
//	SI-5.4  SI Brochure, 9th ed., 5.4.3 and 5.4.7: a space between number
//	        and unit; the percent sign for 0.01.
//	IEC     IEC 60062:2016, letter and digit code for resistance and
//	        capacitance values (the letter replaces the decimal point and
//	        gives the multiplier: R, K, M, G, T for ohms; p, n, µ, m, F for
//	        farads). Examples from memory.
//	dB      field-quantity level in decibels, 20·log10 of the ratio
//	        (IEC 60027-3; from memory).
//	ours    a choice of this project, documented on ParseValue.
var valueTable = []struct {
	in, unit string
	want     float64
	source   string
}{
	// SI prefixes, one row each (SI-T7).
	{"1 yA", "A", 1e-24, "SI-T7"},
	{"1 zA", "A", 1e-21, "SI-T7"},
	{"1 aA", "A", 1e-18, "SI-T7"},
	{"5 fA", "A", 5e-15, "SI-T7"},
	{"1 pF", "F", 1e-12, "SI-T7"},
	{"100 nF", "F", 100e-9, "SI-T7"},
	{"10 µm", "m", 10e-6, "SI-T7 (micro sign U+00B5)"},
	{"10 μm", "m", 10e-6, "SI-T7 (Greek mu U+03BC)"},
	{"10 um", "m", 10e-6, "SI-T7, u for µ (common practice)"},
	{"250 mW", "W", 0.25, "SI-T7"},
	{"4.7 kΩ", "Ω", 4700, "SI-T7"},
	{"2.2 MΩ", "Ω", 2.2e6, "SI-T7"},
	{"1 GHz", "Hz", 1e9, "SI-T7"},
	{"1 THz", "Hz", 1e12, "SI-T7"},
	{"1 mΩ", "Ω", 1e-3, "SI-T7: m is milli"},
	{"1 MΩ", "Ω", 1e6, "SI-T7: M is mega"},
	// A prefix without its unit symbol (ours, per DESIGN.md).
	{"10m", "Ω", 0.01, "ours: trailing prefix letter"},
	{"4.7k", "Ω", 4700, "ours"},
	{"10u", "m", 10e-6, "ours: a width written 10u"},
	{"10m", "m", 0.01, "ours: 10m is ten milli-units, 10 mm"},
	{"10 m", "m", 10, "ours: with a space, ten metres"},
	{"10 mm", "m", 0.01, "SI-T7"},
	{"10 k", "", 10e3, "ours: a lone prefix after a space"},
	{"1k", "", 1000, "ours"},
	// Units: spellings and space (SI-5.4).
	{"9 V", "V", 9, "SI-5.4"},
	{"9V", "V", 9, "ours: the space may be left out"},
	{"-2.5 V", "V", -2.5, "SI-5.4"},
	{"+5 V", "V", 5, "SI-5.4"},
	{"1e-3 A", "A", 1e-3, "SI-5.4"},
	{"1.5E3 ohm", "Ω", 1500, "ours: ohm for Ω"},
	{"1 kohm", "Ω", 1000, "ours"},
	{"1 kΩ", "Ω", 1000, "ohm sign U+2126 for Ω"},
	{".5 V", "V", 0.5, "ours"},
	{"2 mS", "S", 2e-3, "SI-T7"},
	{"10 µH", "H", 10e-6, "SI-T7"},
	{"400 ps", "s", 400e-12, "SI-T7"},
	{"1.11 eV", "eV", 1.11, "SI Brochure table 8 (electronvolt)"},
	{"-2 mV/K", "V/K", -2e-3, "SI-3"},
	// Compound units: the prefix binds to its factor, then the exponent (SI-3).
	{"200 µA/V²", "A/V²", 200e-6, "SI-3"},
	{"200 uA/V^2", "A/V²", 200e-6, "SI-3, ^2 for ²"},
	{"8.6 fF/µm²", "F/m²", 8.6e-3, "SI-3: fF/µm² = 1e-15 F/(1e-6 m)²"},
	{"8.6 mF/m^2", "F/m²", 8.6e-3, "SI-3"},
	{"0.3 fF/µm", "F/m", 0.3e-9, "SI-3"},
	{"0.02 1/V", "1/V", 0.02, "SI-3"},
	{"0.02 /V", "1/V", 0.02, "ours"},
	{"0.02 V^-1", "1/V", 0.02, "SI-3"},
	{"20 m/V", "1/V", 0, "error: m/V is metre per volt"},
	{"0.4 V^0.5", "V^0.5", 0.4, "SI-3"},
	// Temperature (SI-T4).
	{"27 °C", "K", 300.15, "SI-T4"},
	{"0 °C", "K", 273.15, "SI-T4"},
	{"-30 °C", "K", 243.15, "SI-T4"},
	{"-273.15 °C", "K", 0, "SI-T4: absolute zero"},
	{"300.15 K", "K", 300.15, "SI-T4"},
	{"27°C", "K", 300.15, "ours: the space may be left out"},
	// Percent (SI-5.4), degrees, decibels.
	{"5 %", "%", 0.05, "SI-5.4"},
	{"0.1 %", "%", 0.001, "SI-5.4"},
	{"0.05", "%", 0.05, "ours: a bare fraction"},
	{"-90 °", "°", -90, "ours"},
	{"45 deg", "°", 45, "ours"},
	{"30", "°", 30, "ours"},
	{"20 dB", "dB", 10, "dB"},
	{"40 dB", "dB", 100, "dB"},
	{"-6.020599913279624 dB", "dB", 0.5, "dB: 20·log10(0.5)"},
	{"-100", "dB", -100, "ours: a bare ratio, sign kept"},
	{"2 V/V", "dB", 2, "ours"},
	// IEC 60062 letter and digit codes.
	{"R47", "Ω", 0.47, "IEC"},
	{"4R7", "Ω", 4.7, "IEC"},
	{"47R", "Ω", 47, "IEC"},
	{"2R2", "Ω", 2.2, "IEC"},
	{"4K7", "Ω", 4700, "IEC"},
	{"4k7", "Ω", 4700, "IEC (lower-case k, common practice)"},
	{"47K", "Ω", 47e3, "IEC"},
	{"5k6", "Ω", 5600, "IEC"},
	{"4M7", "Ω", 4.7e6, "IEC"},
	{"1G0", "Ω", 1e9, "IEC"},
	{"1T5", "Ω", 1.5e12, "IEC"},
	{"p68", "F", 0.68e-12, "IEC"},
	{"6p8", "F", 6.8e-12, "IEC"},
	{"1n5", "F", 1.5e-9, "IEC"},
	{"4n7", "F", 4.7e-9, "IEC"},
	{"µ47", "F", 0.47e-6, "IEC"},
	{"4µ7", "F", 4.7e-6, "IEC"},
	{"4u7", "F", 4.7e-6, "IEC, u for µ (common practice)"},
	{"3m3", "F", 3.3e-3, "IEC"},
	{"1F5", "F", 1.5, "IEC"},
	{"2µ2", "H", 2.2e-6, "ours: the capacitance letters for inductance"},
	{"1m5", "H", 1.5e-3, "ours"},
}

func TestParseValue(t *testing.T) {
	for _, r := range valueTable {
		got, err := ParseValue(r.in, r.unit)
		if strings.HasPrefix(r.source, "error") {
			if err == nil {
				t.Errorf("ParseValue(%q, %q) = %g, want an error (%s)", r.in, r.unit, got, r.source)
			}
			continue
		}
		if err != nil {
			t.Errorf("ParseValue(%q, %q): %v (%s)", r.in, r.unit, err, r.source)
			continue
		}
		// Exact decimal → float64 rounding except where a logarithm or the
		// Celsius offset is involved (1e-12 relative).
		if got != r.want && math.Abs(got-r.want) > 1e-12*math.Abs(r.want) {
			t.Errorf("ParseValue(%q, %q) = %.17g, want %.17g (%s)", r.in, r.unit, got, r.want, r.source)
		}
	}
}

// TestParseValueExact checks that prefixes are applied in decimal, not by
// multiplying floats: 4.7 × 1000 is 4700.000000000001 in float64.
func TestParseValueExact(t *testing.T) {
	for _, in := range []string{"4k7", "4.7k", "4.7 kΩ", "4K7"} {
		if v, _ := ParseValue(in, "Ω"); v != 4700 {
			t.Errorf("%q = %.17g, want exactly 4700", in, v)
		}
	}
	if v, _ := ParseValue("-30 °C", "K"); v != 243.15 {
		t.Errorf("-30 °C = %.17g K, want the float64 nearest 243.15", v)
	}
}

func TestParseValueErrors(t *testing.T) {
	for _, r := range []struct{ in, unit, want, why string }{
		{"", "V", "empty value", "nothing written"},
		{"   ", "V", "empty value", "nothing written"},
		{"10 Meg", "Ω", `unknown unit "Meg"`, "Meg is not an SI prefix"},
		{"1 mµm", "m", "unknown unit", "SI-3: no compound prefixes"},
		{"10 V", "Ω", `unit "V" does not fit`, "unit of another quantity"},
		{"10 µH", "F", `unit "µH" does not fit`, "unit of another quantity"},
		{"4k7", "V", "IEC 60062 letter codes are accepted only", "IEC codes are for R, L, C"},
		{"2R2", "F", "decimal marker for resistances only", "R is not a capacitance letter"},
		{"2R2", "H", "decimal marker for resistances only", "an inductor's 2R2 would be a guess"},
		{"4.7k7", "Ω", "malformed IEC 60062 code", "an IEC code has no decimal point"},
		{"inf", "V", `"inf" is not allowed`, "inf only where allowed"},
		{"-inf", "V", "not a finite number", "never negative infinity"},
		{"nan", "V", "not a finite number", "never NaN"},
		{"1e999", "V", "out of range", "overflow"},
		{"1e308 TV", "V", "out of range", "overflow through the prefix"},
		{"1e9999999", "V", "exponent out of range", "absurd exponent"},
		{"300", "K", "needs its unit", "ours: a bare temperature is ambiguous"},
		{"300m", "K", "needs its unit", "ours: a prefix is not a unit"},
		{"27 m°C", "K", "no prefix is allowed with °C", "SI-T4"},
		{"27 C", "K", `unknown unit "C"`, "C is not °C"},
		{"abc", "V", "not a number", "not a number"},
		{"5 dB", "", `unknown unit "dB"`, "dB only for gains"},
		{"5 %", "V", `unknown unit "%"`, "percent only for fractions"},
		{"1 k Ω", "Ω", "unknown unit", "SI-3: no space inside a symbol"},
		{"0x10", "V", "IEC 60062", "no hexadecimal"},
		{"1_000", "V", "unknown unit", "no digit separators"},
		{"mV", "V", "not a number", "a unit alone"},
		{"-8000 dB", "dB", "gain out of range", "underflows to zero"},
	} {
		_, err := ParseValue(r.in, r.unit)
		if err == nil || !strings.Contains(err.Error(), r.want) {
			t.Errorf("ParseValue(%q, %q): error %v, want one containing %q (%s)", r.in, r.unit, err, r.want, r.why)
		}
	}
}

func TestParseValueInf(t *testing.T) {
	for _, in := range []string{"inf", "+inf", " inf ", "inf V"} {
		v, err := ParseValueInf(in, "V")
		if err != nil || !math.IsInf(v, 1) {
			t.Errorf("ParseValueInf(%q) = %v, %v; want +Inf", in, v, err)
		}
	}
	if _, err := ParseValueInf("inf A", "V"); err == nil {
		t.Error(`ParseValueInf("inf A", "V"): want a unit error`)
	}
	if v, err := ParseValueInf("90 V", "V"); err != nil || v != 90 {
		t.Errorf(`ParseValueInf("90 V") = %v, %v`, v, err)
	}
}

// TestDeviceUnitsKnown checks that every unit in the device parameter
// tables is one ParseValue understands (the tables are the single source
// of truth for model keys).
func TestDeviceUnitsKnown(t *testing.T) {
	for _, dev := range deviceKinds {
		for _, p := range devices.Params(dev) {
			if _, err := unitDims(p.Unit); err != nil {
				t.Errorf("%s.%s: unit %q: %v", dev, p.Key, p.Unit, err)
			}
			if p.Unit == "K" {
				continue
			}
			if _, err := ParseValue("1", p.Unit); err != nil {
				t.Errorf("%s.%s: %v", dev, p.Key, err)
			}
			if p.Unit != "" {
				if v, err := ParseValue("1 "+p.Unit, p.Unit); err != nil || v != 1 {
					t.Errorf("%s.%s: 1 %s = %v, %v", dev, p.Key, p.Unit, v, err)
				}
			}
		}
	}
}
