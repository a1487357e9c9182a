package dc

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// SingularError reports equations that no values can make solvable: some
// node voltages or branch currents are not determined by the circuit.
type SingularError struct {
	File     string
	Nodes    []string // nodes with nothing tying their voltage down at DC
	Branches []string // parts whose current is not determined (e.g. voltage sources in a loop)
}

func (e *SingularError) Error() string {
	var b strings.Builder
	b.WriteString("dc: ")
	if e.File != "" {
		b.WriteString(e.File + ": ")
	}
	b.WriteString("the circuit's DC equations are singular")
	if len(e.Nodes) > 0 {
		fmt.Fprintf(&b, "; nothing fixes the voltage of node %s (no DC path to ground except through capacitors, gates or current sources)", quoteList(e.Nodes))
	}
	if len(e.Branches) > 0 {
		fmt.Fprintf(&b, "; the current of %s is not determined (e.g. voltage sources or inductors in a loop)", quoteList(e.Branches))
	}
	return b.String()
}

// NoConvergenceError reports that every method failed. Its message lists
// what was tried and where the iteration did not settle.
type NoConvergenceError struct {
	File     string
	Attempts []Attempt
	// Nodes that had not settled at the end of plain Newton, worst first.
	Nodes []UnsettledNode
	// Devices whose controlling voltages still moved then, largest first.
	Devices []MovingDevice
	// Singular lists the unknowns left without a pivot when plain
	// Newton's matrix became singular (nodes and branch parts by name).
	Singular []string
}

// UnsettledNode is a node whose last Newton update or KCL residual was
// outside the tolerances.
type UnsettledNode struct {
	Name     string
	Branch   bool    // the unknown is the branch current of part Name, not a node voltage
	Update   float64 // V (A for a branch current): the last Newton step
	Residual float64 // A: the KCL residual at the last iterate (0 for a branch)
}

// MovingDevice is a device whose controlling voltages moved in the last
// Newton iteration.
type MovingDevice struct {
	Part  string
	Moves []NamedVoltage // the change of each controlling voltage, V
}

func (e *NoConvergenceError) Error() string {
	var b strings.Builder
	b.WriteString("dc: ")
	if e.File != "" {
		b.WriteString(e.File + ": ")
	}
	b.WriteString("no operating point found")
	for _, a := range e.Attempts {
		fmt.Fprintf(&b, "\n  tried %s: %s (%d iterations)", a.Method, a.Detail, a.Iterations)
	}
	if len(e.Singular) > 0 {
		fmt.Fprintf(&b, "\n  plain Newton's matrix became singular at %s: at that bias nothing conducts there", quoteList(e.Singular))
	}
	if len(e.Nodes) > 0 {
		var items []string
		for _, n := range e.Nodes {
			if n.Branch {
				items = append(items, fmt.Sprintf("current of %s (last step %.3g A)", n.Name, n.Update))
				continue
			}
			items = append(items, fmt.Sprintf("%q (last step %.3g V, KCL residual %.3g A)", n.Name, n.Update, n.Residual))
		}
		fmt.Fprintf(&b, "\n  did not settle under plain Newton: %s", strings.Join(items, ", "))
	}
	if len(e.Devices) > 0 {
		var items []string
		for _, d := range e.Devices {
			var mv []string
			for _, m := range d.Moves {
				mv = append(mv, fmt.Sprintf("%s moved %.3g V", m.Name, m.Value))
			}
			items = append(items, fmt.Sprintf("%s (%s)", d.Part, strings.Join(mv, ", ")))
		}
		fmt.Fprintf(&b, "\n  devices whose junctions still moved: %s", strings.Join(items, "; "))
	}
	return b.String()
}

func quoteList(names []string) string {
	q := make([]string, len(names))
	for i, n := range names {
		q[i] = fmt.Sprintf("%q", n)
	}
	return strings.Join(q, ", ")
}

// maxListed bounds the nodes and devices a failure report names.
const maxListed = 5

// noConvergence builds the failure report from the attempts and the state
// each left; nodes and devices come from plain Newton, the first attempt.
func (s *solver) noConvergence(attempts []Attempt, reports []runReport) error {
	e := &NoConvergenceError{File: s.c.File, Attempts: attempts}
	if len(reports) == 0 {
		return e
	}
	r := reports[0]
	if r.singular != nil {
		seen := map[int]bool{}
		for _, i := range append(append([]int(nil), r.singular.Cols...), r.singular.Rows...) {
			if !seen[i] && i < s.n {
				seen[i] = true
				e.Singular = append(e.Singular, s.name(i))
			}
		}
		if len(e.Singular) > maxListed {
			e.Singular = e.Singular[:maxListed]
		}
	}
	type ranked struct {
		i     int
		ratio float64
	}
	var rk []ranked
	for i := 0; i < s.n && i < len(r.dx); i++ {
		abs := s.opts.VoltageTolerance
		if s.branch[i] {
			abs = s.opts.CurrentTolerance
		}
		ratio := math.Abs(r.dx[i]) / (s.opts.RelativeTolerance*math.Abs(r.x[i]) + abs)
		if !s.branch[i] {
			ratio = math.Max(ratio, math.Abs(r.f[i])/(s.opts.RelativeTolerance*r.scale[i]+s.opts.CurrentTolerance))
		}
		if ratio > 1 || math.IsNaN(ratio) {
			rk = append(rk, ranked{i, ratio})
		}
	}
	sort.SliceStable(rk, func(a, b int) bool { return rk[a].ratio > rk[b].ratio })
	for k, x := range rk {
		if k == maxListed {
			break
		}
		e.Nodes = append(e.Nodes, UnsettledNode{Name: s.name(x.i), Branch: s.branch[x.i], Update: r.dx[x.i], Residual: r.f[x.i]})
	}
	type moved struct {
		d   MovingDevice
		max float64
	}
	var mv []moved
	for _, m := range r.moves {
		var md MovingDevice
		big := 0.0
		for j, name := range m.names {
			if name == "" {
				continue
			}
			if a := math.Abs(m.dv[j]); a > s.opts.VoltageTolerance || math.IsNaN(a) {
				md.Moves = append(md.Moves, NamedVoltage{name, m.dv[j]})
				big = math.Max(big, a)
			}
		}
		if len(md.Moves) > 0 {
			md.Part = m.part
			mv = append(mv, moved{md, big})
		}
	}
	sort.SliceStable(mv, func(a, b int) bool { return mv[a].max > mv[b].max })
	for k, m := range mv {
		if k == maxListed {
			break
		}
		e.Devices = append(e.Devices, m.d)
	}
	return e
}
