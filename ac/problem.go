package ac

import (
	"fmt"

	"gonum.org/v1/gonum/mat"

	"tangent/cases"
	"tangent/mna"
)

// Problem is a single-input, single-output linear problem in s:
//
//	(G + s·C)·x = B·u,   y = Out·x
//
// with u the test source (1 V or 1 A) and y the observed quantity (a
// voltage in V or a current in A). H(s) = y/u.
type Problem struct {
	G, C   *mat.Dense
	B, Out []float64
	Layout *mna.Layout
}

// portNodes are the unknown indices of a port and, for a source port, the
// source part.
type portNodes struct {
	plus, minus int
	source      *cases.Part // nil for a node pair
	branch      int         // branch index of a voltage-source port, else −1
}

// Setup writes the problem of one transfer on a linear circuit (one with no
// diode, bjt or mosfet: see package smallsignal), following DESIGN.md:
//
//   - every independent source is zeroed: a voltage source is a short, a
//     current source is open;
//   - the from port is driven by a test voltage (voltage, transconductance)
//     or a test current into its plus node (current, transimpedance,
//     input_impedance); a source port is driven in that source's place;
//   - the to port is left open for voltage outputs and shorted for current
//     outputs, the output current being the current that leaves the circuit
//     at the to port's plus node through the short;
//   - output_impedance drives the to port with a test current and zeroes the
//     from port: shorted for a node pair or a voltage source, open for a
//     current source.
func Setup(c *cases.Circuit, t *cases.Transfer) (*Problem, error) {
	for _, p := range c.Parts {
		if cases.IsDevice(p.Kind) {
			return nil, fmt.Errorf("ac: %s is a %s: linearize the circuit first", p.Name, p.Kind)
		}
	}
	from, err := findPort(c, t.From)
	if err != nil {
		return nil, err
	}
	to, err := findPort(c, t.To)
	if err != nil {
		return nil, err
	}
	sys, err := mna.Build(c)
	if err != nil {
		return nil, err
	}
	l := sys.Layout
	fp, err := locate(sys, c, from)
	if err != nil {
		return nil, err
	}
	tp, err := locate(sys, c, to)
	if err != nil {
		return nil, err
	}

	// Extra branches are numbered after the circuit's own unknowns.
	n := l.Size()
	var extra []func(g *mat.Dense, b, out []float64)
	grow := func() int { n++; return n - 1 }

	var driveIsVoltage, outIsCurrent bool
	var dp, op portNodes // driven port, observed port
	switch t.Kind {
	case cases.VoltageGain:
		dp, op, driveIsVoltage, outIsCurrent = fp, tp, true, false
	case cases.Transconductance:
		dp, op, driveIsVoltage, outIsCurrent = fp, tp, true, true
	case cases.CurrentGain:
		dp, op, driveIsVoltage, outIsCurrent = fp, tp, false, true
	case cases.Transimpedance:
		dp, op, driveIsVoltage, outIsCurrent = fp, tp, false, false
	case cases.InputImpedance:
		dp, op, driveIsVoltage, outIsCurrent = fp, fp, false, false
	case cases.OutputImpedance:
		dp, op, driveIsVoltage, outIsCurrent = tp, tp, false, false
	default:
		return nil, fmt.Errorf("ac: unknown transfer kind %q", t.Kind)
	}

	// Drive.
	if driveIsVoltage {
		if dp.branch >= 0 {
			k := dp.branch // the voltage source's own row carries u
			extra = append(extra, func(_ *mat.Dense, b, _ []float64) { b[k] = 1 })
		} else {
			// A node pair, or an (open) current source replaced by the
			// test voltage.
			k := grow()
			p, m := dp.plus, dp.minus
			extra = append(extra, func(g *mat.Dense, b, _ []float64) {
				voltageBranch(g, p, m, k)
				b[k] = 1
			})
		}
	} else {
		p, m, br := dp.plus, dp.minus, dp.branch
		extra = append(extra, func(g *mat.Dense, b, _ []float64) {
			if br >= 0 {
				// Open the voltage source: its branch current is forced to
				// the test current, leaving the source's plus terminal
				// into the circuit (x_k = −u).
				clearRow(g, br)
				g.Set(br, br, 1)
				b[br] = -1
				return
			}
			if p >= 0 {
				b[p] += 1
			}
			if m >= 0 {
				b[m] -= 1
			}
		})
	}

	// Output.
	if outIsCurrent {
		if op.branch >= 0 {
			k := op.branch // a voltage source is already a short
			extra = append(extra, func(_ *mat.Dense, _, out []float64) { out[k] = 1 })
		} else {
			k := grow()
			p, m := op.plus, op.minus
			extra = append(extra, func(g *mat.Dense, _, out []float64) {
				voltageBranch(g, p, m, k)
				out[k] = 1
			})
		}
	} else {
		p, m, br := op.plus, op.minus, op.branch
		sameAsDrive := op == dp
		extra = append(extra, func(g *mat.Dense, _, out []float64) {
			if br >= 0 && !sameAsDrive {
				// A voltage-source port observed as a voltage is opened.
				clearRow(g, br)
				g.Set(br, br, 1)
			}
			if p >= 0 {
				out[p] += 1
			}
			if m >= 0 {
				out[m] -= 1
			}
		})
	}

	// Zero the other port for output impedance: short a node pair (a
	// voltage source already is one; a current source stays open).
	if t.Kind == cases.OutputImpedance && fp != tp && fp.source == nil {
		k := grow()
		p, m := fp.plus, fp.minus
		extra = append(extra, func(g *mat.Dense, _, _ []float64) { voltageBranch(g, p, m, k) })
	}

	g := mat.NewDense(n, n, nil)
	cm := mat.NewDense(n, n, nil)
	for _, e := range sys.G {
		g.Set(e.Row, e.Col, g.At(e.Row, e.Col)+e.Value)
	}
	for _, e := range sys.C {
		cm.Set(e.Row, e.Col, cm.At(e.Row, e.Col)+e.Value)
	}
	b := make([]float64, n)
	out := make([]float64, n)
	for _, f := range extra {
		f(g, b, out)
	}
	return &Problem{G: g, C: cm, B: b, Out: out, Layout: l}, nil
}

func findPort(c *cases.Circuit, name string) (*cases.Port, error) {
	for _, p := range c.Ports {
		if p.Name == name {
			return p, nil
		}
	}
	return nil, fmt.Errorf("ac: no port %q", name)
}

// SourcePort returns p, or, when p is a node pair that is exactly the
// terminals of a voltage source (same orientation), a copy of p naming
// that source: the zeroed source would otherwise short any test source
// put across the pair, so the pair is the source's port.
func SourcePort(c *cases.Circuit, p *cases.Port) *cases.Port {
	if p.Source != "" {
		return p
	}
	for _, part := range c.Parts {
		if part.Kind == cases.VoltageSource && part.Nodes[0] == p.Plus && part.Nodes[1] == p.Minus {
			q := *p
			q.Source = part.Name
			return &q
		}
	}
	return p
}

// locate finds a port's unknowns. For a source port (see SourcePort),
// plus and minus are the nodes the source drives: a voltage source's plus
// and minus, a current source's to and from (its current enters the
// circuit at to).
func locate(sys *mna.System, c *cases.Circuit, p *cases.Port) (portNodes, error) {
	pn := portNodes{branch: -1}
	p = SourcePort(c, p)
	if p.Source != "" {
		for k, part := range c.Parts {
			if part.Name != p.Source {
				continue
			}
			t := sys.Terminals[k]
			pn.source = part
			switch part.Kind {
			case cases.VoltageSource:
				pn.plus, pn.minus = t[0], t[1]
				pn.branch, _ = sys.Layout.Branch(part.Name)
			case cases.CurrentSource:
				pn.plus, pn.minus = t[1], t[0]
			default:
				return pn, fmt.Errorf("ac: port %s: %s is not an independent source", p.Name, part.Name)
			}
			return pn, nil
		}
		return pn, fmt.Errorf("ac: port %s: no source %q", p.Name, p.Source)
	}
	var ok1, ok2 bool
	pn.plus, ok1 = sys.Layout.Node(p.Plus)
	pn.minus, ok2 = sys.Layout.Node(p.Minus)
	if !ok1 || !ok2 {
		return pn, fmt.Errorf("ac: port %s: unknown node", p.Name)
	}
	return pn, nil
}

func voltageBranch(g *mat.Dense, plus, minus, k int) {
	mna.VoltageBranch(denseAdder{g}, plus, minus, k)
}

func clearRow(g *mat.Dense, i int) {
	_, c := g.Dims()
	for j := 0; j < c; j++ {
		g.Set(i, j, 0)
	}
}

// denseAdder lets the mna primitives stamp into a dense matrix.
type denseAdder struct{ m *mat.Dense }

func (d denseAdder) Add(i, j int, v float64) { d.m.Set(i, j, d.m.At(i, j)+v) }
