package explain

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"
	"strconv"
	"strings"

	"tangent/ac"
	"tangent/cases"
)

// Thresholds of the summary's wording.
const (
	// minShare is the smallest storage share named as setting a pole.
	minShare = 0.05
	// millerWords is the Miller ratio (see TimeConstant) above which a
	// capacitor is called out as Miller-multiplied; a passive network
	// gives at most about 1.
	millerWords = 1.5
)

// summarize fills x.Summary.
func (x *Explanation) summarize() {
	s := &x.Summary
	s.HighPole, s.LowPole = -1, -1
	bw, r := x.Bandwidth, x.Rational
	unit := ac.Unit(x.Transfer.Kind)
	gain := x.Transfer.Kind == cases.VoltageGain || x.Transfer.Kind == cases.CurrentGain
	what := "mid-band value"
	if gain {
		what = "mid-band gain"
	}
	switch {
	case bw.Reference == 0:
		s.RefHz = math.NaN()
		s.Lines = append(s.Lines, what+": none (|H| has no finite reference level)")
	case bw.RefHz == 0:
		h, _ := r.DCGain()
		s.Value = complex(h, 0)
		s.Lines = append(s.Lines, fmt.Sprintf("%s %s at DC", what, valueWords(s.Value, unit, gain)))
	case math.IsInf(bw.RefHz, 1):
		s.RefHz = bw.RefHz
		s.Value = complex(r.Gain(), 0)
		s.Lines = append(s.Lines, fmt.Sprintf("%s %s at high frequency", what, valueWords(s.Value, unit, gain)))
	default:
		s.RefHz = bw.RefHz
		s.Value = r.Eval(complex(0, 2*math.Pi*bw.RefHz))
		s.Lines = append(s.Lines, fmt.Sprintf("%s %s at %s", what, valueWords(s.Value, unit, gain), eng(bw.RefHz, "Hz")))
	}
	if bw.Reference == 0 {
		return
	}
	wref := 2 * math.Pi * bw.RefHz
	if math.IsNaN(wref) {
		wref = 0
	}
	if bw.HighHz != nil {
		s.HighPole = x.nearestPole(2*math.Pi**bw.HighHz, func(a float64) bool { return a > wref })
		s.Lines = append(s.Lines, x.edgeWords("f_high", *bw.HighHz, s.HighPole))
		if x.High != nil {
			s.Lines = append(s.Lines, x.estimateWords("open-circuit", "f_high", x.High, *bw.HighHz, s.HighPole))
		}
	}
	if bw.LowHz != nil {
		s.LowPole = x.nearestPole(2*math.Pi**bw.LowHz, func(a float64) bool { return a < wref })
		s.Lines = append(s.Lines, x.edgeWords("f_low", *bw.LowHz, s.LowPole))
		if x.Low != nil {
			s.Lines = append(s.Lines, x.estimateWords("short-circuit", "f_low", x.Low, *bw.LowHz, s.LowPole))
		}
	}
}

// nearestPole returns the index of the visible, nonzero pole with
// sensitivities whose modulus (rad/s) is nearest to w on a log scale among
// those where keep(|p|), or −1.
func (x *Explanation) nearestPole(w float64, keep func(float64) bool) int {
	best, bd := -1, math.Inf(1)
	for i, p := range x.Poles {
		a := cmplx.Abs(p.S)
		if !p.Visible || a == 0 || p.Sens == nil || !keep(a) {
			continue
		}
		if d := math.Abs(math.Log(a / w)); d < bd {
			best, bd = i, d
		}
	}
	return best
}

// edgeWords says which elements set a band edge: "f_high 548.4 kHz: the
// pole at 548.2 kHz is set by Q1 c_mu 84 % (Miller ×26), Q1 c_pi 15 %;
// most sensitive to Q1 gm (−0.83), RC (−0.81)".
func (x *Explanation) edgeWords(name string, hz float64, pole int) string {
	line := fmt.Sprintf("%s %s", name, eng(hz, "Hz"))
	if pole < 0 {
		return line + ": no single pole sets it"
	}
	p := x.Poles[pole]
	where := "the pole at " + eng(cmplx.Abs(p.S)/(2*math.Pi), "Hz")
	if imag(p.S) != 0 {
		q := cmplx.Abs(p.S) / (-2 * real(p.S))
		where = fmt.Sprintf("the pole pair at f0 = %s, Q = %.3g,", eng(cmplx.Abs(p.S)/(2*math.Pi), "Hz"), q)
	}
	var set, other []string
	// Storage shares by origin: a device's elements together, each part of
	// the file on its own; and how many elements each device contributes.
	origin := map[string]float64{}
	count := map[string]int{}
	for _, sv := range p.Sens {
		e := x.Elements[sv.Element]
		if e.Storage() {
			key := "part " + e.Part
			if e.Device != "" {
				key = e.Device
			}
			origin[key] += sv.Storage
			count[key]++
			if sv.Storage >= minShare && len(set) < 3 {
				set = append(set, e.Label()+" "+percent(sv.Storage)+x.millerWords(sv.Element))
			}
			continue
		}
		if len(other) < 2 {
			other = append(other, fmt.Sprintf("%s (%s)", e.Label(), signed(real(sv.S))))
		}
	}
	if len(set) == 0 {
		line += ": " + where + " has no dominant storage element"
	} else {
		line += ": " + where + " is set by " + strings.Join(set, ", ")
	}
	// A device's total says which stage limits the band where several
	// stages or parts contribute.
	if d, share := topDevice(origin); count[d] > 1 && share >= 0.5 && share <= 1-minShare && !strings.HasPrefix(d, "part ") {
		line += fmt.Sprintf(" (%s's elements together %s)", d, percent(share))
	}
	if len(other) > 0 {
		line += "; most sensitive to " + strings.Join(other, ", ")
	}
	return line
}

// millerWords is " (Miller ×26)" for a capacitor whose open-circuit
// resistance is Miller-multiplied, "" otherwise.
func (x *Explanation) millerWords(elem int) string {
	for _, tc := range []*TimeConstants{x.High, x.Open} {
		if tc == nil {
			continue
		}
		for _, it := range tc.Items {
			if it.Element == elem && it.Miller > millerWords {
				return fmt.Sprintf(" (Miller ×%.3g)", it.Miller)
			}
		}
	}
	return ""
}

// estimateWords says what a time-constant method predicts and how far off
// it is from the exact band edge and from the pole that sets it:
// "open-circuit time constants estimate f_high 546.8 kHz (−0.3 % against
// the exact 548.4 kHz, −0.3 % against the pole); largest: Q1 c_mu, 92 %
// of Σ τ".
func (x *Explanation) estimateWords(method, name string, tc *TimeConstants, exact float64, pole int) string {
	line := fmt.Sprintf("%s time constants estimate %s %s (%s against the exact %s",
		method, name, eng(tc.EstimateHz, "Hz"), signedPercent(tc.EstimateHz/exact-1), eng(exact, "Hz"))
	if pole >= 0 {
		line += fmt.Sprintf(", %s against the pole", signedPercent(tc.EstimateHz/(cmplx.Abs(x.Poles[pole].S)/(2*math.Pi))-1))
	}
	line += ")"
	if len(tc.Items) > 0 {
		sum := "Σ τ"
		if tc.Short {
			sum = "Σ 1/τ"
		}
		it := tc.Items[0]
		line += fmt.Sprintf("; largest: %s, %s of %s", x.Elements[it.Element].Label(), percent(tc.Share(it)), sum)
	}
	if tc.Caveat != "" {
		line += "; " + tc.Caveat
	}
	return line
}

func topDevice(m map[string]float64) (string, float64) {
	names := make([]string, 0, len(m))
	for d := range m {
		names = append(names, d)
	}
	sort.Strings(names)
	best, bs := "", 0.0
	for _, d := range names {
		if m[d] > bs {
			best, bs = d, m[d]
		}
	}
	return best, bs
}

// valueWords writes a mid-band value: "−127.3 V/V (42.10 dB)" where it is
// real to 1 %, "127.3 V/V ∠ −178.2° (42.10 dB)" otherwise; dB for gains.
func valueWords(h complex128, unit string, gain bool) string {
	var s string
	if math.Abs(imag(h)) <= 0.01*math.Abs(real(h)) {
		s = eng(real(h), unit)
	} else {
		s = fmt.Sprintf("%s ∠ %s°", eng(cmplx.Abs(h), unit), minus(strconv.FormatFloat(cmplx.Phase(h)*180/math.Pi, 'f', 1, 64)))
	}
	if gain && h != 0 {
		db := strconv.FormatFloat(20*math.Log10(cmplx.Abs(h)), 'f', 2, 64)
		if db == "-0.00" {
			db = "0.00"
		}
		s += " (" + minus(db) + " dB)"
	}
	return s
}

// engPrefixes run from 10⁻¹⁸ (index 0) to 10¹² (index 10).
var engPrefixes = []string{"a", "f", "p", "n", "µ", "m", "", "k", "M", "G", "T"}

// eng writes v with four significant digits and an SI prefix: 548.4 kHz.
// Units V/V and A/A take no prefix.
func eng(v float64, unit string) string {
	if unit == "V/V" || unit == "A/A" {
		return minus(strconv.FormatFloat(v, 'g', 4, 64)) + " " + unit
	}
	if v == 0 || math.IsInf(v, 0) || math.IsNaN(v) {
		return minus(strconv.FormatFloat(v, 'g', 4, 64)) + " " + unit
	}
	e := int(math.Floor(math.Log10(math.Abs(v)) / 3))
	e = max(-6, min(4, e))
	m := v / math.Pow(10, float64(3*e))
	if math.Abs(m) >= 999.95 && e < 4 {
		e++
		m /= 1000
	}
	return minus(strconv.FormatFloat(m, 'g', 4, 64)) + " " + engPrefixes[e+6] + unit
}

// percent writes a fraction as a whole percentage: 0.843 → "84 %".
func percent(f float64) string { return minus(strconv.FormatFloat(100*f, 'f', 0, 64)) + " %" }

// signedPercent writes a relative error with its sign: "+14.6 %".
func signedPercent(f float64) string {
	s := strconv.FormatFloat(100*f, 'f', 1, 64)
	if f >= 0 {
		s = "+" + s
	}
	return minus(s) + " %"
}

// signed writes a sensitivity: "−0.83", "+1.2".
func signed(v float64) string {
	s := strconv.FormatFloat(v, 'g', 2, 64)
	if v >= 0 {
		s = "+" + s
	}
	return minus(s)
}

// rootWords writes a root in rad/s: "−3.445e+06", "−1e+03 ± j2e+03".
func rootWords(s complex128) string {
	if imag(s) == 0 {
		return minus(strconv.FormatFloat(real(s), 'g', 4, 64)) + " rad/s"
	}
	return fmt.Sprintf("%s ± j%s rad/s", minus(strconv.FormatFloat(real(s), 'g', 4, 64)), strconv.FormatFloat(math.Abs(imag(s)), 'g', 4, 64))
}

// minus replaces a leading hyphen by a true minus sign.
func minus(s string) string {
	if strings.HasPrefix(s, "-") {
		return "−" + s[1:]
	}
	return s
}
