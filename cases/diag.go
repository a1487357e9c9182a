package cases

import (
	"cmp"
	"fmt"
	"slices"
	"strings"
)

// Error formats the diagnostic as "file:line: key: message", the form
// editors and terminals recognise. Warnings read "file:line: key: warning:
// message". An unknown line (0) or an empty key is left out.
func (d Diagnostic) Error() string {
	var b strings.Builder
	b.WriteString(d.File)
	if d.Line > 0 {
		fmt.Fprintf(&b, ":%d", d.Line)
	}
	b.WriteString(": ")
	if d.Key != "" {
		b.WriteString(d.Key + ": ")
	}
	if d.Warning {
		b.WriteString("warning: ")
	}
	b.WriteString(d.Message)
	return b.String()
}

// String is Error.
func (d Diagnostic) String() string { return d.Error() }

// Errors is every problem found in a case file. Parse returns it when the
// file is invalid; it holds errors only (warnings go to Circuit.Warnings).
type Errors []Diagnostic

// Error returns one line per diagnostic, in file order.
func (e Errors) Error() string {
	lines := make([]string, len(e))
	for i, d := range e {
		lines[i] = d.Error()
	}
	return strings.Join(lines, "\n")
}

var (
	_ error = Diagnostic{}
	_ error = Errors(nil)
)

// sortDiagnostics orders diagnostics by line, then key and message, so that
// output does not depend on map iteration order, and drops duplicates.
func sortDiagnostics(ds []Diagnostic) []Diagnostic {
	slices.SortStableFunc(ds, func(a, b Diagnostic) int {
		return cmp.Or(cmp.Compare(a.Line, b.Line), cmp.Compare(a.Key, b.Key), cmp.Compare(a.Message, b.Message))
	})
	return slices.Compact(ds)
}
