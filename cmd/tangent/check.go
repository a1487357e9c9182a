package main

import (
	"cmp"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strings"

	"tangent/cases"
)

func init() {
	register("check", "validate a case file and print a summary", runCheck)
}

// checkSummary is the JSON form of "tangent check --json".
type checkSummary struct {
	File         string           `json:"file"`
	Valid        bool             `json:"valid"`
	Title        string           `json:"title,omitempty"`
	TemperatureK float64          `json:"temperature_k,omitempty"`
	Nodes        []string         `json:"nodes,omitempty"`
	PartsByKind  map[string]int   `json:"parts_by_kind,omitempty"`
	Parts        []checkPart      `json:"parts,omitempty"`
	Models       []checkModel     `json:"models,omitempty"`
	Ports        []checkPort      `json:"ports,omitempty"`
	Transfers    []checkTransfer  `json:"transfers,omitempty"`
	Variants     []checkVariant   `json:"variants,omitempty"`
	Warnings     []jsonDiagnostic `json:"warnings,omitempty"`
	Errors       []jsonDiagnostic `json:"errors,omitempty"`
}

type checkPart struct {
	Name  string            `json:"name"`
	Kind  string            `json:"kind"`
	Line  int               `json:"line"`
	Nodes map[string]string `json:"nodes"`
	Model string            `json:"model,omitempty"`
}

type checkModel struct {
	Name   string   `json:"name"`
	Device string   `json:"device"`
	Line   int      `json:"line"`
	Keys   []string `json:"keys"` // keys set in the file, in table order
}

type checkPort struct {
	Name   string `json:"name"`
	Plus   string `json:"plus"`
	Minus  string `json:"minus"`
	Source string `json:"source,omitempty"`
}

type checkTransfer struct {
	From  string      `json:"from"`
	To    string      `json:"to"`
	Kind  string      `json:"kind"`
	Sweep *checkSweep `json:"sweep,omitempty"`
}

type checkSweep struct {
	StartHz         float64 `json:"start_hz"`
	StopHz          float64 `json:"stop_hz"`
	PointsPerDecade int     `json:"points_per_decade"`
}

type checkVariant struct {
	Name      string   `json:"name"`
	Note      string   `json:"note,omitempty"`
	Overrides []string `json:"overrides"`
}

func runCheck(args []string, stdout, stderr io.Writer) int {
	fs := newFlags("check", "tangent check [FILE] [--json] [--set PATH=VALUE]",
		"Validate a case file (with no FILE, the embedded default example; \"example:NAME\" names\n"+
			"another example) and print a summary. Exit status 0 when valid, 2 when not;\n"+
			"every problem is printed to stderr as file:line: key: message.", stderr)
	asJSON := fs.Bool("json", false, "print the summary (or the errors) as JSON on stdout")
	var cf caseFlags
	cf.register(fs)
	file, code, ok := parseFileArgs(fs, args, stderr)
	if !ok {
		return code
	}
	c, err := readCase(file)
	if err == nil {
		c, err = cf.apply(c)
	}
	if err != nil {
		printFlagError(stderr, "check", err)
		if *asJSON {
			s := checkSummary{File: caseName(file)}
			var errs cases.Errors
			if errors.As(err, &errs) {
				s.Errors = toJSONDiagnostics(errs)
			} else {
				s.Errors = []jsonDiagnostic{{File: caseName(file), Message: err.Error()}}
			}
			writeJSON(stdout, s)
		}
		return exitUsage
	}
	for _, w := range c.Warnings {
		fmt.Fprintln(stderr, flagPrefix("check", w)+w.Error())
	}
	s := summarize(c)
	if *asJSON {
		if err := writeJSON(stdout, s); err != nil {
			fmt.Fprintf(stderr, "tangent check: %v\n", err)
			return exitAnalysis
		}
		return exitOK
	}
	printSummary(stdout, c, s)
	return exitOK
}

func summarize(c *cases.Circuit) checkSummary {
	s := checkSummary{
		File: c.File, Valid: true, Title: c.Title, TemperatureK: c.Temperature,
		Nodes: c.Nodes, PartsByKind: map[string]int{}, Warnings: toJSONDiagnostics(c.Warnings),
	}
	for _, p := range c.Parts {
		s.PartsByKind[string(p.Kind)]++
		nodes := map[string]string{}
		for i, t := range cases.Terminals(p.Kind) {
			nodes[t] = p.Nodes[i]
		}
		s.Parts = append(s.Parts, checkPart{Name: p.Name, Kind: string(p.Kind), Line: p.Line, Nodes: nodes, Model: p.Model})
	}
	for _, name := range modelNames(c) {
		m := c.Models[name]
		keys := make([]string, 0, len(m.Params))
		for k := range m.Params {
			keys = append(keys, k)
		}
		slices.Sort(keys)
		s.Models = append(s.Models, checkModel{Name: name, Device: m.Device, Line: m.Line, Keys: keys})
	}
	for _, p := range c.Ports {
		s.Ports = append(s.Ports, checkPort{Name: p.Name, Plus: p.Plus, Minus: p.Minus, Source: p.Source})
	}
	for _, t := range c.Transfers {
		ct := checkTransfer{From: t.From, To: t.To, Kind: string(t.Kind)}
		if t.Sweep != nil {
			ct.Sweep = &checkSweep{t.Sweep.Start, t.Sweep.Stop, t.Sweep.PointsPerDecade}
		}
		s.Transfers = append(s.Transfers, ct)
	}
	for _, v := range c.Variants {
		cv := checkVariant{Name: v.Name, Note: v.Note, Overrides: []string{}}
		for _, o := range v.Overrides {
			cv.Overrides = append(cv.Overrides, strings.Join(o.Path, "."))
		}
		s.Variants = append(s.Variants, cv)
	}
	return s
}

// modelNames returns the model names in file order.
func modelNames(c *cases.Circuit) []string {
	var names []string
	for n := range c.Models {
		names = append(names, n)
	}
	slices.SortFunc(names, func(x, y string) int {
		return cmp.Or(cmp.Compare(c.Models[x].Line, c.Models[y].Line), strings.Compare(x, y))
	})
	return names
}

// printSummary writes the human-readable summary.
func printSummary(w io.Writer, c *cases.Circuit, s checkSummary) {
	fmt.Fprintf(w, "%s: valid case\n", c.File)
	if c.Title != "" {
		fmt.Fprintf(w, "  title:        %s\n", c.Title)
	}
	celsius := math.Round((c.Temperature-273.15)*1e6) / 1e6
	fmt.Fprintf(w, "  temperature:  %g K (%g °C)\n", c.Temperature, celsius)
	fmt.Fprintf(w, "  nodes:        %d besides gnd: %s\n", len(c.Nodes), strings.Join(c.Nodes, ", "))

	var kinds []string
	seen := map[cases.Kind]bool{}
	for _, p := range c.Parts {
		if !seen[p.Kind] {
			seen[p.Kind] = true
			kinds = append(kinds, fmt.Sprintf("%d %s", s.PartsByKind[string(p.Kind)], p.Kind))
		}
	}
	fmt.Fprintf(w, "  parts:        %d: %s\n", len(c.Parts), strings.Join(kinds, ", "))

	var models []string
	for _, m := range s.Models {
		models = append(models, fmt.Sprintf("%s (%s)", m.Name, m.Device))
	}
	fmt.Fprintf(w, "  models:       %d%s\n", len(models), listTail(models))

	var ports []string
	for _, p := range c.Ports {
		if p.Source != "" {
			ports = append(ports, fmt.Sprintf("%s = source %s (%s, %s)", p.Name, p.Source, p.Plus, p.Minus))
		} else {
			ports = append(ports, fmt.Sprintf("%s = (%s, %s)", p.Name, p.Plus, p.Minus))
		}
	}
	fmt.Fprintf(w, "  ports:        %d%s\n", len(ports), listTail(ports))

	fmt.Fprintf(w, "  transfers:    %d\n", len(c.Transfers))
	for _, t := range c.Transfers {
		sweep := "no sweep"
		if t.Sweep != nil {
			sweep = fmt.Sprintf("%s to %s, %d points per decade", siString(t.Sweep.Start, "Hz"), siString(t.Sweep.Stop, "Hz"), t.Sweep.PointsPerDecade)
		}
		fmt.Fprintf(w, "    %-18s %-17s %s\n", t.From+" → "+t.To, t.Kind, sweep)
	}
	fmt.Fprintf(w, "  variants:     %d\n", len(c.Variants))
	for _, v := range s.Variants {
		line := fmt.Sprintf("    %-18s %s", v.Name, strings.Join(v.Overrides, ", "))
		if v.Note != "" {
			line += "  (" + v.Note + ")"
		}
		fmt.Fprintln(w, line)
	}
	if len(c.Warnings) > 0 {
		fmt.Fprintf(w, "  warnings:     %d (on stderr)\n", len(c.Warnings))
	}
}

// listTail renders ": a, b, c" or "" for an empty list.
func listTail(items []string) string {
	if len(items) == 0 {
		return ""
	}
	return ": " + strings.Join(items, "; ")
}
