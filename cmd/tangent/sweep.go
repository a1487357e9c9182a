package main

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"tangent/cases"
	"tangent/dc"
)

// "tangent bias --sweep": the operating point along a DC sweep of one
// independent source (dc.SweepSource), as a table, JSON or CSV.

// maxSweepPoints bounds --sweep's POINTS.
const maxSweepPoints = 10001

// sweepSpec is a --sweep PART=START:STOP:POINTS flag, read but not yet
// checked against the case (START and STOP need the part's unit).
type sweepSpec struct {
	flag        string // as given, for messages
	part        string
	start, stop string
	points      int
	log         bool // --log
}

// sweepSyntax is the message for a malformed --sweep.
func sweepSyntax(s string) error {
	return fmt.Errorf("--sweep %q: want PART=START:STOP:POINTS, e.g. VIN=0:4V:41 or IB=1uA:10mA:31 (POINTS from 2 to %d)", s, maxSweepPoints)
}

// parseSweepFlag reads PART=START:STOP:POINTS.
func parseSweepFlag(s string, log bool) (*sweepSpec, error) {
	part, rng, ok := strings.Cut(s, "=")
	part = strings.TrimSpace(part)
	f := strings.Split(rng, ":")
	if !ok || part == "" || len(f) != 3 {
		return nil, sweepSyntax(s)
	}
	n, err := strconv.Atoi(strings.TrimSpace(f[2]))
	if err != nil || n < 2 || n > maxSweepPoints {
		return nil, sweepSyntax(s)
	}
	return &sweepSpec{flag: s, part: part, start: f[0], stop: f[1], points: n, log: log}, nil
}

// resolve checks the spec against c and returns the swept source's kind,
// its unit and the values: POINTS values from START to STOP inclusive,
// evenly spaced, or with a constant ratio under --log.
func (sp *sweepSpec) resolve(c *cases.Circuit) (cases.Kind, string, []float64, error) {
	var part *cases.Part
	var sources []string
	for _, p := range c.Parts {
		if p.Name == sp.part {
			part = p
		}
		if p.Kind == cases.VoltageSource || p.Kind == cases.CurrentSource {
			sources = append(sources, p.Name)
		}
	}
	list := "none"
	if len(sources) > 0 {
		list = strings.Join(sources, ", ")
	}
	switch {
	case part == nil:
		return "", "", nil, fmt.Errorf("--sweep %q: no part named %q in %s; independent sources: %s", sp.flag, sp.part, c.File, list)
	case part.Kind != cases.VoltageSource && part.Kind != cases.CurrentSource:
		return "", "", nil, fmt.Errorf("--sweep %q: %s is a %s; want an independent source (voltage_source or current_source): %s", sp.flag, sp.part, part.Kind, list)
	}
	unit := "V"
	if part.Kind == cases.CurrentSource {
		unit = "A"
	}
	start, err := cases.ParseValue(sp.start, unit)
	if err != nil {
		return "", "", nil, fmt.Errorf("--sweep %q: START: %v", sp.flag, err)
	}
	stop, err := cases.ParseValue(sp.stop, unit)
	if err != nil {
		return "", "", nil, fmt.Errorf("--sweep %q: STOP: %v", sp.flag, err)
	}
	if start == stop {
		return "", "", nil, fmt.Errorf("--sweep %q: START and STOP are equal", sp.flag)
	}
	if sp.log && (start == 0 || stop == 0 || (start < 0) != (stop < 0)) {
		return "", "", nil, fmt.Errorf("--sweep %q with --log: START and STOP must be nonzero and of the same sign", sp.flag)
	}
	return part.Kind, unit, sweepValues(start, stop, sp.points, sp.log), nil
}

// sweepValues returns n values from start to stop inclusive: start +
// (stop − start)·i/(n − 1), or start·(stop/start)^(i/(n − 1)) when log.
// The end points are exact.
func sweepValues(start, stop float64, n int, log bool) []float64 {
	v := make([]float64, n)
	for i := range v {
		t := float64(i) / float64(n-1)
		if log {
			v[i] = start * math.Pow(stop/start, t)
		} else {
			v[i] = start + (stop-start)*t
		}
	}
	v[0], v[n-1] = start, stop
	return v
}

// runSweep runs the sweep of sp on c for "tangent bias" and prints it.
func runSweep(file string, c *cases.Circuit, sp *sweepSpec, asJSON bool, csvFile string, stdout, stderr io.Writer) int {
	kind, unit, values, err := sp.resolve(c)
	if err != nil {
		fmt.Fprintf(stderr, "tangent bias: %v\n", err)
		return exitUsage
	}
	scale := "linear"
	if sp.log {
		scale = "log"
	}
	var head object
	head.set("part", sp.part)
	head.set("kind", string(kind))
	head.set("unit", unit)
	head.set("scale", scale)
	head.set("values", values)
	sw, err := dc.SweepSource(c, sp.part, values, dc.Options{})
	if err != nil {
		fmt.Fprintf(stderr, "tangent bias: %v\n", err)
		if asJSON {
			o := biasFailureJSON(caseName(file), err)
			o.set("sweep", head)
			var se *dc.SweepError
			if errors.As(err, &se) {
				o.set("failed_at", se.Value)
			}
			writeJSON(stdout, o)
		}
		return analysisExit(err)
	}
	if csvFile != "" {
		if err := writeAtomically(csvFile, func(w io.Writer) error { return writeSweepCSV(w, sw, unit) }); err != nil {
			fmt.Fprintf(stderr, "tangent bias: --csv: %v\n", err)
			return exitUsage
		}
	}
	if asJSON {
		var o object
		o.set("file", caseName(file))
		o.set("sweep", head)
		points := make([]object, 0, len(sw.Points))
		for _, op := range sw.Points {
			points = append(points, biasJSON(caseName(file), op))
		}
		o.set("points", points)
		if err := writeJSON(stdout, o); err != nil {
			fmt.Fprintf(stderr, "tangent bias: %v\n", err)
			return exitAnalysis
		}
		return exitOK
	}
	printSweep(stdout, caseName(file), sw, unit, scale)
	return exitOK
}

// sweepColumns are the quantities of a sweep table: the file's nodes (not
// the internal ones) and the devices, as indices into the points' Nodes
// and Parts. Every point of a sweep has the same tables (one circuit set
// up once), so the indices of the first point serve them all.
type sweepColumns struct {
	nodes, devs []int
}

func columnsOf(sw *dc.Sweep) sweepColumns {
	var c sweepColumns
	op := sw.Points[0]
	for i, n := range op.Nodes {
		if !n.Internal {
			c.nodes = append(c.nodes, i)
		}
	}
	for i, p := range op.Parts {
		if p.Device != nil {
			c.devs = append(c.devs, i)
		}
	}
	return c
}

// writeSweepCSV writes one row per point: the swept value, the node
// voltages, the device currents (into the first terminal) and the device
// regions, in SI units at full precision.
func writeSweepCSV(w io.Writer, sw *dc.Sweep, unit string) error {
	cols, op0 := columnsOf(sw), sw.Points[0]
	head := []string{sw.Source + " (" + unit + ")"}
	for _, n := range cols.nodes {
		head = append(head, "V("+op0.Nodes[n].Name+") (V)")
	}
	for _, d := range cols.devs {
		head = append(head, "I("+op0.Parts[d].Name+") (A)")
	}
	for _, d := range cols.devs {
		head = append(head, op0.Parts[d].Name+" region")
	}
	cw := csv.NewWriter(w)
	cw.Write(head)
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	for i, op := range sw.Points {
		row := []string{g(sw.Values[i])}
		for _, n := range cols.nodes {
			row = append(row, g(op.Nodes[n].Voltage))
		}
		for _, d := range cols.devs {
			row = append(row, g(op.Parts[d].Current))
		}
		for _, d := range cols.devs {
			row = append(row, op.Parts[d].Device.Region)
		}
		cw.Write(row)
	}
	cw.Flush()
	return cw.Error()
}

// regionChanges describes, device by device in sweep order, where a
// device changes region along the sweep, one line per change: "Q1:
// cutoff → forward active between 600 mV and 700 mV", or "Q1: forward
// active throughout".
func regionChanges(sw *dc.Sweep, unit string) []string {
	var out []string
	for _, k := range columnsOf(sw).devs {
		d := sw.Points[0].Parts[k].Name
		changed := false
		prev := sw.Points[0].Parts[k].Device.Region
		for i, op := range sw.Points[1:] {
			r := op.Parts[k].Device.Region
			if r != prev {
				out = append(out, fmt.Sprintf("%s: %s → %s between %s and %s", d,
					regionWords(prev), regionWords(r), siString(sw.Values[i], unit), siString(sw.Values[i+1], unit)))
				changed = true
			}
			prev = r
		}
		if !changed {
			out = append(out, fmt.Sprintf("%s: %s throughout", d, regionWords(prev)))
		}
	}
	return out
}

// sweepWarning is one warning (by kind and part) over the points where
// it is raised.
type sweepWarning struct {
	message string  // at the point of largest |swept value| among them
	at      float64 // that value
	count   int
	lo, hi  float64 // the smallest and largest swept value where it is raised
}

// sweepWarnings gathers the warnings of every point (dc's Warnings: the
// IEC 61140 extra-low-voltage caution among them), each kind and part
// once, in order of first appearance.
func sweepWarnings(sw *dc.Sweep) []*sweepWarning {
	type key struct{ kind, part string }
	byKey := map[key]*sweepWarning{}
	var out []*sweepWarning
	for i, op := range sw.Points {
		v := sw.Values[i]
		for _, w := range op.Warnings() {
			k := key{w.Kind, w.Part}
			s := byKey[k]
			if s == nil {
				s = &sweepWarning{message: w.Message, at: v, lo: v, hi: v}
				byKey[k] = s
				out = append(out, s)
			}
			s.count++
			s.lo, s.hi = min(s.lo, v), max(s.hi, v)
			if math.Abs(v) > math.Abs(s.at) {
				s.message, s.at = w.Message, v
			}
		}
	}
	return out
}

// printSweep writes the text report of a sweep: what was swept, a table
// of node voltages and device currents per point, the region changes and
// the warnings.
func printSweep(w io.Writer, file string, sw *dc.Sweep, unit, scale string) {
	op0 := sw.Points[0]
	head := "DC sweep of " + file
	if t := op0.Circuit.Title; t != "" {
		head = fmt.Sprintf("DC sweep: %s (%s)", t, file)
	}
	fmt.Fprintln(w, head)
	n := len(sw.Values)
	fmt.Fprintf(w, "at %.2f °C (%.2f K)\n", op0.Temperature-273.15, op0.Temperature)
	fmt.Fprintf(w, "%s\n", wrap(fmt.Sprintf("%s (%s) swept from %s to %s, %d points, %s spacing. Each point starts from "+
		"the answer at the one before, so a sweep up and a sweep down can differ where the circuit has more "+
		"than one operating point.", sw.Source, regionWords(string(sw.Kind)), siString(sw.Values[0], unit),
		siString(sw.Values[n-1], unit), n, scale), 78, ""))
	helper := 0
	for _, op := range sw.Points {
		if op.HelperConductance > 0 {
			helper++
		}
	}
	if helper > 0 {
		fmt.Fprintf(w, "note: at %d of %d points a helper conductance (at most 1 pS) from every node to\n"+
			"      ground remains in the answer: some node has nothing else tying it down there\n", helper, n)
	}

	cols := columnsOf(sw)
	fmt.Fprintln(w, "\nNode voltages and device currents (into the first terminal: collector, drain, anode)")
	row := []string{sw.Source}
	right := []bool{true}
	for _, nd := range cols.nodes {
		row, right = append(row, "V("+op0.Nodes[nd].Name+")"), append(right, true)
	}
	for _, d := range cols.devs {
		row, right = append(row, "I("+op0.Parts[d].Name+")"), append(right, true)
	}
	rows := [][]string{row}
	for i, op := range sw.Points {
		row := []string{formatEng(sw.Values[i], unit)}
		for _, nd := range cols.nodes {
			row = append(row, formatEng(op.Nodes[nd].Voltage, "V"))
		}
		for _, d := range cols.devs {
			row = append(row, formatEng(op.Parts[d].Current, "A"))
		}
		rows = append(rows, row)
	}
	writeTable(w, "  ", right, rows)

	fmt.Fprintln(w, "\nRegions")
	changes := regionChanges(sw, unit)
	if len(changes) == 0 {
		fmt.Fprintln(w, "  no devices")
	}
	for _, c := range changes {
		fmt.Fprintf(w, "  %s\n", wrap(c, 76, "    "))
	}

	fmt.Fprintln(w, "\nWarnings")
	ws := sweepWarnings(sw)
	if len(ws) == 0 {
		fmt.Fprintln(w, "  none")
	}
	for _, s := range ws {
		where := fmt.Sprintf("at all %d points", n)
		switch {
		case s.count == 1:
			where = "at " + sw.Source + " = " + siString(s.lo, unit)
		case s.count < n:
			where = fmt.Sprintf("at %d of %d points, %s from %s to %s", s.count, n, sw.Source, siString(s.lo, unit), siString(s.hi, unit))
		}
		fmt.Fprintf(w, "  - %s\n", wrap(where+": "+s.message, 74, "    "))
	}
}
