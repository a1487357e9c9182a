package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strings"

	"tangent/dc"
)

func init() {
	register("bias", "find the DC bias point and report voltages, currents, power and warnings", runBias)
}

func runBias(args []string, stdout, stderr io.Writer) int {
	fs := newFlags("bias", "tangent bias [FILE] [--json] [--set PATH=VALUE] [--sweep PART=START:STOP:POINTS [--log] [--csv FILE]]",
		"Find the DC operating point (bias point) of a case (with no FILE, the embedded default\n"+
			"example) and report node voltages, each part's current and power, each device's\n"+
			"region, terminal currents and voltages, the power balance and warnings.\n"+
			"With --sweep, solve it at each of POINTS DC values of one independent source, each\n"+
			"point starting from the one before, and report node voltages, device currents and\n"+
			"where each device changes region, e.g. --sweep VCC=0:12V:25, --sweep IB=1uA:10mA:31 --log.\n"+
			"Exit status 0 when solved, 1 when no operating point is found, 2 for bad input.", stderr)
	asJSON := fs.Bool("json", false, "print the result as JSON on stdout (SI units)")
	sweep := fs.String("sweep", "", "sweep the DC value of the independent source PART from START to STOP inclusive,\n"+
		"`PART=START:STOP:POINTS`, e.g. VCC=0:12V:25 (V for a voltage source, A for a current source)")
	logScale := fs.Bool("log", false, "with --sweep: space the points logarithmically (START and STOP nonzero, same sign)")
	csvFile := fs.String("csv", "", "with --sweep: write the swept values, node voltages, device currents and regions to `FILE.csv`")
	var cf caseFlags
	cf.register(fs)
	rest, code, ok := parseFlags(fs, args, stderr)
	if !ok {
		return code
	}
	file, code, ok := fileArg(fs, rest, stderr)
	if !ok {
		return code
	}
	var sp *sweepSpec
	switch {
	case *sweep != "":
		s, err := parseSweepFlag(*sweep, *logScale)
		if err != nil {
			fmt.Fprintf(stderr, "tangent bias: %v\n", err)
			return exitUsage
		}
		sp = s
	case *logScale || *csvFile != "":
		fmt.Fprintln(stderr, "tangent bias: --log and --csv go with --sweep PART=START:STOP:POINTS")
		return exitUsage
	}
	c, code := cf.load("bias", file, stderr)
	if c == nil {
		return code
	}
	if sp != nil {
		return runSweep(file, c, sp, *asJSON, *csvFile, stdout, stderr)
	}
	op, err := dc.Solve(c)
	if err != nil {
		fmt.Fprintf(stderr, "tangent bias: %v\n", err)
		if *asJSON {
			writeJSON(stdout, biasFailureJSON(caseName(file), err))
		}
		return analysisExit(err) // exitUsage when the case itself is wrong (e.g. a model of the wrong device kind)
	}
	if *asJSON {
		if err := writeJSON(stdout, biasJSON(caseName(file), op)); err != nil {
			fmt.Fprintf(stderr, "tangent bias: %v\n", err)
			return exitAnalysis
		}
		return exitOK
	}
	printBias(stdout, caseName(file), op)
	return exitOK
}

// object is a JSON object whose keys keep their insertion order, so that
// output follows the file's order and is byte-for-byte repeatable.
type object []field

type field struct {
	key   string
	value any
}

func (o *object) set(key string, value any) { *o = append(*o, field{key, value}) }

// MarshalJSON writes the fields in order.
func (o object) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, f := range o {
		if i > 0 {
			b.WriteByte(',')
		}
		k, err := json.Marshal(f.key)
		if err != nil {
			return nil, err
		}
		b.Write(k)
		b.WriteByte(':')
		v, err := json.Marshal(f.value)
		if err != nil {
			return nil, fmt.Errorf("key %s: %w", f.key, err)
		}
		b.Write(v)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// biasJSON is the JSON contract of "tangent bias --json" (DESIGN.md), with
// these added keys: file, title, method, helper_conductance (S),
// internal_nodes (the nodes Expand makes for terminal resistances, and
// sense nodes), current for devices (into the first terminal), kind for
// every part, power_balance {delivered, absorbed} (W) and warnings
// [{kind, part, message}]. Terminal resistances appear as resistor parts
// named "Q1.base_resistance"; with them the parts' powers sum to zero.
func biasJSON(file string, op *dc.OperatingPoint) object {
	var o object
	o.set("file", file)
	if op.Circuit.Title != "" {
		o.set("title", op.Circuit.Title)
	}
	o.set("temperature_k", op.Temperature)
	o.set("converged", op.Converged)
	o.set("iterations", op.Iterations)
	o.set("method", string(op.Method))
	o.set("helper_conductance", op.HelperConductance)
	var nodes, internal object
	for _, n := range op.Nodes {
		if n.Internal {
			internal.set(n.Name, n.Voltage)
		} else {
			nodes.set(n.Name, n.Voltage)
		}
	}
	o.set("nodes", nonNil(nodes))
	o.set("internal_nodes", nonNil(internal))
	var parts object
	for _, p := range op.Parts {
		var po object
		po.set("kind", string(p.Kind))
		if d := p.Device; d != nil {
			po.set("region", d.Region)
		}
		po.set("current", p.Current)
		po.set("power", p.Power)
		if d := p.Device; d != nil {
			var ts, vs object
			for _, t := range p.Terminals {
				ts.set(t.Terminal, t.Current)
			}
			for _, v := range d.Voltages {
				vs.set(v.Name, v.Value)
			}
			po.set("terminals", ts)
			po.set("voltages", vs)
		}
		parts.set(p.Name, po)
	}
	o.set("parts", nonNil(parts))
	delivered, absorbed := op.PowerBalance()
	o.set("power_balance", object{{"delivered", delivered}, {"absorbed", absorbed}})
	ws := []object{}
	for _, w := range op.Warnings() {
		ws = append(ws, object{{"kind", w.Kind}, {"part", w.Part}, {"message", w.Message}})
	}
	o.set("warnings", ws)
	return o
}

func nonNil(o object) object {
	if o == nil {
		return object{}
	}
	return o
}

// biasFailureJSON reports a failed solve.
func biasFailureJSON(file string, err error) object {
	var o object
	o.set("file", file)
	o.set("converged", false)
	o.set("error", err.Error())
	var ne *dc.NoConvergenceError
	if errors.As(err, &ne) {
		var as []object
		for _, a := range ne.Attempts {
			as = append(as, object{{"method", string(a.Method)}, {"iterations", a.Iterations}, {"detail", a.Detail}})
		}
		o.set("attempts", as)
	}
	return o
}

// methodText says in words how the point was found.
func methodText(op *dc.OperatingPoint) string {
	switch op.Method {
	case dc.Newton:
		return fmt.Sprintf("found by Newton-Raphson in %d iterations", op.Iterations)
	case dc.ConductanceContinuation:
		return fmt.Sprintf("found by helper-conductance continuation after plain Newton failed (%d iterations in all)", op.Iterations)
	case dc.SourceRamp:
		return fmt.Sprintf("found by ramping the sources up after plain Newton and conductance continuation failed (%d iterations in all)", op.Iterations)
	}
	return fmt.Sprintf("found by %s in %d iterations", op.Method, op.Iterations)
}

// printBias writes the text report: Nodes, Parts, Devices, Power balance,
// Warnings, in aligned columns with engineering units.
func printBias(w io.Writer, file string, op *dc.OperatingPoint) {
	c := op.Circuit
	head := "Bias point of " + file
	if c.Title != "" {
		head = fmt.Sprintf("Bias point: %s (%s)", c.Title, file)
	}
	fmt.Fprintln(w, head)
	fmt.Fprintf(w, "at %.2f °C (%.2f K), %s\n", op.Temperature-273.15, op.Temperature, methodText(op))
	if op.HelperConductance > 0 {
		fmt.Fprintf(w, "note: a helper conductance of %s from every node to ground remains in this answer:\n"+
			"      some node has nothing else tying it down at this bias\n", formatEngDigits(op.HelperConductance, "S", 3))
	}

	fmt.Fprintln(w, "\nNodes")
	rows := [][]string{{"node", "voltage"}}
	var inner [][]string
	for _, n := range op.Nodes {
		if n.Internal {
			inner = append(inner, []string{n.Name, formatEng(n.Voltage, "V"), "internal"})
		} else {
			rows = append(rows, []string{n.Name, formatEng(n.Voltage, "V")})
		}
	}
	writeTable(w, "  ", []bool{false, true}, append(rows, inner...))

	fmt.Fprintln(w, "\nParts (current into the first terminal; power absorbed, negative when delivered)")
	rows = [][]string{{"part", "kind", "current", "power"}}
	for _, p := range op.Parts {
		kind := string(p.Kind)
		if p.TerminalResistance != nil {
			kind = "terminal resistance"
		}
		rows = append(rows, []string{p.Name, kind, formatEng(p.Current, "A"), formatEng(p.Power, "W")})
	}
	writeTable(w, "  ", []bool{false, false, true, true}, rows)

	fmt.Fprintln(w, "\nDevices (currents flow into the device; voltages at its intrinsic terminals)")
	models := map[string]string{}
	for _, q := range c.Parts {
		models[q.Name] = q.Model
	}
	devs := 0
	for _, p := range op.Parts {
		d := p.Device
		if d == nil {
			continue
		}
		devs++
		fmt.Fprintf(w, "  %s  %s, model %s: %s\n", p.Name, p.Kind, models[p.Name], strings.ReplaceAll(d.Region, "_", " "))
		cur := []string{"currents"}
		for _, t := range p.Terminals {
			cur = append(cur, t.Terminal, formatEng(t.Current, "A"))
		}
		vol := []string{"voltages"}
		for _, v := range d.Voltages {
			vol = append(vol, v.Name, formatEng(v.Value, "V"))
		}
		writeTable(w, "      ", []bool{false, false, true, false, true, false, true, false, true}, [][]string{
			cur, vol, {"power", "", formatEng(p.Power, "W")},
		})
	}
	if devs == 0 {
		fmt.Fprintln(w, "  none")
	}

	delivered, absorbed := op.PowerBalance()
	fmt.Fprintln(w, "\nPower balance")
	writeTable(w, "  ", []bool{false, true}, [][]string{
		{"delivered", formatEng(delivered, "W")},
		{"absorbed", formatEng(absorbed, "W")},
		{"difference", formatEngDigits(delivered-absorbed, "W", 2)},
	})

	fmt.Fprintln(w, "\nWarnings")
	ws := op.Warnings()
	if len(ws) == 0 {
		fmt.Fprintln(w, "  none")
	}
	for _, wn := range ws {
		fmt.Fprintf(w, "  - %s\n", wrap(wn.Message, 74, "    "))
	}
}

// wrap breaks text into lines of at most width runes, indenting every line
// after the first.
func wrap(text string, width int, indent string) string {
	var b strings.Builder
	n := 0
	for i, word := range strings.Fields(text) {
		l := len([]rune(word))
		if i > 0 && n+1+l > width {
			b.WriteString("\n" + indent)
			n = 0
		} else if i > 0 {
			b.WriteByte(' ')
			n++
		}
		b.WriteString(word)
		n += l
	}
	return b.String()
}

var _ json.Marshaler = object(nil)
