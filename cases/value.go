package cases

import (
	"errors"
	"fmt"
	"math"
	"math/big"
	"strconv"
	"strings"
	"unicode/utf8"
)

// ParseValue reads a value written as a string in a case file and returns it
// in the SI unit named by unit (see below). The forms are:
//
//   - a number, optionally signed, with an optional decimal exponent:
//     "4.7", "-2", "1e-3";
//   - the number followed by an SI prefix and/or a unit, with or without a
//     space: "4.7k", "4.7 kΩ", "100 nF", "9 V". The prefixes are the SI
//     Brochure's y z a f p n u µ m k M G T and are case-sensitive ("m" is
//     milli, "M" is mega; "u" may stand for µ). A unit, when written, must
//     fit unit: "5 V" for a current is an error;
//   - an IEC 60062 letter-and-digit code for resistance, capacitance and
//     inductance: the letter stands for the decimal point and the multiplier.
//     Resistance: R (1), k or K (10³), M (10⁶), G (10⁹), T (10¹²), as in
//     "R47", "2R2", "4k7", "4M7". Capacitance: p n µ/u m and F, as in
//     "1n5", "4µ7", "p68", "1F5". Inductance: p n µ/u m, as in "2µ2", "1m5".
//     A code may end in its letter: "47R", "47K".
//     R is not a decimal marker for capacitance or inductance: "2R2" for an
//     inductor is rejected rather than guessed. A code carries no unit;
//   - for keys that allow it, "inf" (see ParseValueInf).
//
// A single trailing letter that is an SI prefix is read as the prefix: "10m"
// is 0.01 in the key's unit, so "10m" for a length is 10 mm and "10u" is
// 10 µm. Written with a space, "10 m" for a length is ten metres (the one
// case where a prefix letter and a unit symbol coincide); any other lone
// letter after a space is still a prefix ("10 k" is 10 000).
//
// Compound units take prefixes on each factor, and an exponent applies to
// the prefixed factor (SI Brochure 9th ed., 3: "cm³ = (0.01 m)³"):
// "8.6 fF/µm²" is 8.6e-3 F/m². "^2" may be written for "²".
//
// The unit argument names what the key holds:
//
//	"Ω" (also written "ohm"), "S", "F", "H", "V", "A", "s", "Hz", "m", "W",
//	"eV", "V/K", "A/V²", "1/V" (also "/V", "V^-1"), "V^0.5", "F/m²", "F/m";
//	"K"   a temperature: "300.15 K" or "27 °C" (converted to kelvin,
//	      +273.15). A bare number is an error for a temperature: whether it
//	      means kelvin or degrees Celsius would be a guess.
//	""    a pure number; prefixes are allowed ("1k" is 1000).
//	"%"   a fraction: "5 %" is 0.05 and a bare 0.05 is 0.05.
//	"dB"  a ratio (a gain): a bare number is the ratio, "20 dB" is 10
//	      (10^(x/20)); "V/V" and "A/A" are also accepted.
//	"°"   an angle in degrees: "-90 °", "-90 deg" or a bare number. The
//	      result is in degrees.
//
// The result is always finite. Values out of float64 range are errors.
func ParseValue(s, unit string) (float64, error) { return parseValue(s, unit, false) }

// ParseValueInf is ParseValue that also accepts "inf" or "+inf" (optionally
// followed by a fitting unit, "inf V") and returns +Inf for it. Keys such as
// Early and breakdown voltages use it, where infinity means "effect off".
func ParseValueInf(s, unit string) (float64, error) { return parseValue(s, unit, true) }

// siPrefixes maps an SI prefix symbol to its decimal exponent (SI Brochure,
// 9th ed., table 7). Only the prefixes an engineer meets in circuit values
// are accepted; "u" is the ASCII stand-in for µ (common practice), and both
// the micro sign U+00B5 and the Greek mu U+03BC are read as micro.
var siPrefixes = map[rune]int{
	'y': -24, 'z': -21, 'a': -18, 'f': -15, 'p': -12, 'n': -9,
	'u': -6, 'µ': -6, 'μ': -6, 'm': -3, 'k': 3, 'M': 6, 'G': 9, 'T': 12,
}

// unitSymbols maps every accepted spelling of a base unit symbol to its
// canonical form.
var unitSymbols = map[string]string{
	"\u03a9": "Ω", "\u2126": "Ω", "ohm": "Ω", // Greek capital omega, ohm sign
	"S": "S", "F": "F", "H": "H", "V": "V", "A": "A", "s": "s", "Hz": "Hz",
	"m": "m", "K": "K", "eV": "eV", "W": "W",
}

// iecLetters gives, per unit, the IEC 60062 code letters and their decimal
// exponents.
var iecLetters = map[string]map[rune]int{
	"Ω": {'R': 0, 'k': 3, 'K': 3, 'M': 6, 'G': 9, 'T': 12},
	"F": {'p': -12, 'n': -9, 'u': -6, 'µ': -6, 'μ': -6, 'm': -3, 'F': 0},
	"H": {'p': -12, 'n': -9, 'u': -6, 'µ': -6, 'μ': -6, 'm': -3},
}

// unitExamples gives a sample of each unit for error messages.
var unitExamples = map[string]string{
	"Ω": `"4k7" or "4.7 kΩ"`, "S": `"2 mS"`, "F": `"100n" or "100 nF"`,
	"H": `"10u" or "10 µH"`, "V": `"9 V"`, "A": `"1 mA"`, "s": `"400 ps"`,
	"Hz": `"10 Hz"`, "m": `"10u" or "10 µm"`, "K": `"27 °C" or "300.15 K"`,
	"eV": `"1.11 eV"`, "W": `"250 mW"`, "V/K": `"-2 mV/K"`,
	"A/V²": `"200 µA/V²"`, "1/V": `"0.02 1/V"`, "V^0.5": `"0.4 V^0.5"`,
	"F/m²": `"8.6 fF/µm²"`, "F/m": `"0.3 fF/µm"`, "": `"100"`,
	"%": `"5 %" or 0.05`, "dB": `"10" or "20 dB"`, "°": `"-90 °" or -90`,
}

// unitExample returns a sample value in unit for messages.
func unitExample(unit string) string {
	if e, ok := unitExamples[unit]; ok {
		return e
	}
	return `"1 ` + unit + `"`
}

// describeUnit names what a unit holds, for messages.
func describeUnit(unit string) string {
	switch unit {
	case "":
		return "a plain number"
	case "%":
		return "a fraction"
	case "dB":
		return "a ratio"
	case "°":
		return "an angle in degrees"
	case "K":
		return "a temperature"
	}
	return "a value in " + unit
}

func valueErrorf(s, unit, format string, args ...any) error {
	return fmt.Errorf("%q: %s; expected %s such as %s", s, fmt.Sprintf(format, args...), describeUnit(unit), unitExample(unit))
}

func parseValue(s, unit string, allowInf bool) (float64, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return 0, valueErrorf(s, unit, "empty value")
	}
	if len(t) > 200 {
		return 0, valueErrorf(s[:40]+"…", unit, "value too long")
	}
	if rest, ok := cutInf(t); ok {
		if !allowInf {
			return 0, valueErrorf(s, unit, `"inf" is not allowed for this key`)
		}
		if rest != "" {
			if _, _, err := suffixFactor(rest, unit, true); err != nil {
				return 0, valueErrorf(s, unit, "%v", err)
			}
		}
		return math.Inf(1), nil
	}
	if l := strings.ToLower(t); strings.HasPrefix(l, "-inf") || strings.Contains(l, "nan") {
		return 0, valueErrorf(s, unit, "not a finite number")
	}

	// IEC 60062 code with the letter first: R47, p68, µ47.
	if r, n := utf8.DecodeRuneInString(t); isLetter(r) && n < len(t) && allDigits(t[n:]) {
		return iecValue(s, unit, "", r, t[n:])
	}

	mant, exp, n, err := scanNumber(t)
	if err != nil {
		return 0, valueErrorf(s, unit, "%v", err)
	}
	rest := t[n:]

	// IEC 60062 code with the letter inside: 4k7, 2R2, 1n5.
	if r, m := utf8.DecodeRuneInString(rest); rest != "" && isLetter(r) && m < len(rest) && allDigits(rest[m:]) {
		if !allDigits(mant) || exp != 0 {
			return 0, valueErrorf(s, unit, "malformed IEC 60062 code (digits, one letter, digits)")
		}
		return iecValue(s, unit, mant, r, rest[m:])
	}

	// IEC 60062 code with the letter last, where the letter is not an SI
	// prefix: 47R, 47K (a prefix letter, "47k", is read as the prefix).
	if r, m := utf8.DecodeRuneInString(rest); m == len(rest) && m > 0 && allDigits(mant) && exp == 0 {
		if _, isPrefix := siPrefixes[r]; !isPrefix {
			if _, ok := iecLetters[unit][r]; ok {
				return iecValue(s, unit, mant, r, "0")
			}
		}
	}

	suffix := strings.TrimLeft(rest, " \t")
	spaced := len(suffix) < len(rest)
	if suffix == "" {
		if unit == "K" {
			return 0, valueErrorf(s, unit, "a temperature needs its unit (K or °C); a bare number would be a guess")
		}
		return finite(s, unit, mant, exp)
	}

	// Units that are not products of base symbols.
	switch {
	case unit == "K" && (suffix == "°C" || suffix == "℃"):
		return celsius(s, unit, mant, exp)
	case unit == "%" && suffix == "%":
		return finite(s, unit, mant, exp-2)
	case unit == "dB" && suffix == "dB":
		v, err := finite(s, unit, mant, exp)
		if err != nil {
			return 0, err
		}
		g := math.Pow(10, v/20)
		if g == 0 || math.IsInf(g, 0) {
			return 0, valueErrorf(s, unit, "gain out of range")
		}
		return g, nil
	case unit == "°" && (suffix == "°" || suffix == "deg"):
		return finite(s, unit, mant, exp)
	}

	// "10 m" for a length is ten metres; "10m" is ten millimetres.
	if unit == "m" && spaced && suffix == "m" {
		return finite(s, unit, mant, exp)
	}
	p10, kind, err := suffixFactor(suffix, unit, false)
	if err != nil {
		return 0, valueErrorf(s, unit, "%v", err)
	}
	if kind == suffixPrefixOnly && unit == "K" {
		return 0, valueErrorf(s, unit, "a temperature needs its unit (K or °C)")
	}
	return finite(s, unit, mant, exp+p10)
}

// cutInf reports whether t is "inf" or "+inf", optionally followed by a space
// and a unit, and returns that unit.
func cutInf(t string) (string, bool) {
	t = strings.TrimPrefix(t, "+")
	if !strings.HasPrefix(t, "inf") {
		return "", false
	}
	rest := t[3:]
	if rest == "" {
		return "", true
	}
	if rest[0] != ' ' && rest[0] != '\t' {
		return "", false
	}
	return strings.TrimSpace(rest), true
}

// finite assembles mant·10^exp, letting strconv round the decimal once so
// that "4k7" is exactly the float64 nearest 4700.
func finite(s, unit, mant string, exp int) (float64, error) {
	if exp > 400 || exp < -400 {
		if strings.Trim(mant, "+-0.") == "" {
			return 0, nil
		}
		return 0, valueErrorf(s, unit, "value out of range")
	}
	v, err := strconv.ParseFloat(mant+"e"+strconv.Itoa(exp), 64)
	if err != nil && !errors.Is(err, strconv.ErrRange) {
		return 0, valueErrorf(s, unit, "not a number")
	}
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, valueErrorf(s, unit, "value out of range")
	}
	return v, nil
}

// celsius converts mant·10^exp °C to kelvin, adding 273.15 in exact
// decimal arithmetic so that "-30 °C" is the float64 nearest 243.15.
func celsius(s, unit, mant string, exp int) (float64, error) {
	if _, err := finite(s, unit, mant, exp); err != nil {
		return 0, err
	}
	r, ok := new(big.Rat).SetString(mant + "e" + strconv.Itoa(exp))
	if !ok {
		return 0, valueErrorf(s, unit, "not a number")
	}
	v, _ := r.Add(r, big.NewRat(27315, 100)).Float64()
	return v, nil
}

// scanNumber reads a decimal number at the start of t: an optional sign,
// digits with an optional fraction (or a fraction alone), and an exponent
// "e±N" only when digits follow the e. It returns the mantissa text, the
// exponent and the bytes consumed.
func scanNumber(t string) (mant string, exp, n int, err error) {
	i := 0
	if i < len(t) && (t[i] == '+' || t[i] == '-') {
		i++
	}
	digits := 0
	for i < len(t) && isDigit(t[i]) {
		i++
		digits++
	}
	if i < len(t) && t[i] == '.' {
		i++
		for i < len(t) && isDigit(t[i]) {
			i++
			digits++
		}
	}
	if digits == 0 {
		return "", 0, 0, errors.New("not a number")
	}
	mant = t[:i]
	if i < len(t) && (t[i] == 'e' || t[i] == 'E') {
		j := i + 1
		if j < len(t) && (t[j] == '+' || t[j] == '-') {
			j++
		}
		k := j
		for k < len(t) && isDigit(t[k]) {
			k++
		}
		if k > j {
			if k-j > 6 {
				return "", 0, 0, errors.New("exponent out of range")
			}
			e, _ := strconv.Atoi(t[i+1 : k])
			return mant, e, k, nil
		}
	}
	return mant, 0, i, nil
}

// iecValue evaluates an IEC 60062 code: before, the letter, after.
func iecValue(s, unit, before string, letter rune, after string) (float64, error) {
	letters, ok := iecLetters[unit]
	if !ok {
		return 0, valueErrorf(s, unit, "IEC 60062 letter codes are accepted only for resistance, capacitance and inductance")
	}
	e, ok := letters[letter]
	if !ok {
		if letter == 'R' {
			return 0, valueErrorf(s, unit, "R is the IEC 60062 decimal marker for resistances only")
		}
		return 0, valueErrorf(s, unit, "%q is not an IEC 60062 letter for %s", letter, unit)
	}
	if before == "" {
		before = "0"
	}
	return finite(s, unit, before+"."+after, e)
}

// Kinds of unit suffix.
const (
	suffixUnit       = iota // a unit, possibly prefixed
	suffixPrefixOnly        // a lone SI prefix letter
)

// suffixFactor checks that suffix (a unit, optionally prefixed, or a lone
// prefix) fits unit and returns its power of ten. With noPrefix, prefixes are
// not allowed (after "inf").
func suffixFactor(suffix, unit string, noPrefix bool) (int, int, error) {
	if r, n := utf8.DecodeRuneInString(suffix); n == len(suffix) {
		if e, ok := siPrefixes[r]; ok {
			if noPrefix {
				return 0, 0, errors.New("a prefix after inf means nothing")
			}
			return e, suffixPrefixOnly, nil
		}
	}
	want, err := unitDims(unit)
	if err != nil {
		return 0, 0, err
	}
	got, p10, err := parseUnit(suffix)
	if err != nil {
		if unit == "K" && strings.Contains(suffix, "°C") {
			return 0, 0, errors.New("no prefix is allowed with °C")
		}
		return 0, 0, err
	}
	if !sameDims(got, want) {
		return 0, 0, fmt.Errorf("unit %q does not fit this key", suffix)
	}
	if noPrefix && p10 != 0 {
		return 0, 0, errors.New("a prefix after inf means nothing")
	}
	return p10, suffixUnit, nil
}

// unitDims returns the base-symbol exponents of a key's unit.
func unitDims(unit string) (map[string]float64, error) {
	switch unit {
	case "", "%", "dB", "°":
		return map[string]float64{}, nil
	}
	d, p10, err := parseUnit(unit)
	if err != nil || p10 != 0 {
		return nil, fmt.Errorf("cases: unknown unit %q", unit)
	}
	return d, nil
}

// parseUnit reads a unit expression: a product term, optionally "/" and a
// second term, where a term is an optional SI prefix, a base symbol and an
// optional exponent ("²", "^2", "^0.5", "^-1", "⁻¹"). The numerator may be
// "1" or empty ("1/V", "/V"). It returns the exponent of every base symbol
// and the power of ten of the prefixes.
func parseUnit(u string) (map[string]float64, int, error) {
	dims := map[string]float64{}
	p10 := 0
	num, den, hasDen := strings.Cut(u, "/")
	if strings.Contains(den, "/") {
		return nil, 0, fmt.Errorf("unknown unit %q", u)
	}
	add := func(term string, sign float64) error {
		sym, pe, e, err := parseTerm(term)
		if err != nil {
			return fmt.Errorf("unknown unit %q (prefixes are the case-sensitive SI ones: m is milli, M is mega)", u)
		}
		if pe != 0 && e != math.Trunc(e) {
			return fmt.Errorf("unit %q: a prefix on a fractional power is not accepted", u)
		}
		dims[sym] += sign * e
		p10 += int(sign*e) * pe
		return nil
	}
	if num != "" && num != "1" {
		if err := add(num, 1); err != nil {
			return nil, 0, err
		}
	} else if !hasDen {
		return nil, 0, fmt.Errorf("unknown unit %q", u)
	}
	if hasDen {
		if err := add(den, -1); err != nil {
			return nil, 0, err
		}
	}
	for k, v := range dims {
		if v == 0 {
			delete(dims, k)
		}
	}
	return dims, p10, nil
}

// unitExponents lists the accepted exponent suffixes of a unit term.
var unitExponents = []struct {
	text string
	exp  float64
}{
	{"²", 2}, {"^2", 2}, {"^0.5", 0.5}, {"⁻¹", -1}, {"^-1", -1},
}

// parseTerm reads [prefix]symbol[exponent].
func parseTerm(term string) (sym string, p10 int, exp float64, err error) {
	exp = 1
	for _, x := range unitExponents {
		if strings.HasSuffix(term, x.text) {
			term = strings.TrimSuffix(term, x.text)
			exp = x.exp
			break
		}
	}
	if s, ok := unitSymbols[term]; ok {
		return s, 0, exp, nil
	}
	r, n := utf8.DecodeRuneInString(term)
	if e, ok := siPrefixes[r]; ok {
		if s, ok := unitSymbols[term[n:]]; ok {
			return s, e, exp, nil
		}
	}
	return "", 0, 0, errors.New("unknown unit")
}

func sameDims(a, b map[string]float64) bool {
	if len(a) != len(b) {
		return false
	}
	for k, v := range a {
		if b[k] != v {
			return false
		}
	}
	return true
}

func isDigit(c byte) bool { return c >= '0' && c <= '9' }

func isLetter(r rune) bool {
	return (r >= 'a' && r <= 'z') || (r >= 'A' && r <= 'Z') || r == 'µ' || r == 'μ'
}

func allDigits(s string) bool {
	if s == "" {
		return false
	}
	for i := 0; i < len(s); i++ {
		if !isDigit(s[i]) {
			return false
		}
	}
	return true
}
