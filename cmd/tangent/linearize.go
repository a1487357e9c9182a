package main

import (
	"fmt"
	"io"
	"math"

	"tangent/smallsignal"
)

func init() {
	register("linearize", "small-signal model of every device at the bias point; --export writes the linear equivalent", runLinearize)
}

func runLinearize(args []string, stdout, stderr io.Writer) int {
	fs := newFlags("linearize", "tangent linearize [FILE] [--json] [--export OUT.toml] [--set PATH=VALUE]",
		"Find the bias point, then show each device's small-signal (incremental) model there:\n"+
			"hybrid-π elements of a bjt, gm/gds/gmb and gate capacitances of a mosfet, gd and\n"+
			"capacitances of a diode, with the bias they came from and the input swing over which\n"+
			"the model holds (large-signal current within 10 % of the tangent line).\n"+
			"--export writes the linear equivalent circuit as a case file tangent reads back.", stderr)
	asJSON := fs.Bool("json", false, "print the result as JSON on stdout (SI units)")
	export := fs.String("export", "", "write the linear equivalent as a case file to `OUT.toml`")
	var cf caseFlags
	cf.register(fs)
	file, code, ok := parseFileArgs(fs, args, stderr)
	if !ok {
		return code
	}
	c, code := cf.load("linearize", file, stderr)
	if c == nil {
		return code
	}
	eq, code := linearizeCase("linearize", c, stderr)
	if eq == nil {
		return code
	}
	if *export != "" {
		if err := exportEquivalent(*export, caseName(file), eq); err != nil {
			fmt.Fprintf(stderr, "tangent linearize: %v\n", err)
			return exitUsage
		}
	}
	if *asJSON {
		if err := writeJSON(stdout, linearizeJSON(caseName(file), eq)); err != nil {
			fmt.Fprintf(stderr, "tangent linearize: %v\n", err)
			return exitAnalysis
		}
		return exitOK
	}
	printLinearize(stdout, caseName(file), eq)
	if *export != "" {
		fmt.Fprintf(stdout, "\nLinear equivalent written to %s\n", *export)
	}
	return exitOK
}

// exportEquivalent writes the equivalent to path atomically (see
// writeAtomically): a failed run never leaves half a file.
func exportEquivalent(path, source string, eq *smallsignal.Equivalent) error {
	header := fmt.Sprintf("Linear equivalent of %s at its bias point, written by tangent linearize.\n"+
		"Every device is replaced by its small-signal model; a part named DEVICE_QUANTITY\n"+
		"(Q1_gm, Q1_r_pi, M1_gds, D1_c_j) stands for that element of the device.\n"+
		"Sources keep their AC values; their DC values are spent on the bias point.", source)
	return writeAtomically(path, func(w io.Writer) error { return smallsignal.Export(w, eq.Circuit, header) })
}

// resistanceJSON is 1/g, or nil (JSON null) for an open.
func resistanceJSON(g float64) any {
	r := smallsignal.Resistance(g)
	if math.IsInf(r, 0) {
		return nil
	}
	return r
}

// finiteJSON is v, or nil where v is not finite (JSON has no infinity).
func finiteJSON(v float64) any {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return nil
	}
	return v
}

// linearizeJSON is the JSON of "tangent linearize --json" (DESIGN.md):
// {"devices": {NAME: {...}}} with the parameter keys of DESIGN.md, plus
// kind, model, region, bias {currents, voltages} and validity {input,
// minus, plus} (V; null where there is no tangent or no limit).
func linearizeJSON(file string, eq *smallsignal.Equivalent) object {
	var o object
	o.set("file", file)
	o.set("temperature_k", eq.Bias.Temperature)
	var devs object
	for _, d := range eq.Devices {
		var do, bias object
		do.set("kind", string(d.Kind))
		do.set("model", d.Model)
		do.set("region", d.Region)
		switch {
		case d.BJT != nil:
			p := d.BJT
			do.set("gm", p.Gm)
			do.set("r_pi", resistanceJSON(p.GPi))
			do.set("r_o", resistanceJSON(p.GO))
			do.set("r_mu", resistanceJSON(p.GMu))
			do.set("c_pi", p.CPi)
			do.set("c_mu", p.CMu)
			do.set("beta_ac", finiteJSON(p.BetaAC))
			do.set("f_t", finiteJSON(p.FT))
			bias.set("ic", p.Ic)
			bias.set("ib", p.Ib)
			bias.set("vbe", p.Vbe)
			bias.set("vbc", p.Vbc)
			bias.set("vce", p.Vce)
		case d.MOSFET != nil:
			p := d.MOSFET
			do.set("gm", p.Gm)
			do.set("gds", p.Gds)
			do.set("gmb", p.Gmb)
			do.set("r_ds", resistanceJSON(p.Gds))
			do.set("cgs", p.Cgs)
			do.set("cgd", p.Cgd)
			do.set("cgb", p.Cgb)
			do.set("f_t", finiteJSON(p.FT))
			bias.set("id", p.Id)
			bias.set("vgs", p.Vgs)
			bias.set("vds", p.Vds)
			bias.set("vbs", p.Vbs)
			bias.set("reversed", p.Reversed)
		case d.Diode != nil:
			p := d.Diode
			do.set("gd", p.Gd)
			do.set("r_d", resistanceJSON(p.Gd))
			do.set("c_j", p.CJ)
			do.set("c_d", p.CD)
			bias.set("id", p.Id)
			bias.set("vd", p.Vd)
		}
		do.set("bias", bias)
		var v object
		v.set("input", d.Input)
		v.set("minus", finiteJSON(d.SwingMinus))
		v.set("plus", finiteJSON(d.SwingPlus))
		do.set("validity", v)
		devs.set(d.Name, do)
	}
	o.set("devices", nonNil(devs))
	return o
}

func printLinearize(w io.Writer, file string, eq *smallsignal.Equivalent) {
	c := eq.Circuit
	title := c.Title
	if title == "" {
		title = file
	} else {
		title += " (" + file + ")"
	}
	fmt.Fprintf(w, "Small-signal models at the bias point: %s\n", title)
	fmt.Fprintf(w, "at %.2f °C (%.2f K)\n", eq.Bias.Temperature-273.15, eq.Bias.Temperature)
	if len(eq.Devices) == 0 {
		fmt.Fprintln(w, "\nNo diode, bjt or mosfet: the circuit is linear as it stands.")
		return
	}
	ohm := func(g float64) string {
		r := smallsignal.Resistance(g)
		if math.IsInf(r, 0) {
			return "open"
		}
		return formatEng(r, "Ω")
	}
	for _, d := range eq.Devices {
		fmt.Fprintf(w, "\n%s  %s, model %s: %s\n", d.Name, d.Kind, d.Model, regionWords(d.Region))
		var rows [][]string
		switch {
		case d.BJT != nil:
			p := d.BJT
			fmt.Fprintf(w, "  bias  Ic %s  Ib %s  Vbe %s  Vce %s\n", formatEng(p.Ic, "A"), formatEng(p.Ib, "A"), formatEng(p.Vbe, "V"), formatEng(p.Vce, "V"))
			rows = [][]string{
				{"gm", formatEng(p.Gm, "S"), "r_pi", ohm(p.GPi), "r_o", ohm(p.GO)},
				{"r_mu", ohm(p.GMu), "c_pi", formatEng(p.CPi, "F"), "c_mu", formatEng(p.CMu, "F")},
				{"beta_ac", formatEngDigits(p.BetaAC, "", 4), "f_t", formatEng(p.FT, "Hz"), "", "", ""},
			}
		case d.MOSFET != nil:
			p := d.MOSFET
			fmt.Fprintf(w, "  bias  Id %s  Vgs %s  Vds %s  Vbs %s%s\n", formatEng(p.Id, "A"), formatEng(p.Vgs, "V"), formatEng(p.Vds, "V"), formatEng(p.Vbs, "V"), map[bool]string{true: "  (source and drain swapped)"}[p.Reversed])
			rows = [][]string{
				{"gm", formatEng(p.Gm, "S"), "gds", formatEng(p.Gds, "S"), "gmb", formatEng(p.Gmb, "S")},
				{"r_ds", ohm(p.Gds), "f_t", formatEng(p.FT, "Hz"), "", ""},
				{"cgs", formatEng(p.Cgs, "F"), "cgd", formatEng(p.Cgd, "F"), "cgb", formatEng(p.Cgb, "F")},
			}
		case d.Diode != nil:
			p := d.Diode
			fmt.Fprintf(w, "  bias  Id %s  Vd %s\n", formatEng(p.Id, "A"), formatEng(p.Vd, "V"))
			rows = [][]string{
				{"gd", formatEng(p.Gd, "S"), "r_d", ohm(p.Gd)},
				{"c_j", formatEng(p.CJ, "F"), "c_d", formatEng(p.CD, "F")},
			}
		}
		writeTable(w, "  ", []bool{false, true, false, true, false, true}, padRows(rows, 6))
		fmt.Fprintf(w, "  small-signal range: v%s %s\n", d.Input, swingText(d.SwingMinus, d.SwingPlus))
	}
}

func padRows(rows [][]string, n int) [][]string {
	for i := range rows {
		for len(rows[i]) < n {
			rows[i] = append(rows[i], "")
		}
	}
	return rows
}

func swingText(minus, plus float64) string {
	if math.IsNaN(minus) || math.IsNaN(plus) {
		return "none: the device is cut off, there is no tangent to stay near"
	}
	side := func(v float64) string {
		if math.IsInf(v, 0) {
			return "no limit"
		}
		return formatEngDigits(v, "V", 3)
	}
	return fmt.Sprintf("from %s to +%s (current within 10 %% of the tangent line)", side(minus), side(plus))
}

// regionWords writes a region name for people: forward_active → forward active.
func regionWords(r string) string {
	b := []byte(r)
	for i := range b {
		if b[i] == '_' {
			b[i] = ' '
		}
	}
	return string(b)
}
