package smallsignal_test

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"tangent/ac"
	"tangent/cases"
	"tangent/dc"
	"tangent/smallsignal"
)

// dcGain solves the linear equivalent's problem at s = 0.
func dcGain(t *testing.T, eq *cases.Circuit, tr *cases.Transfer) float64 {
	t.Helper()
	p, err := ac.Setup(eq, tr)
	if err != nil {
		t.Fatal(err)
	}
	var x mat.VecDense
	if err := x.SolveVec(p.G, mat.NewVecDense(len(p.B), p.B)); err != nil {
		// G singular: H has a pole at s = 0 and no DC gain to compare.
		t.Skipf("no DC gain: %v", err)
	}
	return mat.Dot(mat.NewVecDense(len(p.Out), p.Out), &x)
}

// probe builds the large-signal counterpart of a transfer: a copy of the
// circuit whose input is pushed by u (V or A) away from the bias, with the
// output read as DESIGN.md's small-signal conventions ask (an open port
// reads its voltage; a shorted port is held at its bias voltage by a
// source whose current is read). It returns the circuit and a function
// reading the output from its operating point.
func probe(t *testing.T, c *cases.Circuit, op *dc.OperatingPoint, tr *cases.Transfer, u float64) (*cases.Circuit, func(*dc.OperatingPoint) float64) {
	t.Helper()
	port := func(name string) *cases.Port {
		for _, p := range c.Ports {
			if p.Name == name {
				return p
			}
		}
		t.Fatalf("no port %s", name)
		return nil
	}
	volt := func(o *dc.OperatingPoint, n string) float64 {
		v, ok := o.Node(n)
		if !ok {
			t.Fatalf("no node %s", n)
		}
		return v
	}
	q := *c
	q.Parts = nil
	for _, p := range c.Parts {
		cp := *p
		q.Parts = append(q.Parts, &cp)
	}
	find := func(name string) *cases.Part {
		for _, p := range q.Parts {
			if p.Name == name {
				return p
			}
		}
		t.Fatalf("no part %s", name)
		return nil
	}
	in, out := port(tr.From), port(tr.To)
	currentDrive := map[cases.TransferKind]bool{cases.CurrentGain: true, cases.Transimpedance: true,
		cases.InputImpedance: true, cases.OutputImpedance: true}[tr.Kind]
	drive := in
	if tr.Kind == cases.OutputImpedance {
		drive = out
	}
	// Drive.
	switch {
	case drive.Source != "" && !currentDrive:
		find(drive.Source).DC += u
	case drive.Source != "" && find(drive.Source).Kind == cases.CurrentSource:
		find(drive.Source).DC += u
	case drive.Source != "":
		t.Skipf("current drive in place of voltage source %s", drive.Source)
	case currentDrive:
		q.Parts = append(q.Parts, &cases.Part{Name: "probe_in", Kind: cases.CurrentSource, DC: u,
			Nodes: []string{drive.Minus, drive.Plus}})
	default:
		q.Parts = append(q.Parts, &cases.Part{Name: "probe_in", Kind: cases.VoltageSource,
			DC: volt(op, drive.Plus) - volt(op, drive.Minus) + u, Nodes: []string{drive.Plus, drive.Minus}})
	}
	// Output impedance: hold a node-pair from port at its bias voltage.
	if tr.Kind == cases.OutputImpedance && in.Source == "" {
		q.Parts = append(q.Parts, &cases.Part{Name: "probe_hold", Kind: cases.VoltageSource,
			DC: volt(op, in.Plus) - volt(op, in.Minus), Nodes: []string{in.Plus, in.Minus}})
	}
	obs := out
	if tr.Kind == cases.InputImpedance {
		obs = in
	}
	if tr.Kind == cases.CurrentGain || tr.Kind == cases.Transconductance {
		if out.Source != "" {
			t.Skipf("current output at source port %s", out.Source)
		}
		hold := &cases.Part{Name: "probe_out", Kind: cases.VoltageSource,
			DC: volt(op, out.Plus) - volt(op, out.Minus), Nodes: []string{out.Plus, out.Minus}}
		q.Parts = append(q.Parts, hold)
		return &q, func(o *dc.OperatingPoint) float64 { return o.Part("probe_out").Current }
	}
	if obs.Source != "" && obs != drive {
		t.Skipf("voltage output at source port %s", obs.Source)
	}
	plus, minus := obs.Plus, obs.Minus
	if obs.Source != "" {
		p := find(obs.Source)
		plus, minus = p.Nodes[0], p.Nodes[1]
		if p.Kind == cases.CurrentSource {
			plus, minus = p.Nodes[1], p.Nodes[0]
		}
	}
	return &q, func(o *dc.OperatingPoint) float64 { return volt(o, plus) - volt(o, minus) }
}

// The DC small-signal gain of the linear equivalent must equal the slope
// of the large-signal DC transfer curve (central difference of two bias
// solves): the definition of linearization (first-order Taylor expansion).
func TestDCGainEqualsSlope(t *testing.T) {
	extra := map[string][]*cases.Transfer{
		// Device-level transfers that the coupling capacitors of the
		// examples' own transfers would block at DC.
		"ce_amplifier": {
			{From: "base", To: "col", Kind: cases.VoltageGain},
			{From: "base", To: "col", Kind: cases.Transconductance},
			{From: "base", To: "col", Kind: cases.InputImpedance},
			{From: "base", To: "col", Kind: cases.OutputImpedance},
			{From: "base", To: "col", Kind: cases.CurrentGain},
			{From: "base", To: "col", Kind: cases.Transimpedance},
		},
		"cs_mirror":         {{From: "gate", To: "out", Kind: cases.VoltageGain}, {From: "gate", To: "out", Kind: cases.OutputImpedance}},
		"diode_thermometer": {{From: "supply", To: "sense", Kind: cases.VoltageGain}},
	}
	for _, name := range cases.Examples() {
		c, err := cases.Example(name)
		if err != nil {
			t.Fatal(err)
		}
		// Tight tolerances so that solver error stays far below the
		// central-difference error.
		c.Solver.RelativeTolerance, c.Solver.VoltageTolerance, c.Solver.CurrentTolerance = 1e-12, 1e-12, 1e-16
		ports := append([]*cases.Port(nil), c.Ports...)
		for _, tr := range extra[name] {
			for _, n := range []string{tr.From, tr.To} {
				if !hasPort(ports, n) {
					ports = append(ports, &cases.Port{Name: n, Plus: n, Minus: cases.Ground})
				}
			}
		}
		c.Ports = ports
		op, err := dc.Solve(c)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		eq, err := smallsignal.Linearize(op)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		for _, tr := range append(append([]*cases.Transfer(nil), c.Transfers...), extra[name]...) {
			t.Run(fmt.Sprintf("%s/%s_%s_%s", name, tr.Kind, tr.From, tr.To), func(t *testing.T) {
				want := dcGain(t, eq.Circuit, tr)
				h := 1e-4 // V, or A scaled below
				if tr.Kind == cases.CurrentGain || tr.Kind == cases.Transimpedance || tr.Kind == cases.InputImpedance || tr.Kind == cases.OutputImpedance {
					h = 1e-7
				}
				y := [2]float64{}
				for i, u := range []float64{h, -h} {
					q, read := probe(t, c, op, tr, u)
					o, err := dc.SolveFrom(q, op)
					if err != nil {
						t.Fatal(err)
					}
					y[i] = read(o)
				}
				got := (y[0] - y[1]) / (2 * h)
				if math.Abs(got-want) > 1e-5*math.Abs(want)+1e-12 {
					t.Errorf("slope %.10g, small-signal gain %.10g (rel. diff %.2g)", got, want, math.Abs(got-want)/math.Abs(want))
				}
			})
		}
	}
}

func hasPort(ports []*cases.Port, name string) bool {
	for _, p := range ports {
		if p.Name == name {
			return true
		}
	}
	return false
}
