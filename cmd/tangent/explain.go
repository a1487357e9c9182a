package main

import (
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	"tangent/ac"
	"tangent/cases"
	"tangent/explain"
	"tangent/smallsignal"
)

func init() {
	register("explain", "hand-analysis aids: what sets each pole and zero, time-constant estimates, port equivalents", runExplain)
}

// explainFlags are the flags of "tangent explain".
type explainFlags struct {
	asJSON         bool
	from, to, kind string
	ports          []string
	top            int
}

func runExplain(args []string, stdout, stderr io.Writer) int {
	fs := newFlags("explain", "tangent explain [FILE] [--from PORT --to PORT --kind KIND] [--port PORT] [--json]",
		"Bias the circuit, linearize it, and explain each [[transfer]] of the file (or the one\n"+
			"given by --from, --to and --kind) the way a hand analysis would: the elements that set\n"+
			"each pole and zero (normalized sensitivities from the eigenvectors of the pencil), the\n"+
			"open- and short-circuit time constants and their estimates of the band edges against the\n"+
			"exact ones, the Thevenin and Norton equivalents of the output port (and of each --port),\n"+
			"and a mid-band summary in words.\n"+
			"Exit status 0 when done, 1 when the analysis fails, 2 for bad input.", stderr)
	var fl explainFlags
	fs.BoolVar(&fl.asJSON, "json", false, "print the result as JSON on stdout (SI units, rad/s for roots)")
	fs.StringVar(&fl.from, "from", "", "input `PORT` (with --to and --kind: explain this transfer only)")
	fs.StringVar(&fl.to, "to", "", "output `PORT`")
	fs.StringVar(&fl.kind, "kind", "voltage", "transfer `KIND`")
	fs.StringSliceVar(&fl.ports, "port", nil, "also give the Thevenin and Norton equivalents at `PORT` (repeatable)")
	fs.IntVar(&fl.top, "top", 3, "list the `N` most sensitive elements of each root in the text output")
	file, code, ok := parseFileArgs(fs, args, stderr)
	if !ok {
		return code
	}
	if fl.top < 1 {
		fmt.Fprintf(stderr, "tangent explain: --top %d: want at least 1\n", fl.top)
		return exitUsage
	}
	c, code := loadCase(file, stderr)
	if c == nil {
		return code
	}
	transfers, code := selectExplained(c, fl, stderr)
	if transfers == nil {
		return code
	}
	eq, code := linearizeCase("explain", c, stderr)
	if eq == nil {
		return code
	}
	var devices []string
	for _, d := range eq.Devices {
		devices = append(devices, d.Name)
	}
	var results []explained
	for _, t := range transfers {
		x, err := explain.Explain(eq.Circuit, t, explain.Options{Devices: devices})
		if err != nil {
			fmt.Fprintf(stderr, "tangent explain: %v\n", err)
			return exitAnalysis
		}
		results = append(results, explained{x, explainPortEquivalents(eq.Circuit, t, fl.ports)})
	}
	if fl.asJSON {
		if err := writeJSON(stdout, explainJSON(caseName(file), eq, results)); err != nil {
			fmt.Fprintf(stderr, "tangent explain: %v\n", err)
			return exitAnalysis
		}
		return exitOK
	}
	printExplained(stdout, caseName(file), eq, results, fl.top)
	return exitOK
}

// explained is one transfer's explanation with its port equivalents.
type explained struct {
	x     *explain.Explanation
	ports []portResult
}

// portResult is a port equivalent, or why there is none.
type portResult struct {
	port, drive string
	pe          *explain.PortEquivalent
	err         error
}

// selectExplained returns the file's transfers, or the one the flags give;
// every --port must name a port of the file.
func selectExplained(c *cases.Circuit, fl explainFlags, stderr io.Writer) ([]*cases.Transfer, int) {
	for _, p := range fl.ports {
		if !hasPortNamed(c, p) {
			fmt.Fprintf(stderr, "tangent explain: --port %q: no such port in %s (ports: %s)\n", p, c.File, strings.Join(portNames(c), ", "))
			return nil, exitUsage
		}
	}
	return selectTransfers("explain", c, fl.from, fl.to, fl.kind, stderr)
}

// explainPortEquivalents returns the equivalents of a transfer's output port and
// of the extra ports, driven at its from port as the transfer drives it.
// Impedance transfers have no drive and get none.
func explainPortEquivalents(c *cases.Circuit, t *cases.Transfer, extra []string) []portResult {
	var voltageDrive bool
	switch t.Kind {
	case cases.VoltageGain, cases.Transconductance:
		voltageDrive = true
	case cases.CurrentGain, cases.Transimpedance:
	default:
		return nil
	}
	var out []portResult
	seen := map[string]bool{t.From: true}
	for _, p := range append([]string{t.To}, extra...) {
		if seen[p] {
			continue
		}
		seen[p] = true
		pe, err := explain.PortAt(c, t.From, p, voltageDrive)
		out = append(out, portResult{port: p, drive: t.From, pe: pe, err: err})
	}
	return out
}

// explainJSON is the JSON of "tangent explain --json":
//
//	{"file", "title" (when the case has one), "temperature_k",
//	 "explanations": [X, ...]}
//
// with one X per transfer:
//
//	"from", "to", "kind", "unit"
//	"summary": {"reference_at": "dc" | "mid_band" | "high_frequency" | "none",
//	    "reference_hz" (null unless mid_band or dc), "value" {re, im} (H there),
//	    "f_high_hz", "f_low_hz" (exact −3 dB, null where none),
//	    "high_pole", "low_pole" (index into poles of the pole nearest the
//	    band edge, null where none), "text": [sentences]}
//	"elements": [{"name", "label", "kind", "value" (SI), "unit", "device",
//	    "param" (null for a part of the file), "storage",
//	    "low_frequency" (a coupling or bypass element, see
//	    explain.Explanation.LowFrequency)}]
//	"poles": [{"re", "im" (rad/s), "f_hz" (|s|/2π), "visible" (false for a
//	    pole a zero cancels), "note" (why there are no sensitivities; null
//	    when there are), "sensitivities": [{"element" (name), "re", "im"
//	    (S = ∂ln p/∂ln x; S_R = −S_G), "share" (|S|/Σ|S|), "storage_share"
//	    (−Re S for a capacitor or inductor, else 0; they sum to 1)}]}]
//	    by decreasing |S|; every finite pole of det(G + s·C)
//	"zeros": the same for the transfer's zeros (visible always true)
//	"open_circuit": null | {"sum_s" (Σ τ), "b1_s" (−Σ 1/p: equal),
//	    "estimate_hz" (1/(2π·Σ τ)), "time_constants": [T]}
//	"short_circuit": null | {"sum_per_s" (Σ 1/τ), "pole_sum_per_s" (−Σ p:
//	    equal), "estimate_hz" (Σ(1/τ)/2π), "time_constants": [T]}
//	"f_high_estimate", "f_low_estimate": null | {"method": "open_circuit"
//	    | "short_circuit", "estimate_hz", "exact_hz", "error" (estimate/exact
//	    − 1), "pole_hz" and "pole_error" (against the pole that sets the
//	    edge, null where none), "caveat" (why it may be far off, or null),
//	    "sum" (s or 1/s), "time_constants": [T]}: the textbook
//	    estimates over the high- (low-) frequency elements with the others
//	    in their mid-band state
//	"port_equivalents": [{"port", "drive", "drive_kind": "voltage" |
//	    "current", "thevenin_voltage" R (Voc per unit drive),
//	    "thevenin_impedance" R (Ω), "norton_current" R (Isc per unit
//	    drive; null with "no_norton" saying why where the port may not be
//	    shorted)}, or {"port", "drive", "error"}]
//	"notes": [strings]
//
// T is {"element" (name), "r_ohm" (null for an open), "tau_s", "share"
// (of the sum), "miller" (R/(Ra + Rb) for a floating capacitor of the
// open-circuit method, else null)}, by decreasing τ (open) or 1/τ
// (short). R is a rational function: {"k0", "dc_gain" (null with a pole at
// the origin), "poles", "zeros", "cancelled" ([{re, im}], rad/s),
// "numerator", "denominator" (ascending powers of s)}.
func explainJSON(file string, eq *smallsignal.Equivalent, results []explained) object {
	var o object
	o.set("file", file)
	if eq.Circuit.Title != "" {
		o.set("title", eq.Circuit.Title)
	}
	o.set("temperature_k", eq.Bias.Temperature)
	xs := make([]object, 0, len(results))
	for _, r := range results {
		xs = append(xs, explanationJSON(r))
	}
	o.set("explanations", xs)
	return o
}

func explanationJSON(r explained) object {
	x := r.x
	t := x.Transfer
	var o object
	o.set("from", t.From)
	o.set("to", t.To)
	o.set("kind", string(t.Kind))
	o.set("unit", ac.Unit(t.Kind))

	s := x.Summary
	var so object
	switch {
	case math.IsNaN(s.RefHz):
		so.set("reference_at", "none")
		so.set("reference_hz", nil)
	case s.RefHz == 0:
		so.set("reference_at", "dc")
		so.set("reference_hz", 0.0)
	case math.IsInf(s.RefHz, 1):
		so.set("reference_at", "high_frequency")
		so.set("reference_hz", nil)
	default:
		so.set("reference_at", "mid_band")
		so.set("reference_hz", s.RefHz)
	}
	so.set("value", complexJSON(s.Value))
	so.set("f_high_hz", optFloat(x.Bandwidth.HighHz))
	so.set("f_low_hz", optFloat(x.Bandwidth.LowHz))
	so.set("high_pole", explainIndex(s.HighPole))
	so.set("low_pole", explainIndex(s.LowPole))
	so.set("text", explainStrings(s.Lines))
	o.set("summary", so)

	elems := make([]object, 0, len(x.Elements))
	for i, e := range x.Elements {
		var eo object
		eo.set("name", e.Part)
		eo.set("label", e.Label())
		eo.set("kind", string(e.Kind))
		eo.set("value", e.Value)
		eo.set("unit", e.Unit())
		eo.set("device", explainOptString(e.Device))
		eo.set("param", explainOptString(e.Param))
		eo.set("storage", e.Storage())
		eo.set("low_frequency", x.LowFrequency[i])
		elems = append(elems, eo)
	}
	o.set("elements", elems)
	o.set("poles", explainRootsJSON(x, x.Poles))
	o.set("zeros", explainRootsJSON(x, x.Zeros))

	if x.Open != nil {
		var m object
		m.set("sum_s", finiteJSON(x.Open.Sum))
		m.set("b1_s", finiteJSON(x.B1))
		m.set("estimate_hz", finiteJSON(x.Open.EstimateHz))
		m.set("time_constants", explainTimeConstantsJSON(x, x.Open))
		o.set("open_circuit", m)
	} else {
		o.set("open_circuit", nil)
	}
	if x.Short != nil {
		var m object
		m.set("sum_per_s", finiteJSON(x.Short.Sum))
		m.set("pole_sum_per_s", finiteJSON(x.PoleSum))
		m.set("estimate_hz", finiteJSON(x.Short.EstimateHz))
		m.set("time_constants", explainTimeConstantsJSON(x, x.Short))
		o.set("short_circuit", m)
	} else {
		o.set("short_circuit", nil)
	}
	estimate := func(tc *explain.TimeConstants, exact *float64, pole int) any {
		if tc == nil || exact == nil {
			return nil
		}
		var m object
		if tc.Short {
			m.set("method", "short_circuit")
		} else {
			m.set("method", "open_circuit")
		}
		m.set("estimate_hz", finiteJSON(tc.EstimateHz))
		m.set("exact_hz", *exact)
		m.set("error", finiteJSON(tc.EstimateHz / *exact - 1))
		if pole >= 0 {
			hz := cmplx.Abs(x.Poles[pole].S) / (2 * math.Pi)
			m.set("pole_hz", hz)
			m.set("pole_error", finiteJSON(tc.EstimateHz/hz-1))
		} else {
			m.set("pole_hz", nil)
			m.set("pole_error", nil)
		}
		m.set("caveat", explainOptString(tc.Caveat))
		m.set("sum", finiteJSON(tc.Sum))
		m.set("time_constants", explainTimeConstantsJSON(x, tc))
		return m
	}
	o.set("f_high_estimate", estimate(x.High, x.Bandwidth.HighHz, s.HighPole))
	o.set("f_low_estimate", estimate(x.Low, x.Bandwidth.LowHz, s.LowPole))

	pes := make([]object, 0, len(r.ports))
	for _, p := range r.ports {
		var po object
		po.set("port", p.port)
		po.set("drive", p.drive)
		if p.err != nil {
			po.set("error", p.err.Error())
			pes = append(pes, po)
			continue
		}
		if p.pe.VoltageDrive {
			po.set("drive_kind", "voltage")
		} else {
			po.set("drive_kind", "current")
		}
		po.set("thevenin_voltage", explainRationalJSON(p.pe.Voc))
		po.set("thevenin_impedance", explainRationalJSON(p.pe.Zth))
		if p.pe.Isc != nil {
			po.set("norton_current", explainRationalJSON(p.pe.Isc))
		} else {
			po.set("norton_current", nil)
			po.set("no_norton", p.pe.NoNorton)
		}
		pes = append(pes, po)
	}
	o.set("port_equivalents", pes)
	o.set("notes", explainStrings(x.Notes))
	return o
}

func explainRootsJSON(x *explain.Explanation, roots []explain.Root) []object {
	out := make([]object, 0, len(roots))
	for _, r := range roots {
		var ro object
		ro.set("re", real(r.S))
		ro.set("im", imag(r.S))
		ro.set("f_hz", cmplx.Abs(r.S)/(2*math.Pi))
		ro.set("visible", r.Visible)
		ro.set("note", explainOptString(r.Note))
		ss := make([]object, 0, len(r.Sens))
		for _, s := range r.Sens {
			var so object
			so.set("element", x.Elements[s.Element].Part)
			so.set("re", real(s.S))
			so.set("im", imag(s.S))
			so.set("share", s.Share)
			so.set("storage_share", s.Storage)
			ss = append(ss, so)
		}
		ro.set("sensitivities", ss)
		out = append(out, ro)
	}
	return out
}

func explainTimeConstantsJSON(x *explain.Explanation, tc *explain.TimeConstants) []object {
	out := make([]object, 0, len(tc.Items))
	for _, it := range tc.Items {
		var o object
		o.set("element", x.Elements[it.Element].Part)
		o.set("r_ohm", finiteJSON(it.R))
		o.set("tau_s", finiteJSON(it.Tau))
		o.set("share", finiteJSON(tc.Share(it)))
		if it.Miller > 0 {
			o.set("miller", it.Miller)
		} else {
			o.set("miller", nil)
		}
		out = append(out, o)
	}
	return out
}

// explainRationalJSON is a rational function in the keys of "transfer --json".
func explainRationalJSON(r *ac.Rational) object {
	var o object
	o.set("k0", r.K0)
	if g, ok := r.DCGain(); ok {
		o.set("dc_gain", g)
	} else {
		o.set("dc_gain", nil)
	}
	o.set("poles", rootsJSON(r.Poles))
	o.set("zeros", rootsJSON(r.Zeros))
	o.set("cancelled", rootsJSON(r.Cancelled))
	o.set("numerator", nonNilFloats(r.Numerator()))
	o.set("denominator", nonNilFloats(r.Denominator()))
	return o
}

func explainIndex(i int) any {
	if i < 0 {
		return nil
	}
	return i
}

func explainOptString(s string) any {
	if s == "" {
		return nil
	}
	return s
}

func explainStrings(v []string) []string {
	if v == nil {
		return []string{}
	}
	return v
}

// printExplained writes the text report.
func printExplained(w io.Writer, file string, eq *smallsignal.Equivalent, results []explained, top int) {
	title := eq.Circuit.Title
	if title == "" {
		title = file
	} else {
		title += " (" + file + ")"
	}
	fmt.Fprintf(w, "Hand-analysis aids: %s\n", title)
	fmt.Fprintf(w, "at the bias point, %.2f °C; roots in rad/s, f = |s|/2π; S = (x/s)·∂s/∂x, the normalized sensitivity\n", eq.Bias.Temperature-273.15)
	for _, r := range results {
		printExplanation(w, r, top)
	}
}

func printExplanation(w io.Writer, r explained, top int) {
	x := r.x
	t := x.Transfer
	fmt.Fprintf(w, "\n%s → %s, %s (%s)\n", t.From, t.To, kindWords(t.Kind), ac.Unit(t.Kind))
	fmt.Fprintln(w, "  summary")
	for _, l := range x.Summary.Lines {
		fmt.Fprintf(w, "    %s\n", l)
	}
	printExplainedRoots(w, x, "poles: what sets each (storage shares) and what each is most sensitive to", x.Poles, top)
	printExplainedRoots(w, x, "zeros", x.Zeros, top)
	if x.Open != nil {
		fmt.Fprintf(w, "  open-circuit time constants (each storage element alone, the others open, sources zeroed)\n")
		printExplainedTimeConstants(w, x, x.Open)
		fmt.Fprintf(w, "    Σ τ = %s = b1 (%s from the poles); 1/(2π·Σ τ) = %s\n",
			formatEng(x.Open.Sum, "s"), formatEng(x.B1, "s"), formatEng(x.Open.EstimateHz, "Hz"))
	}
	if x.Short != nil {
		fmt.Fprintf(w, "  short-circuit time constants (each storage element alone, the others shorted)\n")
		printExplainedTimeConstants(w, x, x.Short)
		if math.IsInf(x.Short.Sum, 1) {
			fmt.Fprintf(w, "    Σ 1/τ unbounded: capacitors in loops (see the notes); −Σ p = %s s⁻¹\n", num5(x.PoleSum))
		} else {
			fmt.Fprintf(w, "    Σ 1/τ = %s s⁻¹ = −Σ p (%s s⁻¹ from the poles); Σ(1/τ)/2π = %s\n",
				num5(x.Short.Sum), num5(x.PoleSum), formatEng(x.Short.EstimateHz, "Hz"))
		}
	}
	for _, e := range []struct {
		what  string
		tc    *explain.TimeConstants
		exact *float64
	}{
		{"f_high estimate: open-circuit time constants of the high-frequency elements, coupling and bypass elements shorted", x.High, x.Bandwidth.HighHz},
		{"f_low estimate: short-circuit time constants of the coupling and bypass elements, the others open", x.Low, x.Bandwidth.LowHz},
	} {
		if e.tc == nil || e.exact == nil {
			continue
		}
		if same := map[bool]*explain.TimeConstants{false: x.Open, true: x.Short}[e.tc.Short]; same != nil && len(same.Items) == len(e.tc.Items) {
			// Every storage element is in the set: the method above.
			fmt.Fprintf(w, "  %s estimate: the %s method above over every storage element\n", strings.SplitN(e.what, " ", 2)[0], map[bool]string{false: "open-circuit", true: "short-circuit"}[e.tc.Short])
		} else {
			fmt.Fprintf(w, "  %s\n", e.what)
			printExplainedTimeConstants(w, x, e.tc)
		}
		fmt.Fprintf(w, "    estimate %s, exact %s (%s)\n", formatEng(e.tc.EstimateHz, "Hz"), formatEng(*e.exact, "Hz"), explainPercentText(e.tc.EstimateHz / *e.exact - 1))
		if e.tc.Caveat != "" {
			fmt.Fprintf(w, "    %s\n", e.tc.Caveat)
		}
	}
	for _, p := range r.ports {
		if p.err != nil {
			fmt.Fprintf(w, "  port %s driven at %s: no equivalent (%v)\n", p.port, p.drive, p.err)
			continue
		}
		per, unitV, unitI := "V", "V/V", "A/V"
		if !p.pe.VoltageDrive {
			per, unitV, unitI = "A", "V/A", "A/A"
		}
		fmt.Fprintf(w, "  port %s seen from outside, driven at %s by a test %s (per 1 %s of drive)\n", p.port, p.drive, map[bool]string{true: "voltage", false: "current"}[p.pe.VoltageDrive], per)
		norton := "none: " + p.pe.NoNorton
		if p.pe.Isc != nil {
			norton = "= " + dcGainForm(p.pe.Isc)
		}
		rows := [][]string{
			{"Thevenin voltage", "Voc/u (" + unitV + ")", "= " + dcGainForm(p.pe.Voc)},
			{"Thevenin impedance", "Zth (Ω)", "= " + dcGainForm(p.pe.Zth)},
			{"Norton current", "Isc/u (" + unitI + ")", norton},
		}
		writeTable(w, "    ", nil, rows)
	}
	if len(x.Notes) > 0 {
		fmt.Fprintln(w, "  notes")
		for _, n := range x.Notes {
			fmt.Fprintf(w, "    %s\n", n)
		}
	}
}

func printExplainedRoots(w io.Writer, x *explain.Explanation, what string, roots []explain.Root, top int) {
	if len(roots) == 0 {
		fmt.Fprintf(w, "  %s: none\n", strings.SplitN(what, ":", 2)[0])
		return
	}
	fmt.Fprintf(w, "  %s\n", what)
	rows := [][]string{{"s", "f", "set by", "most sensitive to (S)"}}
	for _, r := range roots {
		if imag(r.S) < 0 {
			continue // shown with its conjugate
		}
		s := rootText(r.S)
		if !r.Visible {
			s += " (cancelled)"
		}
		var set, sens []string
		for _, sv := range r.Sens {
			if sv.Storage >= 0.05 && len(set) < 3 {
				set = append(set, fmt.Sprintf("%s %.0f %%", x.Elements[sv.Element].Label(), 100*sv.Storage))
			}
			if len(sens) < top && sv.S != 0 {
				sens = append(sens, x.Elements[sv.Element].Label()+" "+explainSensText(sv.S))
			}
		}
		setText, sensCol := strings.Join(set, ", "), strings.Join(sens, ", ")
		switch {
		case r.Sens == nil:
			setText, sensCol = r.Note, ""
		case r.S == 0:
			sensCol = "none: nothing moves it"
		}
		rows = append(rows, []string{s, formatEngDigits(cmplx.Abs(r.S)/(2*math.Pi), "Hz", 4), setText, sensCol})
	}
	writeTable(w, "    ", []bool{false, true, false, false}, rows)
}

func printExplainedTimeConstants(w io.Writer, x *explain.Explanation, tc *explain.TimeConstants) {
	rows := [][]string{{"element", "value", "R seen", "τ", "share", ""}}
	for _, it := range tc.Items {
		e := x.Elements[it.Element]
		r := formatEng(it.R, "Ω")
		if math.IsInf(it.R, 1) {
			r = "open"
		}
		miller := ""
		if it.Miller > 1.5 {
			miller = fmt.Sprintf("Miller ×%.3g", it.Miller)
		}
		share := fmt.Sprintf("%.1f %%", 100*tc.Share(it))
		if math.IsNaN(tc.Share(it)) {
			share = "—"
		}
		rows = append(rows, []string{e.Label(), formatEng(e.Value, e.Unit()), r, formatEng(it.Tau, "s"), share, miller})
	}
	writeTable(w, "    ", []bool{false, true, true, true, true, false}, rows)
}

// explainSensText writes a sensitivity: "−0.892", or "−0.50+j0.21" for a complex one.
func explainSensText(s complex128) string {
	re := trueMinus(strconv.FormatFloat(real(s), 'g', 3, 64))
	if imag(s) == 0 {
		return re
	}
	sign := "+"
	if imag(s) < 0 {
		sign = "−"
	}
	return re + sign + "j" + strconv.FormatFloat(math.Abs(imag(s)), 'g', 3, 64)
}

// explainPercentText writes a relative error with its sign: "+14.6 %".
func explainPercentText(f float64) string {
	s := strconv.FormatFloat(100*f, 'f', 1, 64)
	if f >= 0 {
		s = "+" + s
	}
	return trueMinus(s) + " %"
}
