package ac

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"tangent/cases"
)

// part builds a part; value is the principal quantity (Ω, F, H, S, V/V).
func part(name string, kind cases.Kind, value float64, nodes ...string) *cases.Part {
	return &cases.Part{Name: name, Kind: kind, Value: value, Nodes: nodes}
}

// setup builds the problem of one transfer on a linear circuit.
func setup(t testing.TB, parts []*cases.Part, ports []*cases.Port, from, to string, kind cases.TransferKind) *Problem {
	t.Helper()
	p, err := Setup(linearCase(parts, ports), &cases.Transfer{From: from, To: to, Kind: kind})
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// voltageDriven wraps parts with a source V1 at "in" and the ports src
// and out (node "out").
func voltageDriven(t testing.TB, parts ...*cases.Part) *Problem {
	t.Helper()
	all := append([]*cases.Part{{Name: "V1", Kind: cases.VoltageSource, Nodes: []string{"in", "gnd"}}}, parts...)
	return setup(t, all, []*cases.Port{{Name: "src", Source: "V1"}, {Name: "out", Plus: "out", Minus: "gnd"}},
		"src", "out", cases.VoltageGain)
}

func relErr(got, want complex128) float64 {
	if want == 0 {
		return cmplx.Abs(got)
	}
	return cmplx.Abs(got-want) / cmplx.Abs(want)
}

// checkRoots compares root lists, matching each wanted root with the
// nearest unmatched one (roots of equal modulus make sorted order
// fragile), to a relative tolerance.
func checkRoots(t *testing.T, what string, got, want []complex128, tol float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: got %d roots %v, want %d %v", what, len(got), got, len(want), want)
	}
	used := make([]bool, len(got))
	for _, w := range want {
		best := -1
		for i, g := range got {
			if !used[i] && (best < 0 || cmplx.Abs(g-w) < cmplx.Abs(got[best]-w)) {
				best = i
			}
		}
		used[best] = true
		if e := relErr(got[best], w); e > tol || math.IsNaN(e) {
			t.Errorf("%s: root %v, want %v (relative error %.2g > %.2g)", what, got[best], w, e, tol)
		}
	}
}

// checkTidy checks the promised form of a root list: sorted, every
// complex root with its exact conjugate.
func checkTidy(t *testing.T, what string, r []complex128) {
	t.Helper()
	s := append([]complex128(nil), r...)
	sortRoots(s)
	for i := range r {
		if r[i] != s[i] {
			t.Fatalf("%s: not sorted: %v", what, r)
		}
	}
	for i := range r {
		found := imag(r[i]) == 0
		for j := range r {
			found = found || (j != i && r[j] == cmplx.Conj(r[i]))
		}
		if !found {
			t.Fatalf("%s: root %v has no exact conjugate in %v", what, r[i], r)
		}
	}
}

// ladderButterworth is a doubly terminated LC ladder low-pass of order n
// (shunt C first) with terminations r0 and cut-off wc:
// C_k = g_k/(r0·wc), L_k = g_k·r0/wc, g_k = 2·sin((2k−1)π/(2n)).
func ladderButterworth(t testing.TB, n int, r0, wc float64) *Problem {
	parts := []*cases.Part{part("RS", cases.Resistor, r0, "in", "n0")}
	node := "n0"
	for k := 1; k <= n; k++ {
		g := 2 * math.Sin(float64(2*k-1)*math.Pi/float64(2*n))
		if k%2 == 1 {
			parts = append(parts, part(fmt.Sprintf("C%d", k), cases.Capacitor, g/(r0*wc), node, "gnd"))
		} else {
			next := fmt.Sprintf("n%d", k)
			parts = append(parts, part(fmt.Sprintf("L%d", k), cases.Inductor, g*r0/wc, node, next))
			node = next
		}
	}
	// WO, a unity vcvs, names the output node "out" and adds no root.
	parts = append(parts, part("RL", cases.Resistor, r0, node, "gnd"), part("WO", cases.VCVS, 1, "out", "gnd", node, "gnd"))
	return voltageDriven(t, parts...)
}

// rcLadder is a uniform RC ladder of n sections: R from in to n1 and
// between consecutive nodes, C from every node to ground, output at the
// last node (through a unity vcvs "out", which adds no pole).
func rcLadder(t testing.TB, n int, r, c float64) *Problem {
	var parts []*cases.Part
	prev := "in"
	for k := 1; k <= n; k++ {
		node := fmt.Sprintf("n%d", k)
		parts = append(parts, part(fmt.Sprintf("R%d", k), cases.Resistor, r, prev, node),
			part(fmt.Sprintf("C%d", k), cases.Capacitor, c, node, "gnd"))
		prev = node
	}
	parts = append(parts, part("WO", cases.VCVS, 1, "out", "gnd", prev, "gnd"))
	return voltageDriven(t, parts...)
}
