package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

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
