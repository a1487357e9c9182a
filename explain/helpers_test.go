package explain

import (
	"math"
	"math/cmplx"
	"testing"

	"tangent/ac"
	"tangent/cases"
	"tangent/smallsignal"
)

// part builds a part; value is the principal quantity (Ω, F, H, S, V/V).
func part(name string, kind cases.Kind, value float64, nodes ...string) *cases.Part {
	return &cases.Part{Name: name, Kind: kind, Value: value, Nodes: nodes}
}

// circuit wraps parts and ports into a linear case.
func circuit(parts []*cases.Part, ports ...*cases.Port) *cases.Circuit {
	return &cases.Circuit{File: "test", Parts: parts, Nodes: smallsignal.NodesOf(parts), Ports: ports}
}

// Hybrid-π common-emitter stage of the published textbook analysis (Gray &
// Meyer, the common-emitter frequency response; from memory): source V1
// behind RS into the base b, rπ and Cπ from b to ground, Cμ from b to the
// collector out, gm·v(b) out of out, load RL. The values are those of
// package ac's test of the same stage.
const (
	ceRS, ceRPi, ceCPi, ceCMu, ceGm, ceRL = 1e3, 2.5e3, 10e-12, 1e-12, 40e-3, 5e3
)

func commonEmitter() *cases.Circuit {
	return circuit([]*cases.Part{
		{Name: "V1", Kind: cases.VoltageSource, Nodes: []string{"in", "gnd"}},
		part("RS", cases.Resistor, ceRS, "in", "b"),
		part("Q1_r_pi", cases.Resistor, ceRPi, "b", "gnd"),
		part("Q1_c_pi", cases.Capacitor, ceCPi, "b", "gnd"),
		part("Q1_c_mu", cases.Capacitor, ceCMu, "b", "out"),
		part("Q1_gm", cases.VCCS, ceGm, "out", "gnd", "b", "gnd"),
		part("RL", cases.Resistor, ceRL, "out", "gnd"),
	}, &cases.Port{Name: "src", Source: "V1"}, &cases.Port{Name: "out", Plus: "out", Minus: "gnd"})
}

// allKinds is a circuit with one part of every kind that carries a value
// (resistor, capacitor, inductor, vcvs, vccs, cccs, ccvs), a complex pole
// pair (the series R1-L1-C1, Q = √(L/C)/R ≈ 3.2), current-controlled
// sources behind sense branches, a current-source port and a node-pair
// port. Roots are well apart, so every one is simple.
func allKinds() *cases.Circuit {
	return circuit([]*cases.Part{
		{Name: "V1", Kind: cases.VoltageSource, Nodes: []string{"in", "gnd"}},
		part("R1", cases.Resistor, 100, "in", "a"),
		part("L1", cases.Inductor, 10e-3, "a", "b"),
		part("C1", cases.Capacitor, 100e-9, "b", "gnd"),
		part("E1", cases.VCVS, 2, "c", "gnd", "b", "gnd"),
		part("R2", cases.Resistor, 2e3, "c", "d"),
		part("C2", cases.Capacitor, 10e-9, "d", "gnd"),
		{Name: "F1", Kind: cases.CCCS, Value: 0.5, Nodes: []string{"gnd", "e"}, Control: "R2"},
		part("R3", cases.Resistor, 1e3, "e", "gnd"),
		part("C3", cases.Capacitor, 1e-9, "e", "gnd"),
		{Name: "H1", Kind: cases.CCVS, Value: 500, Nodes: []string{"f", "gnd"}, Control: "R3"},
		part("R4", cases.Resistor, 1e3, "f", "out"),
		part("C4", cases.Capacitor, 2e-9, "out", "gnd"),
		part("L2", cases.Inductor, 1, "out", "gnd"),
		part("G1", cases.VCCS, 1e-3, "out", "gnd", "e", "gnd"),
		part("R5", cases.Resistor, 10e3, "out", "gnd"),
		{Name: "I1", Kind: cases.CurrentSource, Nodes: []string{"gnd", "e"}},
	}, &cases.Port{Name: "src", Source: "V1"}, &cases.Port{Name: "out", Plus: "out", Minus: "gnd"},
		&cases.Port{Name: "isrc", Source: "I1"}, &cases.Port{Name: "mid", Plus: "d", Minus: "gnd"})
}

// withValue returns a copy of c with part name's value set to v.
func withValue(c *cases.Circuit, name string, v float64) *cases.Circuit {
	q := *c
	q.Parts = make([]*cases.Part, len(c.Parts))
	for i, p := range c.Parts {
		if p.Name == name {
			pp := *p
			pp.Value = v
			p = &pp
		}
		q.Parts[i] = p
	}
	return &q
}

func explainOf(t *testing.T, c *cases.Circuit, from, to string, kind cases.TransferKind) *Explanation {
	t.Helper()
	x, err := Explain(c, &cases.Transfer{From: from, To: to, Kind: kind}, Options{Devices: []string{"Q1"}})
	if err != nil {
		t.Fatal(err)
	}
	return x
}

func problemOf(t *testing.T, c *cases.Circuit, from, to string, kind cases.TransferKind) *ac.Problem {
	t.Helper()
	p, err := ac.Setup(c, &cases.Transfer{From: from, To: to, Kind: kind})
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// sensOf returns root r's sensitivity to element i (0 when not listed).
func sensOf(r Root, i int) complex128 {
	for _, s := range r.Sens {
		if s.Element == i {
			return s.S
		}
	}
	return 0
}

// nearest returns the root of rs nearest to r.
func nearest(rs []complex128, r complex128) complex128 {
	best := rs[0]
	for _, q := range rs {
		if cmplx.Abs(q-r) < cmplx.Abs(best-r) {
			best = q
		}
	}
	return best
}

func relErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

func elementIndex(t *testing.T, x *Explanation, part string) int {
	t.Helper()
	for i, e := range x.Elements {
		if e.Part == part {
			return i
		}
	}
	t.Fatalf("no element %s", part)
	return -1
}
