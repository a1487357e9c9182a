package main

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// engPrefixes are the SI prefixes formatEng uses, from 10⁻²⁴ (index 0) to
// 10¹² (index 12).
var engPrefixes = []string{"y", "z", "a", "f", "p", "n", "µ", "m", "", "k", "M", "G", "T"}

// formatEng formats v for a table: four significant digits, trailing zeros
// kept so that columns line up, an SI prefix that puts the mantissa in
// [1, 1000), a true minus sign and the unit: 0.0012345, "A" → "1.235 mA";
// −3.1, "V" → "−3.100 V"; 0 → "0 V". Values beyond the prefixes are written
// in exponent form: 4.044e-35 W.
func formatEng(v float64, unit string) string {
	return formatEngDigits(v, unit, 4)
}

// formatEngDigits is formatEng with the given number of significant digits.
func formatEngDigits(v float64, unit string, digits int) string {
	switch {
	case v == 0:
		return join("0", unit)
	case math.IsNaN(v):
		return join("NaN", unit)
	case math.IsInf(v, 1):
		return join("∞", unit)
	case math.IsInf(v, -1):
		return join("−∞", unit)
	}
	sign := ""
	if v < 0 {
		sign = "−"
		v = -v
	}
	e := int(math.Floor(math.Log10(v) / 3))
	for k := 0; k < 2; k++ {
		if e < -8 || e > 4 {
			return join(sign+strconv.FormatFloat(v, 'e', digits-1, 64), unit)
		}
		m := v / math.Pow(10, float64(3*e))
		intDigits := 1
		if m >= 100 {
			intDigits = 3
		} else if m >= 10 {
			intDigits = 2
		}
		s := strconv.FormatFloat(m, 'f', max(0, digits-intDigits), 64)
		if r, _ := strconv.ParseFloat(s, 64); intDigits < 3 && r >= math.Pow(10, float64(intDigits)) {
			// rounding carried into one more integer digit: 99.996 → 100.0
			s = strconv.FormatFloat(m, 'f', max(0, digits-intDigits-1), 64)
		}
		if r, _ := strconv.ParseFloat(s, 64); r >= 1000 {
			e++ // rounding carried into the next prefix: 999.96 → 1.000 k
			continue
		}
		return join(sign+s, engPrefixes[e+8]+unit)
	}
	return join(sign+strconv.FormatFloat(v, 'g', digits, 64), unit)
}

func join(num, unit string) string {
	if unit == "" {
		return num
	}
	return num + " " + unit
}

// writeTable writes rows as aligned columns, two spaces apart, each line
// starting with indent. Columns whose right flag is set (numbers) are
// aligned on the right, the others on the left. Widths count runes, so µ
// and − take one column.
func writeTable(w io.Writer, indent string, right []bool, rows [][]string) {
	var width []int
	for _, r := range rows {
		for i, cell := range r {
			if i >= len(width) {
				width = append(width, 0)
			}
			width[i] = max(width[i], utf8.RuneCountInString(cell))
		}
	}
	for _, r := range rows {
		var b strings.Builder
		b.WriteString(indent)
		for i, cell := range r {
			pad := strings.Repeat(" ", width[i]-utf8.RuneCountInString(cell))
			if i > 0 {
				b.WriteString("  ")
			}
			if i < len(right) && right[i] {
				b.WriteString(pad + cell)
			} else if i < len(r)-1 {
				b.WriteString(cell + pad)
			} else {
				b.WriteString(cell)
			}
		}
		fmt.Fprintln(w, b.String())
	}
}
