package main

import (
	"bytes"
	"cmp"
	"encoding/json"
	"fmt"
	"io"
	"maps"
	"math"
	"math/cmplx"
	"path/filepath"
	"regexp"
	"runtime"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/plot/vg"

	"tangent/ac"
	"tangent/cases"
	"tangent/cmd/tangent/internal/plot"
	"tangent/cmd/tangent/internal/report"
	"tangent/dc"
	"tangent/devices"
	"tangent/explain"
	"tangent/smallsignal"
)

func init() {
	register("report", "one self-contained HTML file for a design review: bias, small-signal models, transfers with plots, variants", runReport)
}

func runReport(args []string, stdout, stderr io.Writer) int {
	fs := newFlags("report", "tangent report [FILE] [-o REPORT.html] [--variant NAME] [--temperature LIST] [--threshold PERCENT] [--set PATH=VALUE]",
		"Analyse a case as bias, linearize, transfer, explain and compare do, and write one\n"+
			"self-contained HTML file for a design review (inline style sheet and SVG figures, no\n"+
			"scripts, nothing fetched from elsewhere; prints on A4 and Letter): the case, the bias\n"+
			"point with regions and warnings, each device's small-signal model, for each transfer\n"+
			"its rational forms, poles and zeros, Bode plot, pole-zero map and what sets each root,\n"+
			"and the variants side by side. The side-by-side section has the columns of compare:\n"+
			"the base case and every variant of the file, or those named by --variant, and with\n"+
			"--temperature one more column per temperature (the file's variants then only when\n"+
			"named); rows that some column moves by more than --threshold are marked. Every\n"+
			"number is the one the other subcommands print with --json (compare with the same\n"+
			"--variant, --temperature and --threshold). The file is written through a temporary\n"+
			"file and a rename: a failed run leaves an existing report as it was.\n"+
			"Exit status 0 when written, 1 when the analysis fails, 2 for bad input or an\n"+
			"unwritable output.", stderr)
	output := fs.StringP("output", "o", "", "write the report to `FILE`; default NAME_report.html in the current folder, NAME the\n"+
		"case file's base name (the example's name for an embedded example); - writes to stdout")
	var variants, temperatures []string
	var threshold string
	fs.StringArrayVar(&variants, "variant", nil, "side by side, only the variant `NAME` (repeatable)")
	fs.StringArrayVar(&temperatures, "temperature", nil, "side by side, add a column per temperature in `LIST`, comma-separated:\n"+
		"\"-40,27,85\" (a bare number is °C) or \"233.15 K,85 °C\"; the file's variants are\n"+
		"then compared only when named by --variant")
	fs.StringVar(&threshold, "threshold", "5", "mark rows that change by more than `PERCENT` against the base")
	var cf caseFlags
	cf.register(fs)
	file, code, ok := parseFileArgs(fs, args, stderr)
	if !ok {
		return code
	}
	opts := reportOptions{variants: variants}
	var err error
	if opts.threshold, err = parseThreshold(threshold); err != nil {
		fmt.Fprintf(stderr, "tangent report: --threshold %q: %v\n", threshold, err)
		return exitUsage
	}
	if opts.temperatures, err = parseTemperatures(temperatures); err != nil {
		fmt.Fprintf(stderr, "tangent report: --temperature: %v\n", err)
		return exitUsage
	}
	path := *output
	if path == "" {
		path = defaultReportPath(file)
	}
	c, code := cf.load("report", file, stderr)
	if c == nil {
		return code
	}
	opts.sets = cf.sets
	page, code := buildReport(file, c, opts, stderr)
	if page == nil {
		return code
	}
	if path == "-" {
		if err := report.Write(stdout, page); err != nil {
			fmt.Fprintf(stderr, "tangent report: %v\n", err)
			return exitAnalysis
		}
		return exitOK
	}
	if err := writeAtomically(path, func(w io.Writer) error { return report.Write(w, page) }); err != nil {
		fmt.Fprintf(stderr, "tangent report: %v\n", err)
		return exitUsage
	}
	fmt.Fprintf(stdout, "Report written to %s\n", path)
	return exitOK
}

// defaultReportPath is NAME_report.html for a case file NAME.toml, an
// embedded example NAME, or the default example.
func defaultReportPath(file string) string {
	name := cases.DefaultExample
	if file != "" {
		name = strings.TrimSuffix(filepath.Base(file), filepath.Ext(file))
		if n, ok := strings.CutPrefix(file, "example:"); ok && !strings.ContainsAny(n, `/\`) {
			name = n
		}
	}
	return name + "_report.html"
}

// reportInputs are the analyses a report shows, run as the other
// subcommands run them, and their JSON documents as generic trees
// (map[string]any, []any, float64, string, bool, nil): "bias",
// "linearize", "transfer", "explain", "compare", "check" and "case".
type reportInputs struct {
	file    string
	c       *cases.Circuit
	op      *dc.OperatingPoint
	eq      *smallsignal.Equivalent
	results []*ac.Result
	expl    []*explained // nil where the explanation failed
	explErr []error
	cols    []column // nil when there is nothing to set side by side
	colRes  []columnResult
	rows    []*compareRow
	opts    reportOptions
	docs    map[string]any
}

// reportOptions are the flags of a report beyond the case: the --set
// flags, and the side-by-side columns and threshold as "tangent compare"
// takes them (--variant, --temperature, --threshold).
type reportOptions struct {
	sets         []string
	variants     []string      // the variants named; none: all of the file's, unless temperatures are given
	temperatures []temperature // one column each
	threshold    float64       // percent; compare's default is 5
}

// buildReport runs the analyses and lays out the page. On failure it
// prints the reason and returns a nil page and the exit status.
func buildReport(file string, c *cases.Circuit, opts reportOptions, stderr io.Writer) (*report.Report, int) {
	in, code := analyseForReport(file, c, opts, stderr)
	if in == nil {
		return nil, code
	}
	for i, err := range in.explErr {
		if err != nil {
			fmt.Fprintf(stderr, "tangent report: transfer %d: no explanation: %v\n", i+1, err)
		}
	}
	b := &pageBuilder{in: in}
	page := b.build()
	if b.err != nil {
		fmt.Fprintf(stderr, "tangent report: %v\n", b.err)
		return nil, exitAnalysis
	}
	return page, exitOK
}

// analyseForReport runs bias, linearize, transfer, explain and compare on
// c and builds their JSON documents.
func analyseForReport(file string, c *cases.Circuit, opts reportOptions, stderr io.Writer) (*reportInputs, int) {
	in := &reportInputs{file: caseName(file), c: c, opts: opts, docs: map[string]any{}}
	// The columns first: a bad --variant or --temperature is bad input,
	// whatever the analysis would give.
	if len(c.Variants) > 0 || len(opts.variants) > 0 || len(opts.temperatures) > 0 {
		cols, code := compareColumns("report", c, opts.variants, opts.temperatures, stderr)
		if cols == nil {
			return nil, code
		}
		in.cols = cols
	}
	op, code := solveBias("report", c, stderr)
	if op == nil {
		return nil, code
	}
	in.op = op
	eq, err := smallsignal.Linearize(op)
	if err != nil {
		fmt.Fprintf(stderr, "tangent report: %v\n", err)
		return nil, exitAnalysis
	}
	in.eq = eq
	var devNames []string
	for _, d := range eq.Devices {
		devNames = append(devNames, d.Name)
	}
	for _, t := range c.Transfers {
		var f []float64
		if t.Sweep != nil {
			f = t.Sweep.Frequencies()
		}
		r, err := ac.Analyse(eq.Circuit, t, f)
		if err != nil {
			fmt.Fprintf(stderr, "tangent report: transfer %s → %s (%s): %v\n", t.From, t.To, t.Kind, err)
			return nil, exitAnalysis
		}
		in.results = append(in.results, r)
		x, err := explain.Explain(eq.Circuit, t, explain.Options{Devices: devNames})
		if err != nil {
			in.expl, in.explErr = append(in.expl, nil), append(in.explErr, err)
			continue
		}
		in.expl = append(in.expl, &explained{x, explainPortEquivalents(eq.Circuit, t, nil)})
		in.explErr = append(in.explErr, nil)
	}
	if in.cols != nil {
		in.colRes = analyseColumns(in.cols, -1, runtime.GOMAXPROCS(0))
		in.rows = compareRows(c, in.cols, in.colRes)
	}

	// The documents as the subcommands print them (see jsonTree).
	var ts []any
	for _, r := range in.results {
		ts = append(ts, transferJSON(r))
	}
	docs := map[string]any{
		"bias":      biasJSON(in.file, op),
		"linearize": linearizeJSON(in.file, eq),
		"transfer":  object{{"file", in.file}, {"transfers", ts}},
		"check":     summarize(c),
	}
	if in.cols != nil {
		docs["compare"] = compareJSON(in.file, c, opts.sets, opts.threshold, in.cols, in.colRes, in.rows)
	}
	for _, name := range slices.Sorted(maps.Keys(docs)) {
		tree, err := jsonTree(docs[name])
		if err != nil {
			fmt.Fprintf(stderr, "tangent report: %s: %v\n", name, err)
			return nil, exitAnalysis
		}
		in.docs[name] = tree
	}
	in.docs["case"] = caseDocument(c)
	// explain --json, one explanation at a time so that one that cannot be
	// written leaves the others.
	xs := make([]any, len(in.expl))
	for i, x := range in.expl {
		if x == nil {
			continue
		}
		tree, err := jsonTree(explanationJSON(*x))
		if err != nil {
			in.expl[i], in.explErr[i] = nil, err
			continue
		}
		xs[i] = tree
	}
	in.docs["explain"] = map[string]any{"explanations": xs}
	return in, exitOK
}

// jsonTree is v written as JSON and read back as a generic tree, less
// the swept responses (key "response"), which the page draws but does not
// print.
func jsonTree(v any) (any, error) {
	data, err := json.Marshal(withoutResponses(v))
	if err != nil {
		return nil, err
	}
	var tree any
	if err := json.Unmarshal(data, &tree); err != nil {
		return nil, err
	}
	return tree, nil
}

// withoutResponses returns v with every field "response" of its objects
// left out; v itself is not changed.
func withoutResponses(v any) any {
	switch x := v.(type) {
	case object:
		out := make(object, 0, len(x))
		for _, f := range x {
			if f.key != "response" {
				out = append(out, field{f.key, withoutResponses(f.value)})
			}
		}
		return out
	case []object:
		out := make([]object, len(x))
		for i, o := range x {
			out[i] = withoutResponses(o).(object)
		}
		return out
	case []any:
		out := make([]any, len(x))
		for i, e := range x {
			out[i] = withoutResponses(e)
		}
		return out
	}
	return v
}

// caseDocument holds the input values of the case the report shows, in
// SI units (null for infinity): parts.NAME.{value, tolerance, dc, ac,
// area, width, length, multiplier} and models.NAME.KEY.
func caseDocument(c *cases.Circuit) map[string]any {
	num := func(v float64) any {
		if math.IsInf(v, 0) || math.IsNaN(v) {
			return nil
		}
		return v
	}
	parts := map[string]any{}
	for _, p := range c.Parts {
		parts[p.Name] = map[string]any{
			"value": num(p.Value), "tolerance": num(p.Tolerance), "dc": num(p.DC), "ac": num(p.AC),
			"area": num(p.Area), "width": num(p.Width), "length": num(p.Length), "multiplier": num(p.Multiplier),
		}
	}
	models := map[string]any{}
	for name, m := range c.Models {
		ps := map[string]any{}
		for k, v := range m.Params {
			ps[k] = num(v)
		}
		models[name] = ps
	}
	return map[string]any{"parts": parts, "models": models}
}

// pageBuilder lays out the page from the analyses. Every number it shows
// is read from one of the JSON documents by a JSON Pointer (see package
// report); the first jsonPointer that leads nowhere is kept in err.
type pageBuilder struct {
	in  *reportInputs
	err error
}

// jsonPointerEscape escapes a key for a JSON Pointer (RFC 6901, 3).
var jsonPointerEscape = strings.NewReplacer("~", "~0", "/", "~1")

// jsonPointer writes a JSON Pointer (RFC 6901) from keys (string) and indexes
// (int).
func jsonPointer(path []any) string {
	var b strings.Builder
	for _, p := range path {
		b.WriteByte('/')
		switch v := p.(type) {
		case int:
			b.WriteString(strconv.Itoa(v))
		case string:
			b.WriteString(jsonPointerEscape.Replace(v))
		}
	}
	return b.String()
}

// walkJSON follows path (keys and indexes) into a generic JSON tree.
func walkJSON(v any, path []any) (any, error) {
	for _, p := range path {
		switch k := p.(type) {
		case string:
			m, isMap := v.(map[string]any)
			if !isMap {
				return nil, fmt.Errorf("%q is not a key of an object", k)
			}
			var ok bool
			if v, ok = m[k]; !ok {
				return nil, fmt.Errorf("no key %q", k)
			}
		case int:
			a, isArray := v.([]any)
			if !isArray || k < 0 || k >= len(a) {
				return nil, fmt.Errorf("no element %d", k)
			}
			v = a[k]
		default:
			return nil, fmt.Errorf("a path step %v is neither key nor index", p)
		}
	}
	return v, nil
}

// lookup returns the value at path in document src and its data-src.
func (b *pageBuilder) lookup(src string, path ...any) (any, string) {
	ref := src + "#" + jsonPointer(path)
	doc, ok := b.in.docs[src]
	if !ok {
		b.fail(fmt.Errorf("%s: no such document", ref))
		return nil, ref
	}
	v, err := walkJSON(doc, path)
	if err != nil {
		b.fail(fmt.Errorf("%s: %w", ref, err))
	}
	return v, ref
}

func (b *pageBuilder) fail(err error) {
	if b.err == nil {
		b.err = err
	}
}

// has reports whether path leads to a value other than null.
func (b *pageBuilder) has(src string, path ...any) bool {
	v, err := walkJSON(b.in.docs[src], path)
	return err == nil && v != nil
}

// str returns the string at path ("" for null).
func (b *pageBuilder) str(src string, path ...any) string {
	v, ref := b.lookup(src, path...)
	if v == nil {
		return ""
	}
	s, ok := v.(string)
	if !ok {
		b.fail(fmt.Errorf("%s: not a string", ref))
	}
	return s
}

// float returns the number at path; ok is false for null.
func (b *pageBuilder) float(src string, path ...any) (float64, bool) {
	v, ref := b.lookup(src, path...)
	if v == nil {
		return 0, false
	}
	f, ok := v.(float64)
	if !ok {
		b.fail(fmt.Errorf("%s: not a number", ref))
	}
	return f, ok
}

// length returns the length of the array at path (0 for null).
func (b *pageBuilder) length(src string, path ...any) int {
	v, _ := b.lookup(src, path...)
	a, _ := v.([]any)
	return len(a)
}

// deriveValue computes data-fn fn of the value v at a jsonPointer (see package
// report).
func deriveValue(fn string, v any) (float64, error) {
	if fn == "len" {
		a, ok := v.([]any)
		if !ok {
			return 0, fmt.Errorf("len: not an array")
		}
		return float64(len(a)), nil
	}
	if fn == "hz" || fn == "w0" || fn == "q" {
		m, ok := v.(map[string]any)
		re, ok1 := m["re"].(float64)
		im, ok2 := m["im"].(float64)
		if !ok || !ok1 || !ok2 {
			return 0, fmt.Errorf("%s: not a root {re, im}", fn)
		}
		s := complex(re, im)
		switch fn {
		case "hz":
			return cmplx.Abs(s) / (2 * math.Pi), nil
		case "w0":
			return cmplx.Abs(s), nil
		}
		return cmplx.Abs(s) / (-2 * re), nil
	}
	x, ok := v.(float64)
	if !ok {
		return 0, fmt.Errorf("%s: not a number", fn)
	}
	switch fn {
	case "":
		return x, nil
	case "abs":
		return math.Abs(x), nil
	case "db":
		return 20 * math.Log10(math.Abs(x)), nil
	case "pct":
		return 100 * x, nil
	case "celsius":
		return x - 273.15, nil
	}
	return 0, fmt.Errorf("unknown derivation %q", fn)
}

// num is the number at path, shown by format; null is shown as null.
func (b *pageBuilder) num(format func(float64) string, null string, src string, path ...any) report.Num {
	return b.derived("", format, null, src, path...)
}

// derived is the value fn derives from the one at path, shown by format.
func (b *pageBuilder) derived(fn string, format func(float64) string, null string, src string, path ...any) report.Num {
	v, ref := b.lookup(src, path...)
	if v == nil {
		return report.Num{Text: null, Src: ref, Fn: fn}
	}
	x, err := deriveValue(fn, v)
	if err != nil {
		b.fail(fmt.Errorf("%s: %w", ref, err))
	}
	return report.Num{Text: format(x), Value: report.Value(x), Src: ref, Fn: fn}
}

// n is num as a Seg.
func (b *pageBuilder) n(format func(float64) string, src string, path ...any) report.Seg {
	return report.N(b.num(format, "none", src, path...))
}

// quote is the string at path quoted whole.
func (b *pageBuilder) quote(src string, path ...any) report.Seg {
	_, ref := b.lookup(src, path...)
	return report.Quote(b.str(src, path...), ref)
}

// Formats of numbers.

func repEng(unit string) func(float64) string {
	return func(v float64) string { return formatEng(v, unit) }
}

func repEngDigits(unit string, digits int) func(float64) string {
	return func(v float64) string { return formatEngDigits(v, unit, digits) }
}

func repFixed(prec int, unit string) func(float64) string {
	return func(v float64) string {
		return join(trueMinus(strconv.FormatFloat(v, 'f', prec, 64)), unit)
	}
}

func repInt(v float64) string { return strconv.FormatFloat(v, 'f', 0, 64) }

// repSignedPercent writes a relative change already in percent: "+14.6 %".
func repSignedPercent(prec int) func(float64) string {
	return func(v float64) string {
		s := strconv.FormatFloat(v, 'f', prec, 64)
		if v >= 0 {
			s = "+" + s
		}
		return trueMinus(s) + " %"
	}
}

// build lays out the whole page.
func (b *pageBuilder) build() *report.Report {
	in := b.in
	r := &report.Report{
		Title:     in.file,
		File:      in.file,
		Generator: "tangent report",
	}
	if in.c.Title != "" {
		r.Title = in.c.Title
		_, r.TitleSrc = b.lookup("check", "title")
	}
	r.Meta = []report.Line{b.metaLine()}
	if len(in.opts.sets) > 0 {
		line := report.L(report.T("The case as changed on the command line: "))
		for i, set := range in.opts.sets {
			if i > 0 {
				line = append(line, report.T(", "))
			}
			line = append(line, report.Name("--set "+set))
		}
		r.Meta = append(r.Meta, line)
	}
	if b.has("bias", "helper_conductance") {
		if g, _ := b.float("bias", "helper_conductance"); g > 0 {
			r.Meta = append(r.Meta, report.L(report.T("A helper conductance of "), b.n(repEngDigits("S", 3), "bias", "helper_conductance"),
				report.T(" from every node to ground remains in this answer: some node has nothing else tying it down.")))
		}
	}
	r.Alerts = b.alerts()
	r.Caution = b.caution(r.Alerts)
	r.Glance = b.glance()
	r.Circuit = b.circuit()
	r.Bias = b.bias()
	r.Models = b.models()
	for i := range in.results {
		r.Transfers = append(r.Transfers, b.transfer(i))
	}
	if in.cols != nil {
		r.Variants = b.variants()
	}
	return r
}

func (b *pageBuilder) metaLine() report.Line {
	method := map[string]string{
		string(dc.Newton):                  "Newton-Raphson",
		string(dc.ConductanceContinuation): "helper-conductance continuation (plain Newton failed)",
		string(dc.SourceRamp):              "ramping the sources up (plain Newton and conductance continuation failed)",
	}
	m := b.str("bias", "method")
	if w, ok := method[m]; ok {
		m = w
	}
	return report.L(
		b.celsius("bias", "temperature_k"),
		report.T(" ("), report.N(b.num(repFixed(2, "K"), "none", "bias", "temperature_k")), report.T(")"),
		report.T(" · bias point found by "+m+" in "), b.n(repInt, "bias", "iterations"), report.T(" iterations"),
	)
}

// celsius shows a temperature in K at path in °C.
func (b *pageBuilder) celsius(src string, path ...any) report.Seg {
	return report.N(b.derived("celsius", repFixed(2, "°C"), "none", src, path...))
}

// repWarningKinds labels the bias warnings and sets their tone.
var repWarningKinds = map[string][2]string{
	dc.WarnSaturationInPath: {"region", "warn"},
	dc.WarnTriodeInPath:     {"region", "warn"},
	dc.WarnCutoffInPath:     {"region", "warn"},
	dc.WarnOverMaxPower:     {"power", "bad"},
	dc.WarnAboveELV:         {"voltage", "bad"},
}

func (b *pageBuilder) alerts() []report.Alert {
	var out []report.Alert
	for i := range b.length("bias", "warnings") {
		kind := b.str("bias", "warnings", i, "kind")
		k, ok := repWarningKinds[kind]
		if !ok {
			k = [2]string{"check", "warn"}
		}
		out = append(out, report.Alert{Kind: k[0], Tone: k[1], Part: b.str("bias", "warnings", i, "part"),
			Text: b.quote("bias", "warnings", i, "message")})
	}
	return out
}

func (b *pageBuilder) caution(alerts []report.Alert) report.Caution {
	c := report.Caution{Paragraphs: []report.Line{
		report.Plain("These results are models: ideal device equations evaluated at the parameter values of the case, " +
			"at one temperature. They are not measurements. Verify the design by measurement before you rely on it."),
		report.L(report.T("Where a circuit works above extra-low voltage ("), report.Static("IEC 61140: 50 V AC, 120 V ripple-free DC"),
			report.T(") or near a device's power rating, follow your local electrical codes and licensed practice, "+
				"and do not take a model's answer as a safety judgement.")),
	}}
	for _, a := range alerts {
		if a.Tone == "bad" {
			c.Strong = true
		}
	}
	if c.Strong {
		c.Paragraphs = append(c.Paragraphs, report.Plain("This case is over a limit: see the warnings below."))
	}
	return c
}

// warnedParts maps each part a warning names to the tone of its worst
// warning ("warn" or "bad"), and says which devices are warned about
// their region.
func (b *pageBuilder) warnedParts() (tones map[string]string, region map[string]bool) {
	tones, region = map[string]string{}, map[string]bool{}
	for _, w := range b.in.op.Warnings() {
		if w.Part == "" {
			continue
		}
		k := repWarningKinds[w.Kind]
		if k[0] == "region" {
			region[w.Part] = true
		}
		if tones[w.Part] != "bad" {
			tones[w.Part] = cmp.Or(k[1], "warn")
		}
	}
	return tones, region
}

// repRegionBadge is a device's region in words, with a colour and a
// symbol: the region a device amplifies in (or a diode conducts in), any
// other, or one a warning is about.
func repRegionBadge(kind cases.Kind, region string, warned bool) report.Badge {
	bd := report.Badge{Text: regionWords(region), Tone: "off", Symbol: "○"}
	switch {
	case warned:
		bd.Tone, bd.Symbol = "warn", "▲"
	case kind == cases.BJT && region == "forward_active",
		kind == cases.MOSFET && region == "saturation",
		kind == cases.Diode && region == "forward":
		bd.Tone, bd.Symbol = "ok", "●"
	}
	return bd
}

func (b *pageBuilder) glance() []report.Card {
	in := b.in
	_, region := b.warnedParts()
	var cards []report.Card

	bias := report.Card{Title: "Bias point", Href: "#bias", Tone: "ok"}
	bias.Lines = append(bias.Lines, report.L(report.T("solved in "), b.n(repInt, "bias", "iterations"), report.T(" iterations, "),
		b.celsius("bias", "temperature_k")))
	var devs report.Line
	for _, p := range in.op.Parts {
		if p.Device == nil {
			continue
		}
		if len(devs) > 0 {
			devs = append(devs, report.T(" "))
		}
		devs = append(devs, report.Name(p.Name), report.T("\u00a0"), report.B(repRegionBadge(p.Kind, p.Device.Region, region[p.Name])))
	}
	if devs != nil {
		bias.Lines = append(bias.Lines, devs)
	} else {
		bias.Lines = append(bias.Lines, report.Plain("no semiconductor devices"))
	}
	bias.Lines = append(bias.Lines, report.L(report.T("supplies deliver "), b.n(repEng("W"), "bias", "power_balance", "delivered")))
	nw := b.length("bias", "warnings")
	if nw > 0 {
		bias.Tone = "warn"
		for _, w := range in.op.Warnings() {
			if repWarningKinds[w.Kind][1] == "bad" {
				bias.Tone = "bad"
			}
		}
		words := " warnings: see above"
		if nw == 1 {
			words = " warning: see above"
		}
		bias.Lines = append(bias.Lines, report.L(report.N(b.derived("len", repInt, "none", "bias", "warnings")), report.T(words)))
	} else {
		bias.Lines = append(bias.Lines, report.Plain("no warnings"))
	}
	cards = append(cards, bias)

	for i, r := range in.results {
		t := r.Transfer
		if !isGain(t.Kind) && len(cards) > 1 {
			continue
		}
		card := report.Card{Title: kindWords(t.Kind), Href: fmt.Sprintf("#transfer-%d", i+1)}
		card.Lines = append(card.Lines, b.transferName(t))
		if ref, ok := b.float("transfer", "transfers", i, "reference"); ok && ref != 0 {
			line := report.L(report.T("reference "))
			line = append(line, b.gain(t.Kind, "transfer", "transfers", i, "reference")...)
			line = append(line, b.referenceAt(i)...)
			card.Lines = append(card.Lines, line)
		}
		line := report.L(report.T("−3 dB band "))
		lo, hi := b.has("transfer", "transfers", i, "f_low_hz"), b.has("transfer", "transfers", i, "f_high_hz")
		switch {
		case lo && hi:
			line = append(line, b.n(repEng("Hz"), "transfer", "transfers", i, "f_low_hz"), report.T(" to "), b.n(repEng("Hz"), "transfer", "transfers", i, "f_high_hz"))
		case hi:
			line = append(line, report.T("DC to "), b.n(repEng("Hz"), "transfer", "transfers", i, "f_high_hz"))
		default:
			line = report.Plain("no −3 dB band")
		}
		card.Lines = append(card.Lines, line)
		cards = append(cards, card)
	}
	return cards
}

// referenceAt says where transfer i's reference level is taken, as
// explain's summary gives it: " at DC", " at 6.340 kHz".
func (b *pageBuilder) referenceAt(i int) report.Line {
	if b.in.expl[i] == nil {
		return nil
	}
	p := []any{"explanations", i, "summary"}
	switch b.str("explain", append(p, "reference_at")...) {
	case "dc":
		return report.Plain(" at DC")
	case "mid_band":
		return report.L(report.T(" at "), b.n(repEng("Hz"), "explain", append(p, "reference_hz")...))
	case "high_frequency":
		return report.Plain(" at high frequency")
	}
	return nil
}

// transferName is "in → out" with the port names as names.
func (b *pageBuilder) transferName(t *cases.Transfer) report.Line {
	return report.L(report.Name(t.From), report.T(" → "), report.Name(t.To))
}

// gain shows the number at path as a level of a transfer kind: a ratio
// with its dB for the dimensionless kinds (as "tangent transfer" prints
// it), an engineering value otherwise.
func (b *pageBuilder) gain(k cases.TransferKind, src string, path ...any) report.Line {
	unit := ac.Unit(k)
	if unit == "V/V" || unit == "A/A" {
		g, ok := b.float(src, path...)
		line := report.L(b.n(num5, src, path...), report.T(" "+unit))
		if ok && g != 0 {
			line = append(line, report.T(" ("), report.N(b.derived("db", repFixed(2, "dB"), "none", src, path...)), report.T(")"))
		}
		return line
	}
	return report.L(b.n(repEngDigits(unit, 5), src, path...))
}

func (b *pageBuilder) circuit() report.Circuit {
	c := b.in.c
	var ci report.Circuit
	nodes := report.L(report.N(b.derived("len", repInt, "none", "check", "nodes")), report.T(" besides "), report.Name(cases.Ground), report.T(": "))
	for i, n := range c.Nodes {
		if i > 0 {
			nodes = append(nodes, report.T(", "))
		}
		nodes = append(nodes, report.Name(n))
	}
	var kinds report.Line
	seen := map[cases.Kind]bool{}
	for _, p := range c.Parts {
		if seen[p.Kind] {
			continue
		}
		seen[p.Kind] = true
		if kinds != nil {
			kinds = append(kinds, report.T(", "))
		}
		kinds = append(kinds, b.n(repInt, "check", "parts_by_kind", string(p.Kind)), report.T(" "+regionWords(string(p.Kind))))
	}
	var ports report.Line
	for i, p := range c.Ports {
		if i > 0 {
			ports = append(ports, report.T("; "))
		}
		ports = append(ports, report.Name(p.Name), report.T(" = "))
		if p.Source != "" {
			ports = append(ports, report.T("source "), report.Name(p.Source), report.T(" ("))
		} else {
			ports = append(ports, report.T("("))
		}
		ports = append(ports, report.Name(p.Plus), report.T(", "), report.Name(p.Minus), report.T(")"))
	}
	if ports == nil {
		ports = report.Plain("none")
	}
	ci.Facts = []report.Fact{
		{Term: "Temperature", Desc: report.L(b.celsius("check", "temperature_k"))},
		{Term: "Nodes", Desc: nodes},
		{Term: "Parts", Desc: kinds},
		{Term: "Ports", Desc: ports},
	}
	var ts report.Line
	for i, t := range c.Transfers {
		if i > 0 {
			ts = append(ts, report.T("; "))
		}
		ts = append(ts, b.transferName(t)...)
		ts = append(ts, report.T(" "+kindWords(t.Kind)))
		if t.Sweep != nil {
			ts = append(ts, report.T(", swept "), b.n(repEng("Hz"), "check", "transfers", i, "sweep", "start_hz"), report.T(" to "),
				b.n(repEng("Hz"), "check", "transfers", i, "sweep", "stop_hz"))
		}
	}
	if ts != nil {
		ci.Facts = append(ci.Facts, report.Fact{Term: "Transfers", Desc: ts})
	}
	if len(c.Variants) > 0 {
		var vs report.Line
		for i, v := range c.Variants {
			if i > 0 {
				vs = append(vs, report.T("; "))
			}
			vs = append(vs, report.Name(v.Name))
		}
		ci.Facts = append(ci.Facts, report.Fact{Term: "Variants", Desc: vs})
	}

	parts := &report.Table{ID: "parts", Caption: "Parts as written in the case", Cols: []report.Col{
		{Head: "part"}, {Head: "kind"}, {Head: "terminals → nodes"}, {Head: "value", Num: true}, {Head: "details"}}}
	for _, p := range c.Parts {
		var conn report.Line
		for i, t := range cases.Terminals(p.Kind) {
			if i > 0 {
				conn = append(conn, report.T("  "))
			}
			conn = append(conn, report.T(t+" "), report.Name(p.Nodes[i]))
		}
		value, details := b.partValue(p)
		parts.Rows = append(parts.Rows, report.Row{Cells: []report.Line{{report.Name(p.Name)}, report.Plain(regionWords(string(p.Kind))), conn, value, details}})
	}
	ci.Parts = parts

	if len(c.Models) > 0 {
		models := &report.Table{ID: "models", Caption: "Device models: the keys the case sets (others take their defaults)", Cols: []report.Col{
			{Head: "model"}, {Head: "device"}, {Head: "parameters"}}}
		for _, name := range modelNames(c) {
			m := c.Models[name]
			units := map[string]string{}
			for _, p := range devices.Params(m.Device) {
				units[p.Key] = p.Unit
			}
			var ps report.Line
			for _, key := range repParamKeys(m) {
				if ps != nil {
					ps = append(ps, report.T(" · "))
				}
				ps = append(ps, report.Label(key+" "), report.N(b.num(repParamFormat(units[key]), join("∞", units[key]), "case", "models", name, key)))
			}
			models.Rows = append(models.Rows, report.Row{Cells: []report.Line{{report.Name(name)}, report.Plain(m.Device), ps}})
		}
		ci.Models = models
	}
	return ci
}

// repParamFormat formats a model parameter: with an SI prefix, except for
// a unit that a prefix would change the meaning of (1/V, V^0.5: a prefix
// binds to the V, "m1/V" reads as nothing).
func repParamFormat(unit string) func(float64) string {
	if strings.HasPrefix(unit, "1/") || strings.Contains(unit, "^") {
		return func(v float64) string { return join(repG(v), unit) }
	}
	return repEng(unit)
}

// repParamKeys are a model's keys in the order of the device's key
// table, the order the format documents them in.
func repParamKeys(m *cases.Model) []string {
	var keys []string
	for _, p := range devices.Params(m.Device) {
		if _, ok := m.Params[p.Key]; ok {
			keys = append(keys, p.Key)
		}
	}
	if len(keys) != len(m.Params) { // keys the table does not know: after, sorted
		var rest []string
		for k := range m.Params {
			found := false
			for _, q := range keys {
				found = found || q == k
			}
			if !found {
				rest = append(rest, k)
			}
		}
		slices.Sort(rest)
		keys = append(keys, rest...)
	}
	return keys
}

// partValue is a part's principal value and its details (tolerance,
// source values, device geometry), from the case.
func (b *pageBuilder) partValue(p *cases.Part) (value, details report.Line) {
	val := func(unit string) report.Line {
		return report.L(b.n(repEng(unit), "case", "parts", p.Name, "value"))
	}
	switch p.Kind {
	case cases.Resistor, cases.CCVS:
		value = val("Ω")
	case cases.Capacitor:
		value = val("F")
	case cases.Inductor:
		value = val("H")
	case cases.VCVS:
		value, details = val("V/V"), report.Plain("voltage gain")
	case cases.CCCS:
		value, details = val("A/A"), report.L(report.T("current gain, controlled by "), report.Name(p.Control))
	case cases.VCCS:
		value, details = val("S"), report.Plain("transconductance")
	case cases.VoltageSource, cases.CurrentSource:
		unit := "V"
		if p.Kind == cases.CurrentSource {
			unit = "A"
		}
		value = report.L(report.T("dc "), b.n(repEng(unit), "case", "parts", p.Name, "dc"))
		if p.AC != 0 {
			details = report.L(report.T("ac "), b.n(repEng(unit), "case", "parts", p.Name, "ac"))
		}
	case cases.Diode, cases.BJT, cases.MOSFET:
		value = report.L(report.T("model "), report.Name(p.Model))
		if p.Kind == cases.MOSFET {
			if p.Width > 0 {
				details = append(details, report.T("W "), b.n(repEng("m"), "case", "parts", p.Name, "width"))
			}
			if p.Length > 0 {
				details = append(details, report.T(" L "), b.n(repEng("m"), "case", "parts", p.Name, "length"))
			}
			if p.Multiplier != 1 {
				details = append(details, report.T(" ×"), b.n(repG, "case", "parts", p.Name, "multiplier"))
			}
		} else if p.Area != 1 {
			details = report.L(report.T("area "), b.n(repG, "case", "parts", p.Name, "area"))
		}
	}
	if p.Kind == cases.CCVS {
		details = report.L(report.T("transresistance, controlled by "), report.Name(p.Control))
	}
	if p.Tolerance > 0 {
		if details != nil {
			details = append(details, report.T(", "))
		}
		details = append(details, report.T("±"), report.N(b.derived("pct", repG, "none", "case", "parts", p.Name, "tolerance")), report.T(" %"))
	}
	return value, details
}

// repG writes a plain number in its shortest form with a true minus.
func repG(v float64) string { return trueMinus(strconv.FormatFloat(v, 'g', 4, 64)) }

func (b *pageBuilder) bias() report.Bias {
	in := b.in
	var bs report.Bias
	bs.Facts = []report.Fact{
		{Term: "Temperature", Desc: report.L(b.celsius("bias", "temperature_k"))},
		{Term: "Solved", Desc: report.L(report.T("in "), b.n(repInt, "bias", "iterations"), report.T(" iterations"))},
		{Term: "Supplies deliver", Desc: report.L(b.n(repEng("W"), "bias", "power_balance", "delivered"))},
		{Term: "Parts absorb", Desc: report.L(b.n(repEng("W"), "bias", "power_balance", "absorbed"))},
	}
	tones, region := b.warnedParts()

	nodes := &report.Table{ID: "nodes", Caption: "Node voltages", Keep: true, Cols: []report.Col{{Head: "node"}, {Head: "voltage", Num: true}, {Head: ""}}}
	for _, n := range in.op.Nodes {
		key := "nodes"
		note := ""
		if n.Internal {
			key, note = "internal_nodes", "inside a device"
		}
		nodes.Rows = append(nodes.Rows, report.Row{Cells: []report.Line{{report.Name(n.Name)}, {b.n(repEng("V"), "bias", key, n.Name)}, report.Plain(note)}})
	}
	bs.Nodes = nodes

	bs.Balance = &report.Table{ID: "balance", Caption: "Power balance", Keep: true, Cols: []report.Col{{Head: ""}, {Head: "power", Num: true}},
		Rows: []report.Row{
			{Cells: []report.Line{report.Plain("delivered by the sources"), {b.n(repEng("W"), "bias", "power_balance", "delivered")}}},
			{Cells: []report.Line{report.Plain("absorbed by the parts"), {b.n(repEng("W"), "bias", "power_balance", "absorbed")}}},
		}}

	parts := &report.Table{ID: "part-currents", Caption: "Parts: current into the first terminal, power absorbed (negative: delivered)",
		Cols: []report.Col{{Head: "part"}, {Head: "kind"}, {Head: "current", Num: true}, {Head: "power", Num: true}}}
	devs := &report.Table{ID: "devices", Caption: "Devices: region, currents into the terminals, intrinsic voltages",
		Cols: []report.Col{{Head: "device"}, {Head: "region"}, {Head: "terminal currents", Num: true}, {Head: "voltages", Num: true}, {Head: "power", Num: true}}}
	for _, p := range in.op.Parts {
		kind := regionWords(string(p.Kind))
		if p.TerminalResistance != nil {
			kind = "terminal resistance"
		}
		tone := tones[p.Name]
		parts.Rows = append(parts.Rows, report.Row{Tone: tone, Cells: []report.Line{{report.Name(p.Name)}, report.Plain(kind),
			{b.n(repEng("A"), "bias", "parts", p.Name, "current")}, {b.n(repEng("W"), "bias", "parts", p.Name, "power")}}})
		if p.Device == nil {
			continue
		}
		var cur, vol report.Line
		for i, t := range p.Terminals {
			if i > 0 {
				cur = append(cur, report.Br())
			}
			cur = append(cur, report.Label(t.Terminal+" "), b.n(repEng("A"), "bias", "parts", p.Name, "terminals", t.Terminal))
		}
		for i, v := range p.Device.Voltages {
			if i > 0 {
				vol = append(vol, report.Br())
			}
			vol = append(vol, report.Label("V"+v.Name+" "), b.n(repEng("V"), "bias", "parts", p.Name, "voltages", v.Name))
		}
		name := report.L(report.Name(p.Name), report.T(" "+kind))
		badge := report.L(report.B(repRegionBadge(p.Kind, b.str("bias", "parts", p.Name, "region"), region[p.Name])))
		devs.Rows = append(devs.Rows, report.Row{Tone: tone, Cells: []report.Line{name, badge, cur, vol, {b.n(repEng("W"), "bias", "parts", p.Name, "power")}}})
	}
	bs.Parts = parts
	if len(devs.Rows) > 0 {
		bs.Devices = devs
	}
	return bs
}

// repSmallSignalColumns are the parameters of a device kind in linearize's
// JSON keys, with their heads and units.
func repSmallSignalColumns(k cases.Kind) []struct{ key, head, unit, null string } {
	type col = struct{ key, head, unit, null string }
	switch k {
	case cases.BJT:
		return []col{{"gm", "gm", "S", ""}, {"r_pi", "rπ", "Ω", "open"}, {"r_o", "ro", "Ω", "open"}, {"r_mu", "rμ", "Ω", "open"},
			{"c_pi", "Cπ", "F", ""}, {"c_mu", "Cμ", "F", ""}, {"beta_ac", "β (ac)", "", "∞"}, {"f_t", "f_T", "Hz", "∞"}}
	case cases.MOSFET:
		return []col{{"gm", "gm", "S", ""}, {"gds", "gds", "S", ""}, {"gmb", "gmb", "S", ""}, {"r_ds", "rds", "Ω", "open"},
			{"cgs", "Cgs", "F", ""}, {"cgd", "Cgd", "F", ""}, {"cgb", "Cgb", "F", ""}, {"f_t", "f_T", "Hz", "∞"}}
	case cases.Diode:
		return []col{{"gd", "gd", "S", ""}, {"r_d", "rd", "Ω", "open"}, {"c_j", "Cj", "F", ""}, {"c_d", "Cd", "F", ""}}
	}
	return nil
}

// repDeviceBias are linearize's bias keys of a device kind.
func repDeviceBias(k cases.Kind) []struct{ key, label, unit string } {
	type q = struct{ key, label, unit string }
	switch k {
	case cases.BJT:
		return []q{{"ic", "Ic", "A"}, {"ib", "Ib", "A"}, {"vbe", "Vbe", "V"}, {"vce", "Vce", "V"}}
	case cases.MOSFET:
		return []q{{"id", "Id", "A"}, {"vgs", "Vgs", "V"}, {"vds", "Vds", "V"}, {"vbs", "Vbs", "V"}}
	case cases.Diode:
		return []q{{"id", "Id", "A"}, {"vd", "Vd", "V"}}
	}
	return nil
}

// repKindTitles name the device kinds in the small-signal section.
var repKindTitles = map[cases.Kind]string{
	cases.BJT:    "Bipolar transistors, hybrid-π model",
	cases.MOSFET: "MOSFETs, square-law model",
	cases.Diode:  "Diodes",
}

// models lays out the small-signal section: per device kind, one table of
// the operating point each model is taken at and one of the model's
// elements, a row per device.
func (b *pageBuilder) models() []*report.Table {
	tones, region := b.warnedParts()
	var kinds []cases.Kind
	for _, d := range b.in.eq.Devices {
		if !slices.Contains(kinds, d.Kind) {
			kinds = append(kinds, d.Kind)
		}
	}
	var out []*report.Table
	for _, k := range kinds {
		bias := &report.Table{ID: "model-bias-" + string(k), Caption: repKindTitles[k] + ": where each model is taken", Keep: true,
			Cols: []report.Col{{Head: "device"}, {Head: "model"}, {Head: "region"}}}
		for _, q := range repDeviceBias(k) {
			bias.Cols = append(bias.Cols, report.Col{Head: q.label, Num: true})
		}
		bias.Cols = append(bias.Cols, report.Col{Head: "small-signal range", Num: true})
		params := &report.Table{ID: "model-params-" + string(k), Caption: repKindTitles[k] + ": small-signal elements", Keep: true,
			Cols: []report.Col{{Head: "device"}}}
		for _, c := range repSmallSignalColumns(k) {
			params.Cols = append(params.Cols, report.Col{Head: c.head, Num: true})
		}
		for _, d := range b.in.eq.Devices {
			if d.Kind != k {
				continue
			}
			dp := []any{"devices", d.Name}
			tone := tones[d.Name]
			name := report.L(report.Name(d.Name))
			if d.MOSFET != nil && d.MOSFET.Reversed {
				name = append(name, report.T(" (source and drain swapped)"))
			}
			cells := []report.Line{name, {report.Name(d.Model)},
				{report.B(repRegionBadge(d.Kind, b.str("linearize", append(dp, "region")...), region[d.Name]))}}
			for _, q := range repDeviceBias(k) {
				cells = append(cells, report.Line{b.n(repEng(q.unit), "linearize", append(dp, "bias", q.key)...)})
			}
			vp := append(dp, "validity")
			if b.has("linearize", append(vp, "minus")...) || b.has("linearize", append(vp, "plus")...) {
				cells = append(cells, report.L(report.Label("v"+b.str("linearize", append(vp, "input")...)+" "),
					report.N(b.num(repEngDigits("V", 3), "no limit", "linearize", append(vp, "minus")...)), report.T(" to +"),
					report.N(b.num(repEngDigits("V", 3), "no limit", "linearize", append(vp, "plus")...))))
			} else {
				cells = append(cells, report.Plain("none: cut off"))
			}
			bias.Rows = append(bias.Rows, report.Row{Tone: tone, Cells: cells})

			cells = []report.Line{{report.Name(d.Name)}}
			for _, c := range repSmallSignalColumns(k) {
				null := c.null
				if null == "" {
					null = "none"
				}
				cells = append(cells, report.Line{report.N(b.num(repEng(c.unit), null, "linearize", append(dp, c.key)...))})
			}
			params.Rows = append(params.Rows, report.Row{Tone: tone, Cells: cells})
		}
		out = append(out, bias, params)
	}
	return out
}

func (b *pageBuilder) transfer(i int) report.Transfer {
	in := b.in
	r := in.results[i]
	t := r.Transfer
	unit := ac.Unit(t.Kind)
	tr := report.Transfer{ID: fmt.Sprintf("transfer-%d", i+1)}
	tr.Title = append(b.transferName(t), report.T(", "+kindWords(t.Kind)+" ("+unit+")"))
	path := func(keys ...any) []any { return append([]any{"transfers", i}, keys...) }
	hasX := in.expl[i] != nil
	xpath := func(keys ...any) []any { return append([]any{"explanations", i}, keys...) }

	// Key figures.
	dcLabel := "DC gain"
	if !isGain(t.Kind) {
		dcLabel = "DC value"
	}
	dcLine := report.Plain("none: a pole at the origin")
	if b.has("transfer", path("dc_gain")...) {
		dcLine = b.gain(t.Kind, "transfer", path("dc_gain")...)
	}
	tr.Facts = append(tr.Facts, report.Fact{Term: dcLabel, Desc: dcLine})
	if ref, _ := b.float("transfer", path("reference")...); ref != 0 {
		line := append(b.gain(t.Kind, "transfer", path("reference")...), b.referenceAt(i)...)
		tr.Facts = append(tr.Facts, report.Fact{Term: "Reference level", Desc: line})
		hz := func(key string) report.Line {
			return report.L(report.N(b.num(repEng("Hz"), "none", "transfer", path(key)...)))
		}
		tr.Facts = append(tr.Facts,
			report.Fact{Term: "−3 dB low", Desc: hz("f_low_hz")},
			report.Fact{Term: "−3 dB high", Desc: hz("f_high_hz")},
			report.Fact{Term: "Bandwidth", Desc: hz("bandwidth_hz")})
	} else {
		tr.Facts = append(tr.Facts, report.Fact{Term: "Band", Desc: report.Plain("no finite reference level, no −3 dB band")})
	}
	if ref, _ := b.float("transfer", path("reference")...); b.has("transfer", path("unity_gain_hz")...) && ref > 1 && (t.Kind == cases.VoltageGain || t.Kind == cases.CurrentGain) {
		tr.Facts = append(tr.Facts, report.Fact{Term: "|H| = 1 at", Desc: report.L(b.n(repEng("Hz"), "transfer", path("unity_gain_hz")...))})
	}
	tr.Facts = append(tr.Facts, report.Fact{Term: "Order", Desc: report.L(b.n(repInt, "transfer", path("order")...))})

	if hasX {
		for j := range b.length("explain", xpath("summary", "text")...) {
			tr.Summary = append(tr.Summary, report.L(b.quote("explain", xpath("summary", "text", j)...)))
		}
	}

	tr.Figures = b.transferFigures(i)
	b.transferForms(&tr, i)
	b.rootTables(&tr, i)
	if hasX {
		b.estimates(&tr, i)
		b.ports(&tr, i)
		for j := range b.length("explain", xpath("notes")...) {
			tr.Explain = append(tr.Explain, report.L(b.quote("explain", xpath("notes", j)...)))
		}
	} else {
		tr.Explain = append(tr.Explain, report.L(report.T("No explanation of this transfer (what sets each root, time constants, port equivalents): "),
			report.Static(in.explErr[i].Error())))
	}
	return tr
}

// The report's figure sizes: smaller than package plot's defaults, so
// that the page shows them a little enlarged, side by side on a screen
// and one above the other on paper, with text of about the body's size.
const (
	reportBodeWidth  = 14 * vg.Centimeter
	reportBodeHeight = 10.5 * vg.Centimeter
	reportMapWidth   = 10 * vg.Centimeter
	reportMapHeight  = 8.5 * vg.Centimeter
)

// transferFigures draws the Bode plot (on the transfer's sweep, or the
// default plot sweep where it has none) and the pole-zero map.
func (b *pageBuilder) transferFigures(i int) []report.Figure {
	in := b.in
	r := in.results[i]
	t := r.Transfer
	short := fmt.Sprintf("%s → %s, %s", t.From, t.To, kindWords(t.Kind))
	var figs []report.Figure
	f, h := r.FHz, r.Response
	sweepNote := "on the transfer's sweep"
	if len(f) == 0 {
		f = defaultPlotSweep.Frequencies()
		var err error
		if h, err = responseOn(in.eq.Circuit, t, f); err != nil {
			f, h = nil, nil
		}
		sweepNote = "from 1 Hz to 1 GHz (the case gives no sweep)"
	}
	if len(f) > 0 {
		var markers []plot.Marker
		for _, e := range []*float64{r.Bandwidth.LowHz, r.Bandwidth.HighHz} {
			if e != nil && *e >= f[0] && *e <= f[len(f)-1] {
				markers = append(markers, plot.Marker{F: *e, Label: "−3 dB"})
			}
		}
		var svg bytes.Buffer
		err := plot.Bode(&svg, short, []plot.Curve{{F: f, H: h}}, plot.BodeOptions{MagnitudeLabel: magnitudeLabel(t.Kind), Markers: markers,
			Width: reportBodeWidth, Height: reportBodeHeight})
		caption := "Bode plot, " + sweepNote + "."
		if len(markers) > 0 {
			caption = "Bode plot, " + sweepNote + "; the −3 dB points are marked."
		}
		if fig, ok := b.figure(err, svg.Bytes(), fmt.Sprintf("t%d-bode", i+1), "bode", caption); ok {
			figs = append(figs, fig)
		}
	}
	var svg bytes.Buffer
	err := plot.PoleZero(&svg, short, r.Rational.Poles, r.Rational.Zeros, plot.PoleZeroOptions{Width: reportMapWidth, Height: reportMapHeight})
	if fig, ok := b.figure(err, svg.Bytes(), fmt.Sprintf("t%d-map", i+1), "map",
		"Pole-zero map: × poles, ○ zeros, on signed logarithmic axes in rad/s; labels give |s|/2π."); ok {
		figs = append(figs, fig)
	}
	return figs
}

// figure inlines a drawn SVG; a figure that could not be drawn is left
// out (its numbers are in the tables).
func (b *pageBuilder) figure(err error, svg []byte, id, kind, caption string) (report.Figure, bool) {
	if err != nil {
		return report.Figure{}, false
	}
	html, err := report.InlineSVG(svg, id)
	if err != nil {
		b.fail(err)
		return report.Figure{}, false
	}
	return report.Figure{ID: id, Kind: kind, Caption: caption, SVG: html}, true
}

// repFactorRe matches one parenthesised factor of a formula.
var repFactorRe = regexp.MustCompile(`\([^()]*\)`)

// repSplitProduct splits one side of a formula written by dcGainForm or
// poleZeroForm ("K·s^2·(1 + s/a)(1 − s/b)") into its lead and factors.
func repSplitProduct(s string) []report.Math {
	i := strings.IndexByte(s, '(')
	if i < 0 {
		return []report.Math{report.ParseMath(s)}
	}
	var out []report.Math
	if i > 0 {
		out = append(out, report.ParseMath(s[:i]))
	}
	for _, f := range repFactorRe.FindAllString(s[i:], -1) {
		out = append(out, report.ParseMath(f))
	}
	return out
}

// repRationalFormula sets a formula written as "N / D" as a fraction.
func repRationalFormula(label, unit, src, form, text string) report.Formula {
	f := report.Formula{Label: label, Unit: unit, Src: src, Form: form}
	num, den, _ := strings.Cut(text, " / ")
	f.Num = repSplitProduct(num)
	if den != "" {
		f.Den = repSplitProduct(den)
	}
	return f
}

// repPolyTerms matches the signs between the terms written by polyText.
var repPolyTerms = regexp.MustCompile(` [+−] `)

// repPolynomialFormula sets a polynomial with a break opportunity between
// its terms.
func repPolynomialFormula(label, unit, src, form, text string) report.Formula {
	f := report.Formula{Label: label, Unit: unit, Src: src, Form: form}
	start := 0
	for _, m := range repPolyTerms.FindAllStringIndex(text, -1) {
		f.Num = append(f.Num, report.ParseMath(text[start:m[0]]))
		start = m[0]
	}
	f.Num = append(f.Num, report.ParseMath(text[start:]))
	return f
}

func (b *pageBuilder) transferForms(tr *report.Transfer, i int) {
	r := b.in.results[i]
	unit := ac.Unit(r.Transfer.Kind)
	_, src := b.lookup("transfer", "transfers", i)
	tr.Forms = []report.Formula{
		repRationalFormula("DC-gain form H(s)", unit, src, "dc_gain", dcGainForm(r.Rational)),
		repRationalFormula("pole-zero form H(s)", unit, src, "pole_zero", poleZeroForm(r.Rational)),
		repPolynomialFormula("numerator N(s)", "", src, "numerator", polyText(r.Rational.Numerator())),
		repPolynomialFormula("denominator D(s)", "", src, "denominator", polyText(r.Rational.Denominator())),
	}
}

// explainRoot finds the explain root (index into explanations[i].poles
// or .zeros) at s, not yet used; -1 when there is none.
func (b *pageBuilder) explainRoot(i int, which string, s complex128, used map[int]bool) int {
	for m := range b.length("explain", "explanations", i, which) {
		if used[m] {
			continue
		}
		re, _ := b.float("explain", "explanations", i, which, m, "re")
		im, _ := b.float("explain", "explanations", i, which, m, "im")
		if cmplx.Abs(complex(re, im)-s) <= 1e-9*cmplx.Abs(s) {
			used[m] = true
			return m
		}
	}
	return -1
}

// sensitivityText is how "tangent explain" writes a sensitivity, as
// numbers: −0.892, or −0.50+j0.21.
func (b *pageBuilder) sensitivity(path ...any) report.Line {
	g3 := func(v float64) string { return trueMinus(strconv.FormatFloat(v, 'g', 3, 64)) }
	line := report.L(b.n(g3, "explain", append(path, "re")...))
	if im, _ := b.float("explain", append(path, "im")...); im != 0 {
		sign := "+"
		if im < 0 {
			sign = "−"
		}
		line = append(line, report.T(sign+"j"), report.N(b.derived("abs", g3, "none", "explain", append(path, "im")...)))
	}
	return line
}

func (b *pageBuilder) rootTables(tr *report.Transfer, i int) {
	in := b.in
	rt := in.results[i].Rational
	hasX := in.expl[i] != nil
	labels := map[string]string{}
	if hasX {
		for k := range b.length("explain", "explanations", i, "elements") {
			labels[b.str("explain", "explanations", i, "elements", k, "name")] = b.str("explain", "explanations", i, "elements", k, "label")
		}
	}
	table := func(what, key string, roots []complex128) *report.Table {
		t := &report.Table{ID: fmt.Sprintf("t%d-%s", i+1, key), Caption: what, Cols: []report.Col{
			{Head: "s (rad/s)", Num: true}, {Head: "f = |s|/2π", Num: true}, {Head: "ω0 (rad/s)", Num: true}, {Head: "Q", Num: true}}}
		if hasX {
			t.Cols = append(t.Cols, report.Col{Head: "set by (storage share)"}, report.Col{Head: "most sensitive to (S)"})
		}
		if len(roots) == 0 {
			t.Rows = []report.Row{{Cells: []report.Line{report.Plain("none")}}}
			for range len(t.Cols) - 1 {
				t.Rows[0].Cells = append(t.Rows[0].Cells, nil)
			}
			return t
		}
		used := map[int]bool{}
		for k, s := range roots {
			if imag(s) < 0 {
				continue // shown with its conjugate
			}
			p := []any{"transfers", i, key, k}
			sText := report.L(b.n(num5, "transfer", append(p, "re")...))
			w0 := report.L(report.N(b.derived("w0", num5, "none", "transfer", p...)))
			q := report.Plain("—")
			if imag(s) > 0 {
				sText = append(sText, report.T(" ± j"), report.N(b.derived("abs", num5, "none", "transfer", append(p, "im")...)))
				q = report.L(report.N(b.derived("q", func(v float64) string { return trueMinus(strconv.FormatFloat(v, 'g', 4, 64)) }, "none", "transfer", p...)))
			}
			cells := []report.Line{sText, {report.N(b.derived("hz", repEngDigits("Hz", 4), "none", "transfer", p...))}, w0, q}
			if hasX {
				setBy, sens := b.attribution(i, key, s, used, labels)
				cells = append(cells, setBy, sens)
			}
			t.Rows = append(t.Rows, report.Row{Cells: cells})
		}
		return t
	}
	tr.Poles = table("Poles", "poles", rt.Poles)
	tr.Zeros = table("Zeros", "zeros", rt.Zeros)
	if len(rt.Cancelled) > 0 {
		line := report.L(report.T("Cancelled pole-zero pairs (a mode the transfer does not see), s = "))
		for k, s := range rt.Cancelled {
			if k > 0 {
				line = append(line, report.T(", "))
			}
			line = append(line, b.n(num5, "transfer", "transfers", i, "cancelled", k, "re"))
			if imag(s) != 0 {
				line = append(line, report.T(" + j"), b.n(num5, "transfer", "transfers", i, "cancelled", k, "im"))
			}
		}
		line = append(line, report.T(" rad/s."))
		tr.Notes = append(tr.Notes, line)
	}
}

// attribution is what sets a root (the storage shares of 5 % or more, at
// most three) and what it is most sensitive to (the three largest |S|), as
// "tangent explain" lists them.
func (b *pageBuilder) attribution(i int, key string, s complex128, used map[int]bool, labels map[string]string) (setBy, sens report.Line) {
	m := b.explainRoot(i, key, s, used)
	if m < 0 {
		return report.Plain("—"), nil
	}
	p := []any{"explanations", i, key, m}
	ns := b.length("explain", append(p, "sensitivities")...)
	if ns == 0 {
		if note := b.str("explain", append(p, "note")...); note != "" {
			return report.L(b.quote("explain", append(p, "note")...)), nil
		}
		return nil, nil
	}
	pct0 := func(v float64) string { return strconv.FormatFloat(v, 'f', 0, 64) + " %" }
	nset := 0
	for k := range ns {
		sp := append(append([]any{}, p...), "sensitivities", k)
		name := labels[b.str("explain", append(sp, "element")...)]
		if share, _ := b.float("explain", append(sp, "storage_share")...); share >= 0.05 && nset < 3 {
			if nset > 0 {
				setBy = append(setBy, report.T(", "))
			}
			setBy = append(setBy, report.Name(name), report.T("\u00a0"), report.N(b.derived("pct", pct0, "none", "explain", append(sp, "storage_share")...)))
			nset++
		}
		if k < 3 {
			if k > 0 {
				sens = append(sens, report.T(", "))
			}
			sens = append(sens, report.Name(name), report.T("\u00a0"))
			sens = append(sens, b.sensitivity(sp...)...)
		}
	}
	return setBy, sens
}

func (b *pageBuilder) estimates(tr *report.Transfer, i int) {
	labels, values := map[string]string{}, map[string]int{}
	for k := range b.length("explain", "explanations", i, "elements") {
		name := b.str("explain", "explanations", i, "elements", k, "name")
		labels[name] = b.str("explain", "explanations", i, "elements", k, "label")
		values[name] = k
	}
	for _, e := range []struct{ key, title string }{
		{"f_high_estimate", "f_high: open-circuit time constants of the high-frequency elements (coupling and bypass elements shorted)"},
		{"f_low_estimate", "f_low: short-circuit time constants of the coupling and bypass elements (the others open)"},
	} {
		p := []any{"explanations", i, e.key}
		if !b.has("explain", p...) {
			continue
		}
		est := report.Estimate{Title: e.title}
		t := &report.Table{Keep: true, Cols: []report.Col{{Head: "element"}, {Head: "value", Num: true}, {Head: "R seen", Num: true},
			{Head: "τ", Num: true}, {Head: "share", Num: true}, {Head: "Miller factor", Num: true}}}
		for k := range b.length("explain", append(p, "time_constants")...) {
			tp := append(append([]any{}, p...), "time_constants", k)
			name := b.str("explain", append(tp, "element")...)
			ek := values[name]
			unit := b.str("explain", "explanations", i, "elements", ek, "unit")
			miller := report.Line{}
			if m, ok := b.float("explain", append(tp, "miller")...); ok && m > 1.5 {
				miller = report.L(report.T("×"), b.n(func(v float64) string { return strconv.FormatFloat(v, 'g', 3, 64) }, "explain", append(tp, "miller")...))
			}
			t.Rows = append(t.Rows, report.Row{Cells: []report.Line{
				{report.Name(labels[name])},
				{b.n(repEng(unit), "explain", "explanations", i, "elements", ek, "value")},
				{report.N(b.num(repEng("Ω"), "open", "explain", append(tp, "r_ohm")...))},
				{report.N(b.num(repEng("s"), "∞ s", "explain", append(tp, "tau_s")...))},
				{report.N(b.derived("pct", repFixed(1, "%"), "none", "explain", append(tp, "share")...))},
				miller,
			}})
		}
		est.Table = t
		est.Result = report.L(report.T("estimate "), b.n(repEng("Hz"), "explain", append(p, "estimate_hz")...),
			report.T(", exact "), b.n(repEng("Hz"), "explain", append(p, "exact_hz")...),
			report.T(" ("), report.N(b.derived("pct", repSignedPercent(1), "none", "explain", append(p, "error")...)), report.T(")"))
		if b.has("explain", append(p, "caveat")...) {
			est.Caveat = report.L(b.quote("explain", append(p, "caveat")...))
		}
		tr.Estimates = append(tr.Estimates, est)
	}
}

func (b *pageBuilder) ports(tr *report.Transfer, i int) {
	x := b.in.expl[i]
	for k, pr := range x.ports {
		p := []any{"explanations", i, "port_equivalents", k}
		pe := report.PortEquivalent{}
		if pr.err != nil {
			pe.Title = report.L(report.T("port "), report.Name(pr.port), report.T(" driven at "), report.Name(pr.drive), report.T(": no equivalent"))
			pe.Notes = []report.Line{{b.quote("explain", append(p, "error")...)}}
			tr.Ports = append(tr.Ports, pe)
			continue
		}
		drive, per, uv, ui := "voltage", "volt", "V/V", "A/V"
		if !pr.pe.VoltageDrive {
			drive, per, uv, ui = "current", "ampere", "V/A", "A/A"
		}
		pe.Title = report.L(report.T("port "), report.Name(pr.port), report.T(" driven at "), report.Name(pr.drive),
			report.T(" by a test "+drive+"; Thevenin and Norton sources per "+per+" of drive"))
		src := func(key string) string { _, s := b.lookup("explain", append(p, key)...); return s }
		pe.Forms = append(pe.Forms,
			repRationalFormula("Thevenin voltage Voc/u", uv, src("thevenin_voltage"), "dc_gain", dcGainForm(pr.pe.Voc)),
			repRationalFormula("Thevenin impedance Zth", "Ω", src("thevenin_impedance"), "dc_gain", dcGainForm(pr.pe.Zth)))
		if pr.pe.Isc != nil {
			pe.Forms = append(pe.Forms, repRationalFormula("Norton current Isc/u", ui, src("norton_current"), "dc_gain", dcGainForm(pr.pe.Isc)))
		} else {
			pe.Forms = append(pe.Forms, report.Formula{Label: "Norton current Isc/u", Text: report.L(report.T("none: "), b.quote("explain", append(p, "no_norton")...))})
		}
		tr.Ports = append(tr.Ports, pe)
	}
}

// columnWords says what the columns other than the base are, for the
// captions of the side-by-side section: the variants (all of the file's,
// or those --variant names) and the case at each --temperature.
func (b *pageBuilder) columnWords() (captionWords, overlayWords, title string) {
	nt := len(b.in.opts.temperatures)
	switch {
	case nt == 0:
		return "each variant", "its variants", "Variants side by side"
	case len(b.in.cols) == 1+nt:
		return "the case at each temperature given by --temperature", "the case at each temperature", "Temperatures side by side"
	}
	return "each variant named by --variant and the case at each temperature given by --temperature",
		"the variants named and the case at each temperature", "Variants and temperatures side by side"
}

func (b *pageBuilder) variants() *report.Variants {
	in := b.in
	captionWords, overlayWords, title := b.columnWords()
	v := &report.Variants{Title: title}
	cols := &report.Table{ID: "variant-columns", Caption: "Columns: the case as written and " + captionWords, Keep: true,
		Cols: []report.Col{{Head: "column"}, {Head: "temperature", Num: true}, {Head: "what it changes"}, {Head: "keys it sets"}}}
	for j, col := range in.cols {
		temp := report.Line{report.T("failed")}
		if b.has("compare", "variants", j, "bias", "temperature_k") {
			temp = report.L(b.celsius("compare", "variants", j, "bias", "temperature_k"))
		}
		var keys report.Line
		for k, o := range col.overrides {
			if k > 0 {
				keys = append(keys, report.T(", "))
			}
			keys = append(keys, report.Name(o))
		}
		cols.Rows = append(cols.Rows, report.Row{Cells: []report.Line{{report.Name(col.name)}, temp, {b.quote("compare", "variants", j, "note")}, keys}})
	}
	v.Columns = cols

	// An overlay of every column's Bode curve, for each gain transfer.
	for ti, t := range in.c.Transfers {
		if !isGain(t.Kind) {
			continue
		}
		var curves []plot.Curve
		var markers []plot.Marker
		for j, cr := range in.colRes {
			if cr.err != nil || ti >= len(cr.results) || len(cr.results[ti].FHz) == 0 {
				continue
			}
			ar := cr.results[ti]
			curves = append(curves, plot.Curve{Label: in.cols[j].name, F: ar.FHz, H: ar.Response})
			if j == 0 {
				for _, e := range []*float64{ar.Bandwidth.LowHz, ar.Bandwidth.HighHz} {
					if e != nil && *e >= ar.FHz[0] && *e <= ar.FHz[len(ar.FHz)-1] {
						markers = append(markers, plot.Marker{F: *e, Label: "base −3 dB"})
					}
				}
			}
		}
		if len(curves) < 2 {
			continue
		}
		if in.colRes[0].err != nil {
			markers = nil
		}
		var svg bytes.Buffer
		err := plot.Bode(&svg, fmt.Sprintf("%s → %s, %s: every column", t.From, t.To, kindWords(t.Kind)), curves,
			plot.BodeOptions{MagnitudeLabel: magnitudeLabel(t.Kind), Markers: markers, Width: reportBodeWidth, Height: reportBodeHeight})
		if fig, ok := b.figure(err, svg.Bytes(), fmt.Sprintf("v%d-bode", ti+1), "wide",
			"The base case and "+overlayWords+" overlaid; the base's −3 dB points are marked."); ok {
			v.Figures = append(v.Figures, fig)
		}
	}

	changeWords := "each variant"
	if len(in.opts.temperatures) > 0 {
		changeWords = "each column"
	}
	ch := &report.Table{ID: "variant-changes", Caption: "Side by side: " + changeWords + " with its change against the base",
		Cols: []report.Col{{Head: ""}, {Head: "quantity"}, {Head: in.cols[0].name, Num: true}}}
	for _, col := range in.cols[1:] {
		ch.Cols = append(ch.Cols, report.Col{Head: col.name, Num: true}, report.Col{Head: "change", Num: true})
	}
	k := -1 // index into the JSON rows, which leave out the headings
	ti := 0
	for _, row := range in.rows {
		if row.heading {
			var head report.Line
			switch {
			case strings.HasPrefix(row.section, "transfer "):
				t := in.c.Transfers[ti]
				ti++
				head = append(b.transferName(t), report.T(", "+kindWords(t.Kind)+" ("+ac.Unit(t.Kind)+")"))
			default:
				head = report.Plain(row.label)
			}
			ch.Rows = append(ch.Rows, report.Row{Heading: true, Cells: []report.Line{head}})
			continue
		}
		k++
		rp := []any{"rows", k}
		mark := ""
		tone := ""
		switch {
		case row.differs():
			mark, tone = "≠", "mark"
		case row.marked(in.opts.threshold):
			mark, tone = "*", "mark"
		}
		cells := []report.Line{report.Plain(mark), {b.quote("compare", append(rp, "quantity")...)}}
		tones := []string{"", ""}
		for j := range in.cols {
			vp := append(append([]any{}, rp...), "values", j)
			c := row.cells[j]
			var cell report.Line
			switch {
			case c.failed:
				cell = report.Plain("failed")
			case row.isText:
				cell = report.L(report.B(repRegionBadge(b.deviceKind(row.label), b.str("compare", vp...), false)))
			case !c.ok:
				cell = report.Plain("none")
			default:
				null := "none"
				if math.IsInf(c.v, 0) {
					null = formatEng(c.v, row.unit)
				}
				cell = report.L(report.N(b.num(repEng(row.unit), null, "compare", vp...)))
			}
			cells = append(cells, cell)
			tones = append(tones, "")
			if j == 0 {
				continue
			}
			var change report.Line
			tone := ""
			if !row.isText && !c.failed && !row.cells[0].failed {
				pct, defined, same := row.change(j)
				cp := append(append([]any{}, rp...), "change_percent", j)
				switch {
				case same && !defined:
				case !defined:
					change = report.Plain("—")
					tone = "strong"
				default:
					change = report.L(report.N(b.num(func(v float64) string { return changeText(v, true, v == 0) }, "—", "compare", cp...)))
					if math.Abs(pct) > in.opts.threshold {
						tone = "strong"
					}
				}
			}
			cells = append(cells, change)
			tones = append(tones, tone)
		}
		ch.Rows = append(ch.Rows, report.Row{Cells: cells, Tone: tone, Tones: tones})
	}
	v.Changes = ch
	v.Notes = []report.Line{
		report.L(report.T("* a column changes the row by more than "), b.n(repG, "compare", "threshold_percent"),
			report.T(" % against the base (or a value appears, vanishes or becomes infinite); ≠ a region differs from the base's. "+
				"Change = (value − base)/base.")),
		report.L(report.T("Mid-band: at the reference level's frequency (for a DC reference a decade below f_high, at most "),
			report.Static("1 kHz"), report.T("); poles and zeros: the nearest below and above it, as |s|/2π.")),
	}
	return v
}

// deviceKind is the kind of the device a compare row label ("Q1 region")
// names.
func (b *pageBuilder) deviceKind(label string) cases.Kind {
	name, _, _ := strings.Cut(label, " ")
	for _, p := range b.in.c.Parts {
		if p.Name == name {
			return p.Kind
		}
	}
	return ""
}
