package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"
	"github.com/spf13/pflag"

	"tangent/cases"
)

// Shared helpers of the subcommands: flags, the FILE argument, case
// loading, diagnostics and JSON output. A subcommand's run function
// typically starts:
//
//	fs := newFlags("bias", "tangent bias [FILE] [flags]", "Find the bias point.", stderr)
//	asJSON := fs.Bool("json", false, "print JSON on stdout")
//	file, code, ok := parseFileArgs(fs, args, stderr)
//	if !ok {
//		return code
//	}
//	c, code := loadCase(file, stderr)
//	if c == nil {
//		return code
//	}

// newFlags returns the flag set of a subcommand. Errors and usage go to
// stderr; synopsis is the usage line, e.g. "tangent check [FILE] [flags]".
func newFlags(name, synopsis, about string, stderr io.Writer) *pflag.FlagSet {
	fs := pflag.NewFlagSet(name, pflag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.Usage = func() {
		fmt.Fprintf(stderr, "usage: %s\n%s\n\nflags:\n%s", synopsis, about, fs.FlagUsages())
	}
	return fs
}

// parseFlags parses args. It returns the positional arguments and ok; when
// ok is false the caller returns code: 0 after --help, exitUsage after a
// bad flag (the message is printed).
func parseFlags(fs *pflag.FlagSet, args []string, stderr io.Writer) (rest []string, code int, ok bool) {
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, pflag.ErrHelp) {
			return nil, exitOK, false
		}
		fmt.Fprintf(stderr, "tangent %s: %v\n", fs.Name(), err)
		fs.Usage()
		return nil, exitUsage, false
	}
	return fs.Args(), exitOK, true
}

// fileArg returns the optional FILE argument: "" when none is given. More
// than one positional argument is a usage error.
func fileArg(fs *pflag.FlagSet, rest []string, stderr io.Writer) (string, int, bool) {
	switch len(rest) {
	case 0:
		return "", exitOK, true
	case 1:
		return rest[0], exitOK, true
	}
	fmt.Fprintf(stderr, "tangent %s: one FILE at most, got %d arguments: %s\n", fs.Name(), len(rest), strings.Join(rest, " "))
	return "", exitUsage, false
}

// parseFileArgs is parseFlags followed by fileArg: it returns the optional
// FILE argument ("" for the default example).
func parseFileArgs(fs *pflag.FlagSet, args []string, stderr io.Writer) (string, int, bool) {
	rest, code, ok := parseFlags(fs, args, stderr)
	if !ok {
		return "", code, false
	}
	return fileArg(fs, rest, stderr)
}

// readCase reads a case: FILE, or "example:NAME" for an embedded example
// (when no such file exists), or the default example when file is "".
func readCase(file string) (*cases.Circuit, error) {
	if file == "" {
		return cases.Example(cases.DefaultExample)
	}
	if name, ok := strings.CutPrefix(file, "example:"); ok {
		if _, err := os.Stat(file); err != nil {
			return cases.Example(name)
		}
	}
	return cases.Load(file)
}

// caseName is the name a case is known by in messages.
func caseName(file string) string {
	if file == "" {
		return cases.ExampleFile(cases.DefaultExample)
	}
	return file
}

// loadCase reads a case for a subcommand (see readCase). On failure it
// prints every diagnostic to stderr and returns a nil circuit and
// exitUsage. The warnings of a valid case are printed to stderr too.
func loadCase(file string, stderr io.Writer) (*cases.Circuit, int) {
	c, err := readCase(file)
	if err != nil {
		printError(stderr, err)
		return nil, exitUsage
	}
	for _, w := range c.Warnings {
		fmt.Fprintln(stderr, w.Error())
	}
	return c, exitOK
}

// printError prints an error from package cases: one diagnostic per line
// ("file:line: key: message"), or the error's text.
func printError(stderr io.Writer, err error) {
	var errs cases.Errors
	if errors.As(err, &errs) {
		for _, d := range errs {
			fmt.Fprintln(stderr, d.Error())
		}
		return
	}
	fmt.Fprintf(stderr, "tangent: %v\n", err)
}

// jsonDiagnostic is a diagnostic in JSON output.
type jsonDiagnostic struct {
	File    string `json:"file"`
	Line    int    `json:"line"`
	Key     string `json:"key,omitempty"`
	Message string `json:"message"`
	Warning bool   `json:"warning,omitempty"`
}

func toJSONDiagnostics(ds []cases.Diagnostic) []jsonDiagnostic {
	out := make([]jsonDiagnostic, 0, len(ds))
	for _, d := range ds {
		out = append(out, jsonDiagnostic{d.File, d.Line, d.Key, d.Message, d.Warning})
	}
	return out
}

// writeJSON writes v as indented JSON to w.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// siPrefixSymbols are the prefixes siString uses, from 10⁻¹⁵ to 10¹².
var siPrefixSymbols = []string{"f", "p", "n", "µ", "m", "", "k", "M", "G", "T"}

// siString formats v with an SI prefix and unit for people: 1e9, "Hz" →
// "1 GHz"; 4700, "Ω" → "4.7 kΩ". Four significant digits at most.
func siString(v float64, unit string) string {
	if v == 0 || math.IsInf(v, 0) || math.IsNaN(v) {
		return strings.TrimSpace(strconv.FormatFloat(v, 'g', 4, 64) + " " + unit)
	}
	e := int(math.Floor(math.Log10(math.Abs(v)) / 3))
	e = max(-5, min(4, e))
	m := v / math.Pow(10, float64(3*e))
	s := strconv.FormatFloat(m, 'g', 4, 64)
	if strings.ContainsAny(s, "e") {
		s = strconv.FormatFloat(m, 'f', -1, 64)
	}
	return s + " " + siPrefixSymbols[e+5] + unit
}

// caseFlags holds the flags that change the case a subcommand reads:
// --set PATH=VALUE, repeatable. Register them with register, then read the
// case with load (or readCase and apply).
type caseFlags struct {
	sets []string
}

// register adds --set to fs.
func (cf *caseFlags) register(fs *pflag.FlagSet) {
	fs.StringArrayVar(&cf.sets, "set", nil, "override one key of the case, `PATH=VALUE`, PATH dotted as in the file:\n"+
		"parts.RC.value=4k7, temperature=\"85 °C\", models.bw_npn.forward_early_voltage=inf,\n"+
		"or a switch such as early_effect=false; VALUE is read as a TOML value, else as a\n"+
		"string; checked like the file; repeatable")
}

// overrides reads the --set flags. A flag's VALUE is a TOML value when it
// parses as one (4700, 0.5, inf, false, "4k7", { value = false, models =
// ["bw_npn"] }); otherwise it is the string as written, so that 4k7 and
// 85 °C need no quotes. PATH is a dotted TOML key.
func (cf *caseFlags) overrides() ([]cases.Override, error) {
	var out []cases.Override
	for _, s := range cf.sets {
		p, v, ok := strings.Cut(s, "=")
		p, v = strings.TrimSpace(p), strings.TrimSpace(v)
		if !ok || p == "" {
			return nil, fmt.Errorf("--set %q: want PATH=VALUE, e.g. parts.RC.value=4k7", s)
		}
		var keyDoc map[string]any
		if _, err := toml.Decode(p+" = 0", &keyDoc); err != nil {
			return nil, fmt.Errorf("--set %q: %q is not a dotted key such as parts.RC.value", s, p)
		}
		var keys []string
		for t := keyDoc; len(t) == 1; {
			var next any
			for k, e := range t {
				keys, next = append(keys, k), e
			}
			sub, ok := next.(map[string]any)
			if !ok {
				break
			}
			t = sub
		}
		var valDoc map[string]any
		var value any = v
		if _, err := toml.Decode("x = "+v, &valDoc); err == nil {
			value = valDoc["x"]
		}
		out = append(out, cases.Override{Path: keys, Value: value})
	}
	return out, nil
}

// apply returns c with the --set overrides applied (c itself when there
// are none). Its diagnostics name the flag: a problem with the key or
// value of a --set reads "--set PATH=VALUE: message"; one the override
// causes elsewhere in the case keeps its file and line and ends in
// "(with --set)".
func (cf *caseFlags) apply(c *cases.Circuit) (*cases.Circuit, error) {
	if len(cf.sets) == 0 {
		return c, nil
	}
	ovs, err := cf.overrides()
	if err != nil {
		return nil, err
	}
	nc, err := c.WithOverrides(ovs)
	var errs cases.Errors
	if errors.As(err, &errs) {
		return nil, cf.blame(ovs, errs, nil)
	}
	if err != nil {
		return nil, err
	}
	nc.Warnings = cf.blame(ovs, nc.Warnings, c.Warnings)
	return nc, nil
}

// blame rewrites diagnostics about a --set to name the flag; those in
// known (the case's own warnings) are kept as they are.
func (cf *caseFlags) blame(ovs []cases.Override, ds, known []cases.Diagnostic) cases.Errors {
	out := make(cases.Errors, 0, len(ds))
	for _, d := range ds {
		if slices.Contains(known, d) {
			out = append(out, d)
			continue
		}
		nd := d
		for i, o := range ovs {
			key := toml.Key(o.Path).String()
			if d.Key == key || strings.HasPrefix(d.Key, key+".") || strings.HasPrefix(d.Key, key+"[") {
				nd = cases.Diagnostic{File: "--set " + cf.sets[i], Message: d.Message, Warning: d.Warning}
				if d.Key != key {
					nd.Key = d.Key
				}
				break
			}
		}
		if nd.File == d.File && nd.Line == d.Line {
			nd.Message += " (with --set)"
		}
		out = append(out, nd)
	}
	return out
}

// load is loadCase with the --set overrides applied: on failure it prints
// every diagnostic to stderr, prefixed by "tangent NAME: " where it is
// about a flag, and returns a nil circuit and exitUsage.
func (cf *caseFlags) load(name, file string, stderr io.Writer) (*cases.Circuit, int) {
	c, err := readCase(file)
	if err == nil {
		c, err = cf.apply(c)
	}
	if err != nil {
		printFlagError(stderr, name, err)
		return nil, exitUsage
	}
	for _, w := range c.Warnings {
		fmt.Fprintln(stderr, flagPrefix(name, w)+w.Error())
	}
	return c, exitOK
}

// printFlagError is printError, with "tangent NAME: " before the lines
// about a flag.
func printFlagError(stderr io.Writer, name string, err error) {
	var errs cases.Errors
	if errors.As(err, &errs) {
		for _, d := range errs {
			fmt.Fprintln(stderr, flagPrefix(name, d)+d.Error())
		}
		return
	}
	if strings.HasPrefix(err.Error(), "--") {
		fmt.Fprintf(stderr, "tangent %s: %v\n", name, err)
		return
	}
	printError(stderr, err)
}

func flagPrefix(name string, d cases.Diagnostic) string {
	if strings.HasPrefix(d.File, "--") {
		return "tangent " + name + ": "
	}
	return ""
}
