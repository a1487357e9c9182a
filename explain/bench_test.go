package explain

import (
	"fmt"
	"testing"

	"tangent/cases"
)

// rcLadder is a uniform RC ladder of n sections driven by a voltage: R
// from each node to the next, C from each node to ground.
func rcLadder(n int) *cases.Circuit {
	parts := []*cases.Part{{Name: "V1", Kind: cases.VoltageSource, Nodes: []string{"in", "gnd"}}}
	prev := "in"
	for k := 1; k <= n; k++ {
		node := fmt.Sprintf("n%d", k)
		if k == n {
			node = "out"
		}
		parts = append(parts, part(fmt.Sprintf("R%d", k), cases.Resistor, 1e3, prev, node),
			part(fmt.Sprintf("C%d", k), cases.Capacitor, 1e-9, node, "gnd"))
		prev = node
	}
	return circuit(parts, &cases.Port{Name: "src", Source: "V1"}, &cases.Port{Name: "out", Plus: "out", Minus: "gnd"})
}

// BenchmarkExplainLadder explains a 60-section RC ladder: 60 poles, each
// with an O(n³) complex factorization for its eigenvectors.
func BenchmarkExplainLadder(b *testing.B) {
	c := rcLadder(60)
	tr := &cases.Transfer{From: "src", To: "out", Kind: cases.VoltageGain}
	for b.Loop() {
		if _, err := Explain(c, tr, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
