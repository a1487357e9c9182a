package dc

import (
	"math"
	"testing"

	"tangent/cases"
)

// Exact SI constants (SI Brochure, 9th edition, 2019).
const (
	boltzmann = 1.380649e-23
	charge    = 1.602176634e-19
	roomT     = 300.15 // K, 27 °C
)

var vtRoom = boltzmann * roomT / charge

// build makes a circuit from parts, with nodes in order of appearance and
// the given models.
func build(models map[string]*cases.Model, parts ...*cases.Part) *cases.Circuit {
	c := &cases.Circuit{File: "test", Temperature: roomT, Parts: parts, Models: models, Solver: cases.DefaultSolverOptions()}
	seen := map[string]bool{cases.Ground: true}
	for _, p := range parts {
		for _, n := range p.Nodes {
			if !seen[n] {
				seen[n] = true
				c.Nodes = append(c.Nodes, n)
			}
		}
	}
	for name, m := range models {
		m.Name = name
	}
	return c
}

func res(name, a, b string, ohms float64) *cases.Part {
	return &cases.Part{Name: name, Kind: cases.Resistor, Nodes: []string{a, b}, Value: ohms}
}

func vsrc(name, plus, minus string, v float64) *cases.Part {
	return &cases.Part{Name: name, Kind: cases.VoltageSource, Nodes: []string{plus, minus}, DC: v}
}

func isrc(name, from, to string, i float64) *cases.Part {
	return &cases.Part{Name: name, Kind: cases.CurrentSource, Nodes: []string{from, to}, DC: i}
}

func diode(name, model, anode, cathode string) *cases.Part {
	return &cases.Part{Name: name, Kind: cases.Diode, Model: model, Nodes: []string{anode, cathode}, Area: 1}
}

func bjt(name, model, c, b, e string) *cases.Part {
	return &cases.Part{Name: name, Kind: cases.BJT, Model: model, Nodes: []string{c, b, e}, Area: 1}
}

func mos(name, model, d, g, s, b string) *cases.Part {
	return &cases.Part{Name: name, Kind: cases.MOSFET, Model: model, Nodes: []string{d, g, s, b}, Multiplier: 1}
}

func model(device string, params map[string]float64) *cases.Model {
	return &cases.Model{Device: device, Params: params}
}

func near(got, want, rel, abs float64) bool {
	return math.Abs(got-want) <= rel*math.Abs(want)+abs
}

func nodeV(t *testing.T, op *OperatingPoint, name string) float64 {
	t.Helper()
	v, ok := op.Node(name)
	if !ok {
		t.Fatalf("no node %q", name)
	}
	return v
}

// checkBalance asserts KCL at every node from the reported terminal
// currents, to rel of the node's largest current plus abs, and that the
// powers sum to zero to rel of the largest (Tellegen's theorem: with KCL
// holding, Σ V·I over all terminals vanishes; common practice).
func checkBalance(t *testing.T, op *OperatingPoint, rel, abs float64) {
	t.Helper()
	sum := map[string]float64{}
	scale := map[string]float64{}
	var ptotal, pscale float64
	for _, p := range op.Parts {
		for _, tc := range p.Terminals {
			sum[tc.Node] += tc.Current
			scale[tc.Node] = math.Max(scale[tc.Node], math.Abs(tc.Current))
		}
		ptotal += p.Power
		pscale = math.Max(pscale, math.Abs(p.Power))
	}
	for _, n := range op.Nodes {
		r := sum[n.Name] + op.HelperConductance*n.Voltage
		if math.Abs(r) > rel*scale[n.Name]+abs {
			t.Errorf("KCL at %s: residual %g A, largest current %g A", n.Name, r, scale[n.Name])
		}
	}
	if op.HelperConductance == 0 && math.Abs(ptotal) > rel*pscale+1e-18 {
		t.Errorf("powers sum to %g W (largest %g W)", ptotal, pscale)
	}
}
