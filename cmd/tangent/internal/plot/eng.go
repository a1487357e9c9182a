package plot

import (
	"math"
	"strconv"
	"strings"
)

// minus is the typographic minus sign (U+2212), used on the page in place of
// the hyphen-minus.
const minus = "\u2212"

// prefixes are the SI prefixes from 10⁻²⁴ to 10²⁴ (SI Brochure, 9th ed.,
// table 7), indexed by exponent/3 + 8.
var prefixes = [...]string{"y", "z", "a", "f", "p", "n", "µ", "m", "", "k", "M", "G", "T", "P", "E", "Z", "Y"}

// formatEng writes v with at most sig significant digits and an SI prefix
// chosen so that the mantissa lies in [1, 1000), followed by unit:
// formatEng(12400, 3, "Hz") is "12.4 kHz", formatEng(-1e9, 3, "") is "−1 G".
// Trailing zeros are dropped. Zero is "0" followed by the unit.
func formatEng(v float64, sig int, unit string) string {
	switch {
	case math.IsNaN(v):
		return "NaN"
	case math.IsInf(v, 0):
		if v < 0 {
			return minus + "∞"
		}
		return "∞"
	}
	sign := ""
	if v < 0 {
		sign = minus
		v = -v
	}
	if v == 0 {
		if unit == "" {
			return "0"
		}
		return "0 " + unit
	}
	exp3 := int(math.Floor(math.Log10(v)/3)) * 3
	m := v / math.Pow(10, float64(exp3))
	// Rounding may carry the mantissa to 1000 (999.7 → "1000"): move up a prefix.
	mr, _ := strconv.ParseFloat(strconv.FormatFloat(m, 'g', sig, 64), 64)
	if mr >= 1000 {
		exp3 += 3
		m /= 1000
	}
	if exp3 < -24 || exp3 > 24 {
		// Beyond the prefixes: plain scientific notation.
		s := strconv.FormatFloat(v, 'g', sig, 64)
		s = strings.Replace(s, "e+", "e", 1)
		return sign + s + sepUnit(unit)
	}
	digits := sig - 1 - int(math.Floor(math.Log10(m)))
	if digits < 0 {
		digits = 0
	}
	s := strconv.FormatFloat(m, 'f', digits, 64)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(s, "0")
		s = strings.TrimSuffix(s, ".")
	}
	p := prefixes[exp3/3+8]
	if p == "" && unit == "" {
		return sign + s
	}
	return sign + s + " " + p + unit
}

func sepUnit(unit string) string {
	if unit == "" {
		return ""
	}
	return " " + unit
}

// formatDeg writes an angle in whole degrees with the typographic minus:
// −90°.
func formatDeg(v float64) string {
	return formatNum(v) + "°"
}

// formatNum writes a tick value such as a level in dB with the typographic
// minus and no exponent.
func formatNum(v float64) string {
	if v == 0 {
		return "0" // never "−0"
	}
	return signed(strconv.FormatFloat(v, 'f', -1, 64))
}

func signed(s string) string {
	if strings.HasPrefix(s, "-") {
		return minus + s[1:]
	}
	return s
}
