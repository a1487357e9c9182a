package main

import (
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"runtime"
	"strconv"
	"strings"
	"sync"

	"tangent/ac"
	"tangent/cases"
	"tangent/cmd/tangent/internal/plot"
	"tangent/dc"
	"tangent/smallsignal"
)

func init() {
	register("compare", "the base case and its variants side by side: bias, small-signal parameters, transfers", runCompare)
}

// compareFlags are the flags of "tangent compare".
type compareFlags struct {
	asJSON       bool
	variants     []string
	temperatures []string
	threshold    string
	plot         string
	plotTransfer int
	jobs         int
}

// A column of the comparison: the base case, a variant of the file or a
// temperature given by --temperature.
type column struct {
	name      string
	note      string
	overrides []string // the paths the column overrides (switch names as written)
	circuit   *cases.Circuit
}

// columnResult is one column analysed. err is set when the bias point or
// the small-signal stage failed; code is then the exit status it calls for.
type columnResult struct {
	op      *dc.OperatingPoint
	eq      *smallsignal.Equivalent
	results []*ac.Result
	figures []transferFigures
	plot    *plot.Curve
	err     error
	code    int
}

// transferFigures are the figures compare derives from one transfer.
//
// The mid-band frequency is where "mid-band" values are taken: the
// frequency of the reference level when that is a peak between DC and
// infinity; for a DC reference, a decade below the upper −3 dB point but at
// most 1 kHz (1 kHz when there is no upper point); for a high-pass
// reference (at infinity), a decade above the lower −3 dB point but at
// least 1 kHz; 1 kHz when the transfer has no finite reference level.
//
// The dominant poles and zeros are the roots nearest the mid-band
// frequency on either side: below it, the pole (zero) of largest modulus
// |s| < 2π·f_mid, the one that sets the lower band edge; above it, the pole
// (zero) of smallest modulus |s| > 2π·f_mid, the one that sets the upper
// edge. A conjugate pair is one root, its member with positive imaginary
// part; a root at the origin counts as below. They are given as
// frequencies |s|/2π in the table and as roots in rad/s in JSON.
//
// For the gain kinds (voltage, current, transconductance, transimpedance)
// ZIn and ZOut are the input_impedance and output_impedance between the
// transfer's ports (DESIGN.md's terminations) at the mid-band frequency.
type transferFigures struct {
	MidHz                float64
	PoleBelow, PoleAbove *complex128
	ZeroBelow, ZeroAbove *complex128
	ZIn, ZOut            *complex128 // nil where the impedance does not exist (or is infinite)
	hasImpedances        bool
}

// defaultSweep is used for a plotted transfer that asks for no sweep.
var defaultSweep = cases.Sweep{Start: 1, Stop: 1e9, PointsPerDecade: 10}

func runCompare(args []string, stdout, stderr io.Writer) int {
	fs := newFlags("compare", "tangent compare [FILE] [--variant NAME] [--temperature LIST] [flags]",
		"Run the base case and each variant (all of the file's, or those named by --variant;\n"+
			"with --temperature, one more column per temperature) and show them side by side:\n"+
			"node voltages at the ports and device terminals, device currents and regions,\n"+
			"small-signal parameters, and per transfer the DC gain, reference level, −3 dB band,\n"+
			"the dominant poles and zeros, and input and output impedance at mid-band. Every\n"+
			"other column shows its change against the base in %; rows where some column moves\n"+
			"more than --threshold are marked *, regions that differ ≠. Variants run in\n"+
			"parallel; the output does not depend on it.", stderr)
	var fl compareFlags
	fs.BoolVar(&fl.asJSON, "json", false, "print the result as JSON on stdout (SI units, rad/s for roots)")
	fs.StringArrayVar(&fl.variants, "variant", nil, "compare only the variant `NAME` (repeatable)")
	fs.StringArrayVar(&fl.temperatures, "temperature", nil, "add a column per temperature in `LIST`, comma-separated: \"-40,27,85\"\n"+
		"(a bare number is °C) or \"233.15 K,85 °C\"; the file's variants are then\n"+
		"compared only when named by --variant")
	fs.StringVar(&fl.threshold, "threshold", "5", "mark rows that change by more than `PERCENT` against the base")
	fs.StringVar(&fl.plot, "plot", "", "write the Bode plot of every column's transfer to `FILE.svg`")
	fs.IntVar(&fl.plotTransfer, "plot-transfer", 1, "--plot draws the file's `N`th [[transfer]], counted from 1")
	fs.IntVar(&fl.jobs, "jobs", runtime.GOMAXPROCS(0), "analyse at most `N` columns at once")
	var cf caseFlags
	cf.register(fs)
	file, code, ok := parseFileArgs(fs, args, stderr)
	if !ok {
		return code
	}
	threshold, err := parseThreshold(fl.threshold)
	if err != nil {
		fmt.Fprintf(stderr, "tangent compare: --threshold %q: %v\n", fl.threshold, err)
		return exitUsage
	}
	if fl.jobs < 1 {
		fmt.Fprintf(stderr, "tangent compare: --jobs %d: want 1 or more\n", fl.jobs)
		return exitUsage
	}
	temps, err := parseTemperatures(fl.temperatures)
	if err != nil {
		fmt.Fprintf(stderr, "tangent compare: --temperature: %v\n", err)
		return exitUsage
	}
	c, code := cf.load("compare", file, stderr)
	if c == nil {
		return code
	}
	if fl.plot != "" && (fl.plotTransfer < 1 || fl.plotTransfer > len(c.Transfers)) {
		fmt.Fprintf(stderr, "tangent compare: --plot-transfer %d: %s has %d [[transfer]] entries\n", fl.plotTransfer, caseName(file), len(c.Transfers))
		return exitUsage
	}
	cols, code := compareColumns("compare", c, fl.variants, temps, stderr)
	if cols == nil {
		return code
	}
	plotIndex := -1
	if fl.plot != "" {
		plotIndex = fl.plotTransfer - 1
	}
	res := analyseColumns(cols, plotIndex, fl.jobs)
	code = exitOK
	for i, r := range res {
		if r.err != nil {
			fmt.Fprintf(stderr, "tangent compare: %s: %v\n", cols[i].name, r.err)
			if code == exitOK || r.code == exitUsage {
				code = r.code
			}
		}
	}
	rows := compareRows(c, cols, res)
	if fl.plot != "" {
		if err := writeComparePlot(fl.plot, c, cols, res, plotIndex); err != nil {
			fmt.Fprintf(stderr, "tangent compare: --plot: %v\n", err)
			return exitUsage
		}
	}
	if fl.asJSON {
		if err := writeJSON(stdout, compareJSON(caseName(file), c, cf.sets, threshold, cols, res, rows)); err != nil {
			fmt.Fprintf(stderr, "tangent compare: %v\n", err)
			return exitAnalysis
		}
		return code
	}
	printCompare(stdout, caseName(file), c, threshold, cols, res, rows)
	return code
}

// parseThreshold reads a percentage: "5", "5%", "5 %", "0.5".
func parseThreshold(s string) (float64, error) {
	t := strings.TrimSpace(strings.TrimSuffix(strings.TrimSpace(s), "%"))
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || v < 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("want a percentage ≥ 0 such as 5 or \"2.5 %%\"")
	}
	return v, nil
}

// temperature is one --temperature entry: its column name and the value
// as the case file would write it.
type temperature struct {
	name, value string
}

// parseTemperatures reads the --temperature lists. A bare number is in
// degrees Celsius ("-40" is "-40 °C"); anything else is read as the file
// reads a temperature ("233.15 K", "85 °C").
func parseTemperatures(lists []string) ([]temperature, error) {
	var out []temperature
	for _, l := range lists {
		for _, item := range strings.Split(l, ",") {
			item = strings.TrimSpace(item)
			if item == "" {
				return nil, fmt.Errorf("%q: an empty entry; want a list such as -40,27,85", l)
			}
			value := item
			if _, err := strconv.ParseFloat(item, 64); err == nil {
				value = item + " °C"
			}
			t, err := cases.ParseValue(value, "K")
			if err != nil {
				return nil, fmt.Errorf("%q: %v", item, err)
			}
			if t <= 0 {
				return nil, fmt.Errorf("%q is not above absolute zero", item)
			}
			out = append(out, temperature{name: "T=" + value, value: value})
		}
	}
	return out, nil
}

// compareColumns builds the columns: base, the variants (those named, or
// all of the file's when neither --variant nor --temperature is given),
// then one per temperature.
func compareColumns(cmd string, c *cases.Circuit, names []string, temps []temperature, stderr io.Writer) ([]column, int) {
	cols := []column{{name: "base", note: "the case as written", circuit: c}}
	if len(names) == 0 && len(temps) == 0 {
		for _, v := range c.Variants {
			names = append(names, v.Name)
		}
	}
	seen := map[string]bool{"base": true}
	for _, n := range names {
		if seen[n] {
			fmt.Fprintf(stderr, "tangent %s: --variant %s: named twice (or the name of the base column)\n", cmd, n)
			return nil, exitUsage
		}
		seen[n] = true
		vc, err := c.ApplyVariant(n)
		if err != nil {
			fmt.Fprintf(stderr, "tangent %s: --variant %s: %v\n", cmd, n, err)
			return nil, exitUsage
		}
		col := column{name: n, circuit: vc}
		for _, v := range c.Variants {
			if v.Name == n {
				col.note = v.Note
				for _, o := range v.Overrides {
					col.overrides = append(col.overrides, strings.Join(o.Path, "."))
				}
			}
		}
		cols = append(cols, col)
	}
	for _, t := range temps {
		if seen[t.name] {
			fmt.Fprintf(stderr, "tangent %s: --temperature %s: given twice\n", cmd, strings.TrimPrefix(t.name, "T="))
			return nil, exitUsage
		}
		seen[t.name] = true
		tc, err := c.WithOverrides([]cases.Override{{Path: []string{"temperature"}, Value: t.value}})
		if err != nil {
			printFlagError(stderr, "compare", err)
			return nil, exitUsage
		}
		cols = append(cols, column{name: t.name, note: "the case at " + t.value, overrides: []string{"temperature"}, circuit: tc})
	}
	return cols, exitOK
}

// analyseColumns analyses every column, at most jobs at once. Each column
// is independent and its result lands at its own index, so the outcome
// does not depend on jobs or scheduling.
func analyseColumns(cols []column, plotIndex, jobs int) []columnResult {
	res := make([]columnResult, len(cols))
	next := make(chan int)
	var wg sync.WaitGroup
	for range min(jobs, len(cols)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				res[i] = analyseColumn(cols[i].circuit, plotIndex)
			}
		}()
	}
	for i := range cols {
		next <- i
	}
	close(next)
	wg.Wait()
	return res
}

// analyseColumn biases and linearizes one circuit and analyses its
// transfers on their own sweeps.
func analyseColumn(c *cases.Circuit, plotIndex int) columnResult {
	var r columnResult
	op, err := dc.Solve(c)
	if err != nil {
		r.err, r.code = err, analysisExit(err)
		return r
	}
	r.op = op
	eq, err := smallsignal.Linearize(op)
	if err != nil {
		r.err, r.code = err, exitAnalysis
		return r
	}
	r.eq = eq
	for i, t := range c.Transfers {
		var f []float64
		if t.Sweep != nil {
			f = t.Sweep.Frequencies()
		}
		ar, err := ac.Analyse(eq.Circuit, t, f)
		if err != nil {
			r.err, r.code = fmt.Errorf("transfer %s → %s (%s): %w", t.From, t.To, t.Kind, err), exitAnalysis
			return r
		}
		r.results = append(r.results, ar)
		r.figures = append(r.figures, figuresOf(eq.Circuit, ar))
		if i == plotIndex {
			cv := plot.Curve{F: ar.FHz, H: ar.Response}
			if ar.FHz == nil {
				cv.F = defaultSweep.Frequencies()
				if cv.H, err = responseOn(eq.Circuit, t, cv.F); err != nil {
					r.err, r.code = err, exitAnalysis
					return r
				}
			}
			r.plot = &cv
		}
	}
	return r
}

// responseOn evaluates transfer t of the linear circuit c at f.
func responseOn(c *cases.Circuit, t *cases.Transfer, f []float64) ([]complex128, error) {
	p, err := ac.Setup(c, t)
	if err != nil {
		return nil, err
	}
	sw, err := ac.NewSweeper(p)
	if err != nil {
		return nil, err
	}
	return sw.Response(f, nil), nil
}

// midBandHz is the mid-band frequency of a band (see transferFigures).
func midBandHz(bw ac.Bandwidth) float64 {
	switch {
	case bw.Reference == 0:
		return 1e3
	case bw.RefHz == 0:
		if bw.HighHz != nil {
			return math.Min(1e3, *bw.HighHz/10)
		}
		return 1e3
	case math.IsInf(bw.RefHz, 1):
		if bw.LowHz != nil {
			return math.Max(1e3, *bw.LowHz*10)
		}
		return 1e3
	}
	return bw.RefHz
}

// isGain reports whether a transfer kind is a gain between two ports, for
// which input and output impedances mean something.
func isGain(k cases.TransferKind) bool {
	return k == cases.VoltageGain || k == cases.CurrentGain || k == cases.Transconductance || k == cases.Transimpedance
}

// figuresOf derives the mid-band figures of one analysed transfer.
func figuresOf(lin *cases.Circuit, r *ac.Result) transferFigures {
	f := transferFigures{MidHz: midBandHz(r.Bandwidth)}
	w := 2 * math.Pi * f.MidHz
	f.PoleBelow, f.PoleAbove = nearest(r.Rational.Poles, w)
	f.ZeroBelow, f.ZeroAbove = nearest(r.Rational.Zeros, w)
	if isGain(r.Transfer.Kind) {
		f.hasImpedances = true
		f.ZIn = impedanceAt(lin, r.Transfer.From, r.Transfer.To, cases.InputImpedance, f.MidHz)
		f.ZOut = impedanceAt(lin, r.Transfer.From, r.Transfer.To, cases.OutputImpedance, f.MidHz)
	}
	return f
}

// nearest returns the root of largest modulus below w and the root of
// smallest modulus above it (rad/s); of a conjugate pair only the member
// with positive imaginary part is considered.
func nearest(roots []complex128, w float64) (below, above *complex128) {
	for _, s := range roots {
		if imag(s) < 0 {
			continue
		}
		m := cmplx.Abs(s)
		if m < w && (below == nil || m > cmplx.Abs(*below)) {
			below = &s
		}
		if m > w && (above == nil || m < cmplx.Abs(*above)) {
			above = &s
		}
	}
	return below, above
}

// impedanceAt evaluates the input or output impedance between two ports
// of the linear circuit at fHz; nil when it does not exist there (the
// test source cannot be set up, or the impedance is infinite).
func impedanceAt(lin *cases.Circuit, from, to string, kind cases.TransferKind, fHz float64) *complex128 {
	h, err := responseOn(lin, &cases.Transfer{From: from, To: to, Kind: kind}, []float64{fHz})
	if err != nil || cmplx.IsInf(h[0]) || cmplx.IsNaN(h[0]) {
		return nil
	}
	return &h[0]
}

// A cell of the comparison: a number, a text (a region), nothing ("none":
// the quantity does not exist in that column) or a failed column.
type cell struct {
	ok     bool
	v      float64
	text   string
	failed bool
}

// compareRow is one quantity across the columns, or a heading.
type compareRow struct {
	heading bool
	section string // bias, small_signal, transfer N
	label   string
	unit    string // formatEng unit; "" for a plain number
	isText  bool
	cells   []cell
}

// change returns the change of column i against the base, in percent:
// 100·(v − base)/base. defined is false where that has no meaning (a
// missing or infinite value, a zero base); same reports equal values.
func (r *compareRow) change(i int) (pct float64, defined, same bool) {
	b, c := r.cells[0], r.cells[i]
	if b.failed || c.failed {
		return 0, false, true
	}
	if r.isText {
		return 0, false, b.text == c.text
	}
	switch {
	case !b.ok || !c.ok:
		return 0, false, b.ok == c.ok
	case b.v == c.v:
		return 0, true, true
	case b.v == 0 || math.IsInf(b.v, 0) || math.IsInf(c.v, 0) || math.IsNaN(b.v) || math.IsNaN(c.v):
		return 0, false, false
	}
	return 100 * (c.v - b.v) / b.v, true, false
}

// marked reports whether some column moves the row by more than
// threshold percent, or changes it in a way no percentage measures
// (a value appears, vanishes or becomes infinite).
func (r *compareRow) marked(threshold float64) bool {
	if r.heading || r.isText {
		return false
	}
	for i := 1; i < len(r.cells); i++ {
		pct, defined, same := r.change(i)
		if (defined && math.Abs(pct) > threshold) || (!defined && !same) {
			return true
		}
	}
	return false
}

// differs reports a text row (a region) that is not the same everywhere.
func (r *compareRow) differs() bool {
	if !r.isText {
		return false
	}
	for i := 1; i < len(r.cells); i++ {
		if _, _, same := r.change(i); !same {
			return true
		}
	}
	return false
}

// rowBuilder collects the rows, one column at a time.
type rowBuilder struct {
	n    int
	rows []*compareRow
	at   map[string]*compareRow
}

func (b *rowBuilder) heading(section, label string) {
	b.rows = append(b.rows, &compareRow{heading: true, section: section, label: label})
}

func (b *rowBuilder) row(section, label, unit string, isText bool) *compareRow {
	key := section + "\x00" + label
	if r, ok := b.at[key]; ok {
		return r
	}
	r := &compareRow{section: section, label: label, unit: unit, isText: isText, cells: make([]cell, b.n)}
	b.at[key] = r
	b.rows = append(b.rows, r)
	return r
}

func (b *rowBuilder) num(col int, section, label, unit string, v float64) {
	b.row(section, label, unit, false).cells[col] = cell{ok: true, v: v}
}

func (b *rowBuilder) opt(col int, section, label, unit string, v *float64) {
	r := b.row(section, label, unit, false)
	if v != nil {
		r.cells[col] = cell{ok: true, v: *v}
	}
}

func (b *rowBuilder) text(col int, section, label, s string) {
	b.row(section, label, "", true).cells[col] = cell{ok: true, text: s}
}

// compareRows lays out the quantities of every column. The rows come from
// the base circuit's structure (nodes, devices, transfers), which variants
// cannot change, so every column fills the same rows.
func compareRows(c *cases.Circuit, cols []column, res []columnResult) []*compareRow {
	b := &rowBuilder{n: len(cols), at: map[string]*compareRow{}}
	nodes := keyNodes(c)
	var devs []*cases.Part
	for _, p := range c.Parts {
		if cases.IsDevice(p.Kind) {
			devs = append(devs, p)
		}
	}
	// Fix the row order before filling: headings between the sections.
	b.heading("bias", "Bias point")
	for _, n := range nodes {
		b.row("bias", "V("+n+")", "V", false)
	}
	for _, d := range devs {
		b.row("bias", d.Name+" region", "", true)
		for _, q := range deviceCurrents(d.Kind) {
			b.row("bias", d.Name+" "+q.label, "A", false)
		}
	}
	if len(devs) > 0 {
		b.heading("small_signal", "Small-signal parameters")
		for _, d := range devs {
			for _, q := range smallSignalQuantities(d.Kind) {
				b.row("small_signal", d.Name+" "+q.key, q.unit, false)
			}
		}
	}
	for i, t := range c.Transfers {
		sec := fmt.Sprintf("transfer %d", i+1)
		b.heading(sec, fmt.Sprintf("%s → %s, %s (%s)", t.From, t.To, kindWords(t.Kind), ac.Unit(t.Kind)))
		for _, q := range transferQuantities(t.Kind) {
			b.row(sec, q.label, q.unit, false)
		}
	}

	for col, r := range res {
		if r.err != nil {
			for _, row := range b.rows {
				if !row.heading {
					row.cells[col] = cell{failed: true}
				}
			}
			continue
		}
		op := r.op
		for _, n := range nodes {
			if v, ok := op.Node(n); ok {
				b.num(col, "bias", "V("+n+")", "V", v)
			}
		}
		for _, d := range devs {
			pr := op.Part(d.Name)
			if pr == nil || pr.Device == nil {
				continue
			}
			b.text(col, "bias", d.Name+" region", pr.Device.Region)
			for _, q := range deviceCurrents(d.Kind) {
				for _, tc := range pr.Terminals {
					if tc.Terminal == q.terminal {
						b.num(col, "bias", d.Name+" "+q.label, "A", tc.Current)
					}
				}
			}
		}
		for _, d := range r.eq.Devices {
			for _, q := range smallSignalQuantities(d.Kind) {
				b.num(col, "small_signal", d.Name+" "+q.key, q.unit, q.get(d))
			}
		}
		for i, ar := range r.results {
			sec := fmt.Sprintf("transfer %d", i+1)
			fig := r.figures[i]
			for _, q := range transferQuantities(ar.Transfer.Kind) {
				b.opt(col, sec, q.label, q.unit, q.get(ar, fig))
			}
		}
	}
	return b.rows
}

// keyNodes are the nodes compare shows: those of the ports and of the
// device terminals, in the file's node order.
func keyNodes(c *cases.Circuit) []string {
	want := map[string]bool{}
	for _, p := range c.Ports {
		want[p.Plus], want[p.Minus] = true, true
	}
	for _, p := range c.Parts {
		if cases.IsDevice(p.Kind) {
			for _, n := range p.Nodes {
				want[n] = true
			}
		}
	}
	var out []string
	for _, n := range c.Nodes {
		if want[n] {
			out = append(out, n)
		}
	}
	return out
}

type currentQuantity struct{ label, terminal string }

// deviceCurrents are the bias currents shown per device: into the
// collector and base of a bjt, the drain of a mosfet, the anode of a diode.
func deviceCurrents(k cases.Kind) []currentQuantity {
	switch k {
	case cases.BJT:
		return []currentQuantity{{"Ic", "collector"}, {"Ib", "base"}}
	case cases.MOSFET:
		return []currentQuantity{{"Id", "drain"}}
	case cases.Diode:
		return []currentQuantity{{"Id", "anode"}}
	}
	return nil
}

type smallSignalQuantity struct {
	key, unit string
	get       func(d smallsignal.Device) float64
}

// smallSignalQuantities are the parameters of linearize --json, by kind.
// An open resistance is +Inf.
func smallSignalQuantities(k cases.Kind) []smallSignalQuantity {
	ohm := smallsignal.Resistance
	switch k {
	case cases.BJT:
		return []smallSignalQuantity{
			{"gm", "S", func(d smallsignal.Device) float64 { return d.BJT.Gm }},
			{"r_pi", "Ω", func(d smallsignal.Device) float64 { return ohm(d.BJT.GPi) }},
			{"r_o", "Ω", func(d smallsignal.Device) float64 { return ohm(d.BJT.GO) }},
			{"r_mu", "Ω", func(d smallsignal.Device) float64 { return ohm(d.BJT.GMu) }},
			{"c_pi", "F", func(d smallsignal.Device) float64 { return d.BJT.CPi }},
			{"c_mu", "F", func(d smallsignal.Device) float64 { return d.BJT.CMu }},
			{"beta_ac", "", func(d smallsignal.Device) float64 { return d.BJT.BetaAC }},
			{"f_t", "Hz", func(d smallsignal.Device) float64 { return d.BJT.FT }},
		}
	case cases.MOSFET:
		return []smallSignalQuantity{
			{"gm", "S", func(d smallsignal.Device) float64 { return d.MOSFET.Gm }},
			{"gds", "S", func(d smallsignal.Device) float64 { return d.MOSFET.Gds }},
			{"gmb", "S", func(d smallsignal.Device) float64 { return d.MOSFET.Gmb }},
			{"cgs", "F", func(d smallsignal.Device) float64 { return d.MOSFET.Cgs }},
			{"cgd", "F", func(d smallsignal.Device) float64 { return d.MOSFET.Cgd }},
			{"cgb", "F", func(d smallsignal.Device) float64 { return d.MOSFET.Cgb }},
			{"f_t", "Hz", func(d smallsignal.Device) float64 { return d.MOSFET.FT }},
		}
	case cases.Diode:
		return []smallSignalQuantity{
			{"gd", "S", func(d smallsignal.Device) float64 { return d.Diode.Gd }},
			{"c_j", "F", func(d smallsignal.Device) float64 { return d.Diode.CJ }},
			{"c_d", "F", func(d smallsignal.Device) float64 { return d.Diode.CD }},
		}
	}
	return nil
}

type transferQuantity struct {
	label, unit string
	get         func(r *ac.Result, f transferFigures) *float64
}

// transferQuantities are the rows of one transfer.
func transferQuantities(k cases.TransferKind) []transferQuantity {
	unit := unitBase(ac.Unit(k))
	hz := func(s *complex128) *float64 {
		if s == nil {
			return nil
		}
		v := cmplx.Abs(*s) / (2 * math.Pi)
		return &v
	}
	mag := func(z *complex128) *float64 {
		if z == nil {
			return nil
		}
		v := cmplx.Abs(*z)
		return &v
	}
	dcLabel := "DC gain"
	if !isGain(k) {
		dcLabel = "DC value"
	}
	qs := []transferQuantity{
		{dcLabel, unit, func(r *ac.Result, _ transferFigures) *float64 {
			if g, ok := r.Rational.DCGain(); ok {
				return &g
			}
			return nil
		}},
		{"reference level", unit, func(r *ac.Result, _ transferFigures) *float64 {
			if r.Bandwidth.Reference == 0 {
				return nil
			}
			return &r.Bandwidth.Reference
		}},
		{"f_low", "Hz", func(r *ac.Result, _ transferFigures) *float64 { return r.Bandwidth.LowHz }},
		{"f_high", "Hz", func(r *ac.Result, _ transferFigures) *float64 { return r.Bandwidth.HighHz }},
		{"bandwidth", "Hz", func(r *ac.Result, _ transferFigures) *float64 { return r.Bandwidth.WidthHz }},
		{"mid-band frequency", "Hz", func(_ *ac.Result, f transferFigures) *float64 { return &f.MidHz }},
		{"pole below mid-band", "Hz", func(_ *ac.Result, f transferFigures) *float64 { return hz(f.PoleBelow) }},
		{"pole above mid-band", "Hz", func(_ *ac.Result, f transferFigures) *float64 { return hz(f.PoleAbove) }},
		{"zero below mid-band", "Hz", func(_ *ac.Result, f transferFigures) *float64 { return hz(f.ZeroBelow) }},
		{"zero above mid-band", "Hz", func(_ *ac.Result, f transferFigures) *float64 { return hz(f.ZeroAbove) }},
	}
	if isGain(k) {
		qs = append(qs,
			transferQuantity{"|Z_in| at mid-band", "Ω", func(_ *ac.Result, f transferFigures) *float64 { return mag(f.ZIn) }},
			transferQuantity{"|Z_out| at mid-band", "Ω", func(_ *ac.Result, f transferFigures) *float64 { return mag(f.ZOut) }})
	}
	return qs
}

// changeText writes a change in percent with a sign: "+1.23 %",
// "−12.4 %", "0 %" for equal values, "—" where no percentage applies.
func changeText(pct float64, defined, same bool) string {
	switch {
	case same && !defined:
		return "" // none in both
	case same:
		return "0 %"
	case !defined:
		return "—"
	}
	a := math.Abs(pct)
	prec := 2
	if a >= 100 {
		prec = 0
	} else if a >= 10 {
		prec = 1
	}
	s := strconv.FormatFloat(a, 'f', prec, 64)
	if pct < 0 {
		return "−" + s + " %"
	}
	return "+" + s + " %"
}

// cellText writes a cell's value.
func cellText(r *compareRow, c cell) string {
	switch {
	case c.failed:
		return "failed"
	case !c.ok:
		return "none"
	case r.isText:
		return regionWords(c.text)
	}
	return formatEng(c.v, r.unit)
}

// printCompare writes the text table: one row per quantity, one column per
// variant, each after the first followed by its change against the base.
func printCompare(w io.Writer, file string, c *cases.Circuit, threshold float64, cols []column, res []columnResult, rows []*compareRow) {
	title := file
	if c.Title != "" {
		title = c.Title + " (" + file + ")"
	}
	fmt.Fprintf(w, "Variants side by side: %s\n", title)
	fmt.Fprintln(w, "\nColumns")
	var crows [][]string
	for i, col := range cols {
		about := col.note
		if len(col.overrides) > 0 {
			about = strings.TrimSpace(about + " [" + strings.Join(col.overrides, ", ") + "]")
		}
		temp := "failed"
		if res[i].op != nil {
			temp = fmt.Sprintf("%.2f °C", res[i].op.Temperature-273.15)
		}
		crows = append(crows, []string{col.name, strings.Replace(temp, "-", "−", 1), about})
	}
	writeTable(w, "  ", []bool{false, true, false}, crows)
	fmt.Fprintln(w)

	head := []string{"", "", cols[0].name}
	right := []bool{false, false, true}
	for _, col := range cols[1:] {
		head = append(head, col.name, "change")
		right = append(right, true, true)
	}
	table := [][]string{head}
	for _, r := range rows {
		if r.heading {
			table = append(table, []string{"", r.label})
			continue
		}
		mark := ""
		switch {
		case r.differs():
			mark = "≠"
		case r.marked(threshold):
			mark = "*"
		}
		line := []string{mark, "  " + r.label, cellText(r, r.cells[0])}
		for i := 1; i < len(cols); i++ {
			ch := ""
			if !r.isText {
				ch = changeText(r.change(i))
			}
			if r.cells[i].failed || r.cells[0].failed {
				ch = ""
			}
			line = append(line, cellText(r, r.cells[i]), ch)
		}
		table = append(table, line)
	}
	writeTable(w, "", right, table)
	fmt.Fprintf(w, "\n* some column changes the row by more than %s against base (or a value appears, vanishes or\n"+
		"  becomes infinite); ≠ a region differs from base's. change = (value − base)/base.\n"+
		"Mid-band: at the reference level's frequency (for a DC reference a decade below f_high, at\n"+
		"most 1 kHz); poles and zeros: the nearest below and above it, as |s|/2π.\n", strconv.FormatFloat(threshold, 'g', -1, 64)+" %")
}

// compareJSON is the JSON of "tangent compare --json" (DESIGN.md):
// {"variants": [{"name", "bias": B, "transfers": [T]}, ...]} with B the
// object of bias --json and T that of transfer --json, plus these keys:
// file, title, set (the --set flags), threshold_percent; per variant note,
// overrides (the paths it sets), error (when it failed), devices (the
// devices object of linearize --json) and mid_band (per transfer: f_hz,
// the dominant roots pole_below, pole_above, zero_below, zero_above in
// rad/s, and for gains input_impedance and output_impedance, complex Ω;
// null where there is none); and rows, the table: per quantity its
// section, quantity, unit, values (SI, one per variant; null for none or
// a failed variant), change_percent (null where undefined) and marked.
func compareJSON(file string, c *cases.Circuit, sets []string, threshold float64, cols []column, res []columnResult, rows []*compareRow) object {
	var o object
	o.set("file", file)
	if c.Title != "" {
		o.set("title", c.Title)
	}
	o.set("set", nonNilStrings(sets))
	o.set("threshold_percent", threshold)
	var vs []object
	for i, col := range cols {
		r := res[i]
		var v object
		v.set("name", col.name)
		v.set("note", col.note)
		v.set("overrides", nonNilStrings(col.overrides))
		if r.err != nil {
			v.set("error", r.err.Error())
			if r.op == nil {
				v.set("bias", biasFailureJSON(file, r.err))
			}
		}
		if r.op != nil {
			v.set("bias", biasJSON(file, r.op))
		}
		if r.eq != nil {
			lin := linearizeJSON(file, r.eq)
			for _, f := range lin {
				if f.key == "devices" {
					v.set("devices", f.value)
				}
			}
		}
		ts := []any{}
		var mids []object
		if r.err == nil {
			for j, ar := range r.results {
				ts = append(ts, transferJSON(ar))
				mids = append(mids, midBandJSON(ar, r.figures[j]))
			}
		}
		v.set("transfers", ts)
		v.set("mid_band", nonNilObjects(mids))
		vs = append(vs, v)
	}
	o.set("variants", vs)
	var rs []object
	for _, r := range rows {
		if r.heading {
			continue
		}
		var ro object
		ro.set("section", r.section)
		ro.set("quantity", r.label)
		unit := r.unit
		if r.isText {
			unit = ""
		}
		ro.set("unit", unit)
		vals := make([]any, len(r.cells))
		chs := make([]any, len(r.cells))
		for i, c := range r.cells {
			switch {
			case c.failed || !c.ok:
			case r.isText:
				vals[i] = c.text
			default:
				vals[i] = finiteJSON(c.v)
			}
			if pct, defined, same := r.change(i); i > 0 && !r.isText && !c.failed && !r.cells[0].failed && (defined || same) {
				chs[i] = pct
			}
		}
		ro.set("values", vals)
		ro.set("change_percent", chs)
		ro.set("marked", r.marked(threshold) || r.differs())
		rs = append(rs, ro)
	}
	o.set("rows", nonNilObjects(rs))
	return o
}

func midBandJSON(r *ac.Result, f transferFigures) object {
	root := func(s *complex128) any {
		if s == nil {
			return nil
		}
		return complexJSON(*s)
	}
	var o object
	o.set("from", r.Transfer.From)
	o.set("to", r.Transfer.To)
	o.set("kind", string(r.Transfer.Kind))
	o.set("f_hz", f.MidHz)
	o.set("pole_below", root(f.PoleBelow))
	o.set("pole_above", root(f.PoleAbove))
	o.set("zero_below", root(f.ZeroBelow))
	o.set("zero_above", root(f.ZeroAbove))
	if f.hasImpedances {
		o.set("input_impedance", root(f.ZIn))
		o.set("output_impedance", root(f.ZOut))
	}
	return o
}

func nonNilStrings(s []string) []string {
	if s == nil {
		return []string{}
	}
	return s
}

// writeComparePlot writes the Bode plot of transfer index of every column
// that was analysed, with the base's −3 dB points marked.
func writeComparePlot(path string, c *cases.Circuit, cols []column, res []columnResult, index int) error {
	t := c.Transfers[index]
	var curves []plot.Curve
	var markers []plot.Marker
	for i, r := range res {
		if r.plot == nil {
			continue
		}
		cv := *r.plot
		cv.Label = cols[i].name
		if i == 0 {
			bw := r.results[index].Bandwidth
			for _, e := range []*float64{bw.LowHz, bw.HighHz} {
				if e != nil && *e >= cv.F[0] && *e <= cv.F[len(cv.F)-1] {
					markers = append(markers, plot.Marker{F: *e, Label: "base −3 dB", Curve: 0})
				}
			}
		}
		curves = append(curves, cv)
	}
	if len(curves) == 0 {
		return fmt.Errorf("no column was analysed")
	}
	if res[0].plot == nil {
		markers = nil
	}
	return writeFigure(path, func(w io.Writer) error {
		return plot.Bode(w, transferTitle(c, t), curves, plot.BodeOptions{MagnitudeLabel: magnitudeLabel(t.Kind), Markers: markers})
	})
}
