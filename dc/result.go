package dc

import (
	"math"

	"tangent/cases"
)

// The tables of an operating point (Nodes, Parts with their terminals
// and device results, the KCL residual): their layout is worked out once
// per Prepared, and each result fills in the numbers.

// resultLayout is what an operating point's tables need beyond the
// solution, worked out once: which unknown each terminal's voltage and
// current belong to, which device each part is, and which nodes are
// internal.
type resultLayout struct {
	terminals int // all parts' terminals
	voltages  int // all devices' named voltages
	// Per terminal, in part order: the unknown whose voltage the
	// terminal sits at and whose KCL row its current enters, −1 for
	// ground.
	node []int32
	// Per part: the device that is the part (index into the solver's
	// devices), or −1 for a linear part; and its terminal resistance
	// (index into the Prepared's), or −1.
	device, resistance []int32
	// The node unknowns in layout order, and which are internal.
	nodeUnknown []int32
	internal    []bool
}

// newResultLayout works out the result layout of the solver's circuit.
func newResultLayout(s *solver, trs []TerminalResistance) resultLayout {
	c, l := s.c, s.sys.Layout
	np, n := len(c.Parts), l.Size()
	t := resultLayout{}
	for _, p := range c.Parts {
		t.terminals += partTerminals(p)
	}
	for _, d := range s.devs {
		t.voltages += d.voltageCount()
	}
	ints := make([]int32, t.terminals+2*np+n)
	t.node, ints = ints[:t.terminals:t.terminals], ints[t.terminals:]
	t.device, ints = ints[:np:np], ints[np:]
	t.resistance, ints = ints[:np:np], ints[np:]
	flags := make([]bool, 2*n)
	named, internal := flags[:n:n], flags[n:]
	k, tr, at := 0, 0, 0 // next device, terminal resistance, terminal
	for pi, p := range c.Parts {
		// Expand lists the terminal resistances in part order.
		t.resistance[pi] = -1
		if tr < len(trs) && trs[tr].Part == p.Name {
			t.resistance[pi] = int32(tr)
			tr++
		}
		var idx []int
		t.device[pi] = -1
		if cases.IsDevice(p.Kind) {
			d := s.devs[k]
			t.device[pi] = int32(k)
			k++
			idx = d.term[:d.nt] // as in s.sys.Terminals, a missing mosfet body filled in
		} else {
			idx = s.sys.Terminals[pi]
		}
		nt := partTerminals(p)
		for u := 0; u < nt; u++ {
			node := terminalNode(p, u)
			// The unknown of the terminal's own node: mna may have put a
			// sense node in its place, at the same voltage.
			i := idx[min(u, len(idx)-1)]
			if i < 0 || l.Unknowns[i].Name != node {
				i, _ = l.Node(node)
			}
			t.node[at+u] = int32(i)
			if i >= 0 {
				named[i] = true
			}
		}
		at += nt
	}
	for i := range trs {
		if j, ok := l.Node(trs[i].Inner); ok && j >= 0 {
			internal[j] = true
		}
	}
	t.nodeUnknown = ints[:0:n]
	for i, u := range l.Unknowns {
		if !u.Branch {
			t.nodeUnknown = append(t.nodeUnknown, int32(i))
			internal[i] = internal[i] || !named[i]
		}
	}
	t.internal = internal
	return t
}

// terminalNode returns the node of part p's terminal u; a mosfet's
// missing body is on its source.
func terminalNode(p *cases.Part, u int) string {
	if u < len(p.Nodes) {
		return p.Nodes[u]
	}
	return p.Nodes[min(u, 2)]
}

// result builds the operating point from the converged solver state.
// Its tables are carved from a few slabs, one allocation per element
// type rather than per part.
func (p *Prepared) result(attempts []Attempt, iterations int, m Method, helper float64) *OperatingPoint {
	s, t, c := p.s, &p.layout, p.s.c
	n := s.n
	fl := make([]float64, 3*n)
	x := fl[:n:n]
	copy(x, s.x)
	op := &OperatingPoint{
		Circuit: c, TerminalResistances: p.trs, System: s.sys, X: x,
		Temperature: temperatureOf(c), Converged: true, Iterations: iterations,
		Method: m, HelperConductance: helper, Attempts: attempts, Tolerances: s.opts,
	}
	res, scale := fl[n:2*n:2*n], fl[2*n:]
	op.Residual, op.ResidualScale = res, scale
	op.Parts = make([]PartResult, len(c.Parts))
	terms := make([]TerminalCurrent, t.terminals)
	volts := make([]NamedVoltage, t.voltages)
	devRes := make([]DeviceResult, len(s.devs))
	var names kindTerminals
	at := 0
	for pi, part := range c.Parts {
		// Fields are set one by one in the zeroed slabs: cheaper than
		// copying whole structs while the garbage collector runs.
		r := &op.Parts[pi]
		r.Name, r.Kind = part.Name, part.Kind
		if k := t.resistance[pi]; k >= 0 {
			r.TerminalResistance = &p.trs[k]
		}
		nt := partTerminals(part)
		tc := terms[at : at+nt : at+nt]
		tn := names.of(part.Kind)
		for u := range tc {
			tc[u].Terminal, tc[u].Node = tn[u], terminalNode(part, u)
		}
		if k := t.device[pi]; k >= 0 {
			d := s.devs[k]
			for u := range tc {
				tc[u].Current = d.cur[u]
			}
			r.Current = d.cur[0]
			dr := &devRes[k]
			nv := d.voltageCount()
			d.describe(dr, volts[:nv:nv])
			volts = volts[nv:]
			r.Device = dr
		} else {
			i := s.sys.PartCurrent(pi, part, x)
			r.Current = i
			tc[0].Current = i
			tc[1].Current = -i
		}
		var pw float64
		for u := range tc {
			cur := tc[u].Current
			j := t.node[at+u]
			pw += volt(x, int(j)) * cur
			if j >= 0 {
				res[j] += cur
				scale[j] = maxNonNegative(scale[j], math.Abs(cur))
			}
		}
		r.Power = pw
		r.Terminals = tc
		at += nt
	}
	op.Nodes = make([]NodeVoltage, len(t.nodeUnknown))
	for k, i := range t.nodeUnknown {
		nv := &op.Nodes[k]
		nv.Name, nv.Voltage, nv.Internal = s.sys.Layout.Unknowns[i].Name, x[i], t.internal[i]
		if helper > 0 {
			res[i] += helper * x[i]
			scale[i] = maxNonNegative(scale[i], math.Abs(helper*x[i]))
		}
	}
	return op
}

// describe writes the device's evaluation at the answer into r, with its
// named voltages in v. The model parameters are the
// device's own, shared: they are never modified.
func (d *device) describe(r *DeviceResult, v []NamedVoltage) {
	switch d.kind {
	case cases.Diode:
		r.Diode, r.DiodeCurrent, r.DiodeConductance = d.diode, d.di, d.dg
		r.Region = d.diode.Region(d.v[0])
		v[0] = NamedVoltage{"ak", d.v[0]}
		r.MaxPower = d.diode.MaxPower
	case cases.BJT:
		r.BJT, r.BJTState = d.bjt, d.bs
		r.Region = d.bjt.Region(d.v[0], d.v[1])
		v[0], v[1], v[2] = NamedVoltage{"be", d.v[0]}, NamedVoltage{"bc", d.v[1]}, NamedVoltage{"ce", d.v[0] - d.v[1]}
		r.MaxPower = d.bjt.MaxPower
	default:
		r.MOSFET, r.MOSState = d.mos, d.ms
		r.Region = d.ms.Region
		v[0], v[1], v[2] = NamedVoltage{"gs", d.v[0]}, NamedVoltage{"ds", d.v[1]}, NamedVoltage{"bs", d.v[2]}
		r.MaxPower = d.mos.MaxPower
	}
	r.Voltages = v
}

// kindTerminals remembers cases.Terminals per kind: that function builds
// a new slice at every call. A kind not among the first few is looked up
// every time.
type kindTerminals struct {
	n     int
	kinds [8]cases.Kind
	names [8][]string
}

func (c *kindTerminals) of(k cases.Kind) []string {
	for i := 0; i < c.n; i++ {
		if c.kinds[i] == k {
			return c.names[i]
		}
	}
	t := cases.Terminals(k)
	if c.n < len(c.kinds) {
		c.kinds[c.n], c.names[c.n] = k, t
		c.n++
	}
	return t
}

// partTerminals returns the number of terminals reported for p: its
// nodes, and always four for a mosfet (body included).
func partTerminals(p *cases.Part) int {
	if p.Kind == cases.MOSFET {
		return 4
	}
	return len(p.Nodes)
}

// voltageCount returns the number of named voltages the device reports.
func (d *device) voltageCount() int {
	switch d.kind {
	case cases.Diode:
		return 1
	default:
		return 3
	}
}
