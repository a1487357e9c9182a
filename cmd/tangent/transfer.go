package main

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"tangent/ac"
	"tangent/cases"
	"tangent/smallsignal"
)

func init() {
	register("transfer", "small-signal transfers between ports: poles, zeros, DC gain, bandwidth, Bode data", runTransfer)
}

// transferFlags are the flags of "tangent transfer".
type transferFlags struct {
	asJSON         bool
	from, to, kind string
	sweep          string
	csvFile        string
	plots          string
	response       bool
	twoPort        string
	at             []string
}

func runTransfer(args []string, stdout, stderr io.Writer) int {
	fs := newFlags("transfer", "tangent transfer [FILE] [--from PORT --to PORT --kind KIND] [flags]",
		"Bias the circuit, linearize it, and analyse each [[transfer]] of the file (or the one\n"+
			"given by --from, --to and --kind): poles and zeros from the matrix pencil, the\n"+
			"transfer function in DC-gain, pole-zero and polynomial form, DC gain, −3 dB band and\n"+
			"unity-gain frequency, and the frequency response over the sweep.\n"+
			"Kinds: voltage, current, transconductance, transimpedance, input_impedance, output_impedance.", stderr)
	var fl transferFlags
	fs.BoolVar(&fl.asJSON, "json", false, "print the result as JSON on stdout (SI units, rad/s for roots)")
	fs.StringVar(&fl.from, "from", "", "input `PORT` (with --to and --kind: analyse this transfer only)")
	fs.StringVar(&fl.to, "to", "", "output `PORT`")
	fs.StringVar(&fl.kind, "kind", "voltage", "transfer `KIND`")
	fs.StringVar(&fl.sweep, "sweep", "", "logarithmic sweep `START:STOP:POINTS_PER_DECADE`, e.g. 10Hz:1GHz:20 (overrides the file's)")
	fs.StringVar(&fl.csvFile, "csv", "", "write the swept responses to `FILE.csv`")
	fs.StringVar(&fl.plots, "plots", "", "write a Bode plot and a pole-zero map (SVG) of each transfer into `DIR`")
	fs.BoolVar(&fl.response, "response", false, "print the swept response as a table")
	fs.StringVar(&fl.twoPort, "two-port", "", "print z, y, h, g and abcd parameters of the two-port `P1,P2`")
	fs.StringSliceVar(&fl.at, "at", []string{"1 kHz"}, "`FREQUENCY` for --two-port (repeatable, comma-separated)")
	var cf caseFlags
	cf.register(fs)
	file, code, ok := parseFileArgs(fs, args, stderr)
	if !ok {
		return code
	}
	c, code := cf.load("transfer", file, stderr)
	if c == nil {
		return code
	}
	transfers, code := selectTransfers("transfer", c, fl.from, fl.to, fl.kind, stderr)
	if transfers == nil {
		return code
	}
	var override *cases.Sweep
	if fl.sweep != "" {
		s, err := parseSweep(fl.sweep)
		if err != nil {
			fmt.Fprintf(stderr, "tangent transfer: --sweep: %v\n", err)
			return exitUsage
		}
		override = s
	}
	var twoPortFreqs []float64
	if fl.twoPort != "" {
		if len(strings.Split(fl.twoPort, ",")) != 2 {
			fmt.Fprintf(stderr, "tangent transfer: --two-port: want two port names, P1,P2; got %q\n", fl.twoPort)
			return exitUsage
		}
		for _, a := range fl.at {
			f, err := cases.ParseValue(a, "Hz")
			if err != nil || f <= 0 {
				fmt.Fprintf(stderr, "tangent transfer: --at %q: want a positive frequency such as 1kHz\n", a)
				return exitUsage
			}
			twoPortFreqs = append(twoPortFreqs, f)
		}
	}
	eq, code := linearizeCase("transfer", c, stderr)
	if eq == nil {
		return code
	}
	if override == nil && fl.plots != "" {
		// A Bode plot needs a response: transfers without a sweep get the
		// default plot sweep.
		var withSweep []*cases.Transfer
		for _, t := range transfers {
			if t.Sweep == nil {
				u := *t
				u.Sweep = &defaultPlotSweep
				t = &u
			}
			withSweep = append(withSweep, t)
		}
		transfers = withSweep
	}
	results, code := analyseTransfers(eq, transfers, override, stderr)
	if results == nil {
		return code
	}
	var twoPorts []twoPortAt
	if fl.twoPort != "" {
		names := strings.Split(fl.twoPort, ",")
		for _, f := range twoPortFreqs {
			tp, err := ac.TwoPortAt(eq.Circuit, strings.TrimSpace(names[0]), strings.TrimSpace(names[1]), f)
			if err != nil {
				fmt.Fprintf(stderr, "tangent transfer: %v\n", err)
				return exitAnalysis
			}
			twoPorts = append(twoPorts, twoPortAt{f, tp})
		}
	}
	if fl.csvFile != "" {
		if err := writeAtomically(fl.csvFile, func(w io.Writer) error { return writeResponseCSV(w, results) }); err != nil {
			fmt.Fprintf(stderr, "tangent transfer: %v\n", err)
			return exitUsage
		}
	}
	if fl.plots != "" {
		if err := writePlots(fl.plots, c, results); err != nil {
			fmt.Fprintf(stderr, "tangent transfer: %v\n", err)
			return exitUsage
		}
	}
	if fl.asJSON {
		o := object{}
		o.set("file", caseName(file))
		var ts []any
		for _, r := range results {
			ts = append(ts, transferJSON(r))
		}
		o.set("transfers", ts)
		if len(twoPorts) > 0 {
			o.set("two_port", twoPortJSON(twoPorts))
		}
		if err := writeJSON(stdout, o); err != nil {
			fmt.Fprintf(stderr, "tangent transfer: %v\n", err)
			return exitAnalysis
		}
		return exitOK
	}
	printTransfers(stdout, caseName(file), eq, results, fl.response)
	printTwoPorts(stdout, fl.twoPort, twoPorts)
	return exitOK
}

// selectTransfers returns the file's transfers, or the one given by the
// --from, --to and --kind flags of subcommand name.
func selectTransfers(name string, c *cases.Circuit, from, to, kindFlag string, stderr io.Writer) ([]*cases.Transfer, int) {
	if from == "" && to == "" {
		if len(c.Transfers) == 0 {
			fmt.Fprintf(stderr, "tangent %s: %s has no [[transfer]]: give --from PORT --to PORT --kind KIND\n", name, c.File)
			return nil, exitUsage
		}
		return c.Transfers, exitOK
	}
	if from == "" || to == "" {
		fmt.Fprintf(stderr, "tangent %s: --from and --to go together\n", name)
		return nil, exitUsage
	}
	kind := cases.TransferKind(kindFlag)
	switch kind {
	case cases.VoltageGain, cases.CurrentGain, cases.Transconductance, cases.Transimpedance, cases.InputImpedance, cases.OutputImpedance:
	default:
		fmt.Fprintf(stderr, "tangent %s: --kind %q: want voltage, current, transconductance, transimpedance, input_impedance or output_impedance\n", name, kindFlag)
		return nil, exitUsage
	}
	for _, p := range []string{from, to} {
		if !hasPortNamed(c, p) {
			fmt.Fprintf(stderr, "tangent %s: no port %q in %s (ports: %s)\n", name, p, c.File, strings.Join(portNames(c), ", "))
			return nil, exitUsage
		}
	}
	return []*cases.Transfer{{From: from, To: to, Kind: kind}}, exitOK
}

func hasPortNamed(c *cases.Circuit, name string) bool {
	for _, p := range c.Ports {
		if p.Name == name {
			return true
		}
	}
	return false
}

func portNames(c *cases.Circuit) []string {
	var out []string
	for _, p := range c.Ports {
		out = append(out, p.Name)
	}
	return out
}

// parseSweep reads START:STOP:POINTS_PER_DECADE.
func parseSweep(s string) (*cases.Sweep, error) {
	f := strings.Split(s, ":")
	if len(f) != 3 {
		return nil, fmt.Errorf("%q: want START:STOP:POINTS_PER_DECADE, e.g. 10Hz:1GHz:20", s)
	}
	start, err1 := cases.ParseValue(f[0], "Hz")
	stop, err2 := cases.ParseValue(f[1], "Hz")
	ppd, err3 := strconv.Atoi(strings.TrimSpace(f[2]))
	switch {
	case err1 != nil || err2 != nil || err3 != nil:
		return nil, fmt.Errorf("%q: want START:STOP:POINTS_PER_DECADE, e.g. 10Hz:1GHz:20", s)
	case !(start > 0 && stop > start):
		return nil, fmt.Errorf("%q: want 0 < START < STOP", s)
	case ppd < 1 || ppd > 1000:
		return nil, fmt.Errorf("%q: points per decade must be 1 to 1000", s)
	case math.Log10(stop/start)*float64(ppd) > 100000:
		return nil, fmt.Errorf("%q: more than 100000 points", s)
	}
	return &cases.Sweep{Start: start, Stop: stop, PointsPerDecade: ppd}, nil
}

// analyseTransfers runs each transfer on the linear equivalent.
func analyseTransfers(eq *smallsignal.Equivalent, ts []*cases.Transfer, override *cases.Sweep, stderr io.Writer) ([]*ac.Result, int) {
	var out []*ac.Result
	for _, t := range ts {
		sw := t.Sweep
		if override != nil {
			sw = override
		}
		var f []float64
		if sw != nil {
			f = sw.Frequencies()
		}
		r, err := ac.Analyse(eq.Circuit, t, f)
		if err != nil {
			fmt.Fprintf(stderr, "tangent transfer: %v\n", err)
			return nil, exitAnalysis
		}
		out = append(out, r)
	}
	return out, exitOK
}

type twoPortAt struct {
	f  float64
	tp ac.TwoPort
}

func complexJSON(z complex128) object {
	var o object
	o.set("re", real(z))
	o.set("im", imag(z))
	return o
}

func rootsJSON(rs []complex128) []object {
	out := make([]object, 0, len(rs))
	for _, r := range rs {
		out = append(out, complexJSON(r))
	}
	return out
}

func optFloat(p *float64) any {
	if p == nil || math.IsInf(*p, 0) || math.IsNaN(*p) {
		return nil
	}
	return *p
}

// transferJSON is one transfer of "tangent transfer --json" (DESIGN.md),
// with these added keys: unit, k0 (the DC-gain form's constant), gain (the
// pole-zero form's K), origin_power (k in s^k), pairs [{w0, q}],
// reference (the −3 dB reference level) and unity_gain_hz.
func transferJSON(r *ac.Result) object {
	rt := r.Rational
	var o object
	o.set("from", r.Transfer.From)
	o.set("to", r.Transfer.To)
	o.set("kind", string(r.Transfer.Kind))
	o.set("unit", ac.Unit(r.Transfer.Kind))
	o.set("order", rt.Order())
	if g, ok := rt.DCGain(); ok {
		o.set("dc_gain", g)
	} else {
		o.set("dc_gain", nil)
	}
	o.set("poles", rootsJSON(rt.Poles))
	o.set("zeros", rootsJSON(rt.Zeros))
	o.set("cancelled", rootsJSON(rt.Cancelled))
	o.set("numerator", nonNilFloats(rt.Numerator()))
	o.set("denominator", nonNilFloats(rt.Denominator()))
	o.set("k0", rt.K0)
	o.set("gain", rt.Gain())
	o.set("origin_power", rt.OriginPower())
	var pairs []object
	for _, p := range rt.Pairs() {
		var po object
		po.set("pole", complexJSON(p.Pole))
		po.set("w0", p.W0)
		po.set("q", finiteJSON(p.Q))
		pairs = append(pairs, po)
	}
	o.set("pairs", nonNilObjects(pairs))
	bw := r.Bandwidth
	o.set("reference", bw.Reference)
	o.set("bandwidth_hz", optFloat(bw.WidthHz))
	o.set("f_high_hz", optFloat(bw.HighHz))
	o.set("f_low_hz", optFloat(bw.LowHz))
	o.set("unity_gain_hz", optFloat(r.UnityGainHz))
	if r.FHz != nil {
		resp := make([]object, 0, len(r.FHz))
		for i, f := range r.FHz {
			h := r.Response[i]
			var p object
			p.set("f_hz", f)
			p.set("re", real(h))
			p.set("im", imag(h))
			p.set("mag_db", finiteJSON(ac.MagnitudeDB(h)))
			p.set("phase_deg", ac.PhaseDeg(h))
			resp = append(resp, p)
		}
		o.set("response", resp)
	}
	return o
}

func nonNilFloats(v []float64) []float64 {
	if v == nil {
		return []float64{}
	}
	return v
}

func nonNilObjects(v []object) []object {
	if v == nil {
		return []object{}
	}
	return v
}

func twoPortJSON(tps []twoPortAt) []object {
	var out []object
	for _, t := range tps {
		var o object
		o.set("f_hz", t.f)
		for _, k := range []ac.ParamKind{ac.ZParams, ac.YParams, ac.HParams, ac.GParams, ac.ABCDParams} {
			m, err := t.tp.To(k)
			if err != nil {
				o.set(k.String(), nil)
				continue
			}
			o.set(k.String(), [][]object{
				{complexJSON(m.M[0][0]), complexJSON(m.M[0][1])},
				{complexJSON(m.M[1][0]), complexJSON(m.M[1][1])},
			})
		}
		out = append(out, o)
	}
	return out
}

// writeResponseCSV writes every swept response: one row per transfer and
// frequency.
func writeResponseCSV(w io.Writer, results []*ac.Result) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"from", "to", "kind", "f_hz", "re", "im", "mag_db", "phase_deg"})
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	for _, r := range results {
		for i, f := range r.FHz {
			h := r.Response[i]
			cw.Write([]string{r.Transfer.From, r.Transfer.To, string(r.Transfer.Kind), g(f), g(real(h)), g(imag(h)),
				g(ac.MagnitudeDB(h)), g(ac.PhaseDeg(h))})
		}
	}
	cw.Flush()
	return cw.Error()
}

// writeAtomically writes a file through a temporary file in the same
// folder and a rename: a failed run leaves no half-written file.
func writeAtomically(path string, write func(io.Writer) error) error {
	tmp, err := os.CreateTemp(filepath.Dir(path), ".tangent-*")
	if err != nil {
		return err
	}
	defer os.Remove(tmp.Name())
	if err := write(tmp); err != nil {
		tmp.Close()
		return err
	}
	if err := tmp.Close(); err != nil {
		return err
	}
	// CreateTemp makes the file private (0600); an output file is an
	// ordinary document.
	if err := os.Chmod(tmp.Name(), 0o644); err != nil {
		return err
	}
	return os.Rename(tmp.Name(), path)
}

func kindWords(k cases.TransferKind) string {
	switch k {
	case cases.VoltageGain:
		return "voltage gain"
	case cases.CurrentGain:
		return "current gain"
	case cases.InputImpedance:
		return "input impedance"
	case cases.OutputImpedance:
		return "output impedance"
	}
	return string(k)
}

func printTransfers(w io.Writer, file string, eq *smallsignal.Equivalent, results []*ac.Result, response bool) {
	title := eq.Circuit.Title
	if title == "" {
		title = file
	} else {
		title += " (" + file + ")"
	}
	fmt.Fprintf(w, "Small-signal transfers: %s\n", title)
	fmt.Fprintf(w, "at the bias point, %.2f °C; roots in rad/s, frequencies in Hz\n", eq.Bias.Temperature-273.15)
	for _, r := range results {
		printTransfer(w, r, response)
	}
}

func printTransfer(w io.Writer, r *ac.Result, response bool) {
	t, rt := r.Transfer, r.Rational
	unit := ac.Unit(t.Kind)
	fmt.Fprintf(w, "\n%s → %s, %s (%s)\n", t.From, t.To, kindWords(t.Kind), unit)
	if g, ok := rt.DCGain(); ok {
		fmt.Fprintf(w, "  DC gain      %s\n", gainText(g, unit))
	} else {
		fmt.Fprintf(w, "  DC gain      none: a pole at the origin\n")
	}
	fmt.Fprintf(w, "  order        %d\n", rt.Order())
	bw := r.Bandwidth
	switch {
	case bw.Reference == 0:
		fmt.Fprintf(w, "  bandwidth    no finite reference level\n")
	default:
		ref := "DC"
		if bw.RefHz > 0 {
			ref = formatEngDigits(bw.RefHz, "Hz", 3)
		}
		fmt.Fprintf(w, "  reference    %s at %s\n", gainText(bw.Reference, unit), ref)
		fmt.Fprintf(w, "  −3 dB        low %s  high %s  bandwidth %s\n", hzText(bw.LowHz), hzText(bw.HighHz), hzText(bw.WidthHz))
	}
	if r.UnityGainHz != nil && bw.Reference > 1 && (t.Kind == cases.VoltageGain || t.Kind == cases.CurrentGain) {
		fmt.Fprintf(w, "  |H| = 1 at   %s\n", formatEngDigits(*r.UnityGainHz, "Hz", 4))
	}
	printRoots(w, "poles", rt.Poles)
	printRoots(w, "zeros", rt.Zeros)
	if len(rt.Cancelled) > 0 {
		printRoots(w, "cancelled pole-zero pairs", rt.Cancelled)
	}
	fmt.Fprintf(w, "  DC-gain form     H(s) = %s\n", dcGainForm(rt))
	fmt.Fprintf(w, "  pole-zero form   H(s) = %s\n", poleZeroForm(rt))
	fmt.Fprintf(w, "  polynomials      N(s) = %s\n", polyText(rt.Numerator()))
	fmt.Fprintf(w, "                   D(s) = %s\n", polyText(rt.Denominator()))
	if response && len(r.FHz) > 0 {
		rows := [][]string{{"f", "|H|", "|H| dB", "phase"}}
		for i, f := range r.FHz {
			h := r.Response[i]
			rows = append(rows, []string{formatEngDigits(f, "Hz", 4), formatEngDigits(cmplx.Abs(h), unitBase(unit), 4),
				fmt.Sprintf("%.2f dB", ac.MagnitudeDB(h)), fmt.Sprintf("%.2f°", ac.PhaseDeg(h))})
		}
		fmt.Fprintln(w, "  response")
		writeTable(w, "    ", []bool{true, true, true, true}, rows)
	}
}

func unitBase(u string) string {
	if u == "V/V" || u == "A/A" {
		return ""
	}
	return u
}

func gainText(g float64, unit string) string {
	if unit == "V/V" || unit == "A/A" {
		if g == 0 {
			return "0"
		}
		return fmt.Sprintf("%s (%s dB)", num5(g), trueMinus(strconv.FormatFloat(20*math.Log10(math.Abs(g)), 'f', 2, 64)))
	}
	return formatEngDigits(g, unit, 5)
}

func hzText(p *float64) string {
	if p == nil {
		return "none"
	}
	return formatEngDigits(*p, "Hz", 4)
}

func printRoots(w io.Writer, what string, rs []complex128) {
	if len(rs) == 0 {
		fmt.Fprintf(w, "  %s: none\n", what)
		return
	}
	fmt.Fprintf(w, "  %s\n", what)
	rows := [][]string{{"s (rad/s)", "f = |s|/2π", "ω0", "Q"}}
	for _, s := range rs {
		if imag(s) < 0 {
			continue // shown with its conjugate
		}
		q, w0 := "", ""
		if imag(s) > 0 {
			w0 = strconv.FormatFloat(cmplx.Abs(s), 'g', 5, 64)
			q = strconv.FormatFloat(cmplx.Abs(s)/(-2*real(s)), 'g', 4, 64)
		}
		rows = append(rows, []string{rootText(s), formatEngDigits(cmplx.Abs(s)/(2*math.Pi), "Hz", 4), w0, q})
	}
	writeTable(w, "    ", []bool{false, true, true, true}, rows)
}

// rootText writes a root: −6.2e+05, or −1.2e+03 ± j4.5e+03 for a pair.
func rootText(s complex128) string {
	if imag(s) == 0 {
		return num5(real(s))
	}
	return fmt.Sprintf("%s ± j%s", num5(real(s)), num5(math.Abs(imag(s))))
}

// num5 writes a number with five significant digits and a true minus.
func num5(v float64) string {
	return trueMinus(strconv.FormatFloat(v, 'g', 5, 64))
}

// trueMinus replaces a leading hyphen by a minus sign (an exponent's sign
// stays ASCII so the number can be copied into code).
func trueMinus(s string) string {
	if strings.HasPrefix(s, "-") {
		return "−" + s[1:]
	}
	return s
}

// dcGainForm writes K0·s^k·Π(1 − s/z)/Π(1 − s/p), real roots as
// (1 ± s/|z|) and conjugate pairs as (1 + 2ζ/ω0·s + s²/ω0²).
func dcGainForm(r *ac.Rational) string {
	factors := func(rs []complex128) string {
		var b strings.Builder
		for _, z := range rs {
			switch {
			case z == 0 || imag(z) < 0:
			case imag(z) == 0 && real(z) < 0:
				fmt.Fprintf(&b, "(1 + s/%s)", num5(-real(z)))
			case imag(z) == 0:
				fmt.Fprintf(&b, "(1 − s/%s)", num5(real(z)))
			default:
				w2 := real(z)*real(z) + imag(z)*imag(z)
				fmt.Fprintf(&b, "(1 %s %s·s + s²/%s)", signWord(-real(z)), num5(math.Abs(2*real(z)/w2)), num5(w2))
			}
		}
		return b.String()
	}
	s := num5(r.K0) + powerOfS(r.OriginPower())
	if n := factors(r.Zeros); n != "" {
		s += "·" + n
	}
	if d := factors(r.Poles); d != "" {
		s += " / " + d
	}
	return s
}

// signWord is "+" for v ≥ 0, "−" otherwise.
func signWord(v float64) string {
	if v < 0 {
		return "−"
	}
	return "+"
}

// powerOfS writes ·s^k (nothing for k = 0).
func powerOfS(k int) string {
	switch k {
	case 0:
		return ""
	case 1:
		return "·s"
	}
	return fmt.Sprintf("·s^%d", k)
}

// poleZeroForm writes K·Π(s − z)/Π(s − p) with roots at the origin as s^k.
func poleZeroForm(r *ac.Rational) string {
	factors := func(rs []complex128) string {
		var b strings.Builder
		origin := 0
		for _, z := range rs {
			switch {
			case z == 0:
				origin++
			case imag(z) < 0:
			case imag(z) == 0:
				fmt.Fprintf(&b, "(s %s %s)", signWord(-real(z)), num5(math.Abs(real(z))))
			default:
				fmt.Fprintf(&b, "(s² %s %s·s + %s)", signWord(-real(z)), num5(math.Abs(2*real(z))), num5(real(z)*real(z)+imag(z)*imag(z)))
			}
		}
		return strings.TrimPrefix(powerOfS(origin), "·") + b.String()
	}
	s := num5(r.Gain())
	if n := factors(r.Zeros); n != "" {
		s += "·" + n
	}
	if d := factors(r.Poles); d != "" {
		s += " / " + d
	}
	return s
}

// polyText writes ascending coefficients as c0 + c1·s + c2·s^2 ….
func polyText(c []float64) string {
	var b strings.Builder
	for i, v := range c {
		if v == 0 {
			continue
		}
		switch {
		case b.Len() == 0:
			b.WriteString(num5(v))
		case v < 0:
			b.WriteString(" − " + num5(-v))
		default:
			b.WriteString(" + " + num5(v))
		}
		b.WriteString(powerOfS(i))
	}
	if b.Len() == 0 {
		return "0"
	}
	return b.String()
}

func printTwoPorts(w io.Writer, names string, tps []twoPortAt) {
	for _, t := range tps {
		fmt.Fprintf(w, "\nTwo-port %s at %s\n", names, formatEngDigits(t.f, "Hz", 4))
		for _, k := range []ac.ParamKind{ac.ZParams, ac.YParams, ac.HParams, ac.GParams, ac.ABCDParams} {
			m, err := t.tp.To(k)
			if err != nil {
				fmt.Fprintf(w, "  %-4s does not exist (%v)\n", k, err)
				continue
			}
			c := func(z complex128) string {
				return fmt.Sprintf("%s%+.4gj", strconv.FormatFloat(real(z), 'g', 4, 64), imag(z))
			}
			fmt.Fprintf(w, "  %-4s [%s  %s; %s  %s]\n", k, c(m.M[0][0]), c(m.M[0][1]), c(m.M[1][0]), c(m.M[1][1]))
		}
	}
}
