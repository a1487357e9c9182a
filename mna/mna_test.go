package mna

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"tangent/cases"
)

// solveDC solves G·x = b densely; a test-only helper.
func solveDC(t *testing.T, s *System) []float64 {
	t.Helper()
	n := s.Layout.Size()
	g := mat.NewDense(n, n, nil)
	for _, e := range s.G {
		g.Set(e.Row, e.Col, g.At(e.Row, e.Col)+e.Value)
	}
	var x mat.VecDense
	if err := x.SolveVec(g, mat.NewVecDense(n, append([]float64(nil), s.DC...))); err != nil {
		t.Fatal(err)
	}
	return x.RawVector().Data
}

func part(name string, k cases.Kind, v float64, nodes ...string) *cases.Part {
	return &cases.Part{Name: name, Kind: k, Value: v, DC: v, Nodes: nodes}
}

// The circuits below are solved by hand (Ohm's and Kirchhoff's laws).
func TestBuildDC(t *testing.T) {
	tests := []struct {
		name  string
		parts []*cases.Part
		node  string  // node whose voltage is checked
		want  float64 // V
		part  string  // part whose current is checked
		iwant float64 // A, into its first terminal
	}{
		{
			name: "divider", // 10 V · 3k/(1k+3k) = 7.5 V; source current −10/4k
			parts: []*cases.Part{
				part("V1", cases.VoltageSource, 10, "in", "gnd"),
				part("R1", cases.Resistor, 1e3, "in", "out"),
				part("R2", cases.Resistor, 3e3, "out", "gnd"),
			},
			node: "out", want: 7.5, part: "V1", iwant: -2.5e-3,
		},
		{
			name: "current source into resistor", // 1 mA pushed into node n through 2k: 2 V
			parts: []*cases.Part{
				part("I1", cases.CurrentSource, 1e-3, "gnd", "n"),
				part("R1", cases.Resistor, 2e3, "n", "gnd"),
			},
			node: "n", want: 2, part: "R1", iwant: 1e-3,
		},
		{
			name: "inductor is a DC short, capacitor open",
			parts: []*cases.Part{
				part("V1", cases.VoltageSource, 5, "in", "gnd"),
				part("L1", cases.Inductor, 1e-3, "in", "mid"),
				part("C1", cases.Capacitor, 1e-6, "mid", "gnd"),
				part("R1", cases.Resistor, 1e3, "mid", "gnd"),
			},
			node: "mid", want: 5, part: "L1", iwant: 5e-3,
		},
		{
			name: "vcvs gain 4 on a divider", // 1 V · ½ · 4 = 2 V
			parts: []*cases.Part{
				part("V1", cases.VoltageSource, 1, "in", "gnd"),
				part("R1", cases.Resistor, 1e3, "in", "c"),
				part("R2", cases.Resistor, 1e3, "c", "gnd"),
				part("E1", cases.VCVS, 4, "out", "gnd", "c", "gnd"),
				part("RL", cases.Resistor, 1e3, "out", "gnd"),
			},
			node: "out", want: 2, part: "E1", iwant: -2e-3,
		},
		{
			name: "cccs sensing a resistor", // I(R1) = 1 mA; F1 pushes 10 mA from gnd into o through 100 Ω: 1 V
			parts: []*cases.Part{
				part("V1", cases.VoltageSource, 1, "in", "gnd"),
				part("R1", cases.Resistor, 1e3, "in", "gnd"),
				{Name: "F1", Kind: cases.CCCS, Value: 10, Control: "R1", Nodes: []string{"gnd", "o"}},
				part("R2", cases.Resistor, 100, "o", "gnd"),
			},
			node: "o", want: 1, part: "R1", iwant: 1e-3,
		},
		{
			name: "ccvs sensing a source", // V1 current −1 mA; H1 = 2k·I = −2 V
			parts: []*cases.Part{
				part("V1", cases.VoltageSource, 1, "in", "gnd"),
				part("R1", cases.Resistor, 1e3, "in", "gnd"),
				{Name: "H1", Kind: cases.CCVS, Value: 2e3, Control: "V1", Nodes: []string{"o", "gnd"}},
				part("R2", cases.Resistor, 100, "o", "gnd"),
			},
			node: "o", want: -2, part: "V1", iwant: -1e-3,
		},
		{
			name: "vccs", // 1 V · 2 mS pushed from gnd into o through 1k: 2 V
			parts: []*cases.Part{
				part("V1", cases.VoltageSource, 1, "in", "gnd"),
				part("G1", cases.VCCS, 2e-3, "gnd", "o", "in", "gnd"),
				part("R2", cases.Resistor, 1e3, "o", "gnd"),
			},
			node: "o", want: 2, part: "G1", iwant: 2e-3,
		},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			c := &cases.Circuit{Parts: tt.parts}
			for _, p := range tt.parts {
				for _, n := range p.Nodes {
					if n != cases.Ground {
						c.Nodes = append(c.Nodes, n)
					}
				}
			}
			s, err := Build(c)
			if err != nil {
				t.Fatal(err)
			}
			x := solveDC(t, s)
			i, _ := s.Layout.Node(tt.node)
			if got := x[i]; math.Abs(got-tt.want) > 1e-12 {
				t.Errorf("V(%s) = %g, want %g", tt.node, got, tt.want)
			}
			for k, p := range tt.parts {
				if p.Name == tt.part {
					if got := s.PartCurrent(k, p, x); math.Abs(got-tt.iwant) > 1e-15 {
						t.Errorf("I(%s) = %g, want %g", p.Name, got, tt.iwant)
					}
				}
			}
		})
	}
}
