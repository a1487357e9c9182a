package ac

import (
	"math"
	"math/cmplx"
	"testing"

	"tangent/cases"
)

// evalProblem solves (G + sC)x = B densely in complex arithmetic and returns
// Out·x: a test-only reference independent of the pencil code.
func evalProblem(t *testing.T, p *Problem, s complex128) complex128 {
	t.Helper()
	n, _ := p.G.Dims()
	a := make([][]complex128, n)
	for i := range a {
		a[i] = make([]complex128, n+1)
		for j := 0; j < n; j++ {
			a[i][j] = complex(p.G.At(i, j), 0) + s*complex(p.C.At(i, j), 0)
		}
		a[i][n] = complex(p.B[i], 0)
	}
	// Gaussian elimination with partial pivoting.
	for k := 0; k < n; k++ {
		piv := k
		for i := k + 1; i < n; i++ {
			if cmplx.Abs(a[i][k]) > cmplx.Abs(a[piv][k]) {
				piv = i
			}
		}
		a[k], a[piv] = a[piv], a[k]
		if a[k][k] == 0 {
			t.Fatalf("singular at column %d", k)
		}
		for i := k + 1; i < n; i++ {
			f := a[i][k] / a[k][k]
			for j := k; j <= n; j++ {
				a[i][j] -= f * a[k][j]
			}
		}
	}
	x := make([]complex128, n)
	for i := n - 1; i >= 0; i-- {
		sum := a[i][n]
		for j := i + 1; j < n; j++ {
			sum -= a[i][j] * x[j]
		}
		x[i] = sum / a[i][i]
	}
	var y complex128
	for i, o := range p.Out {
		y += complex(o, 0) * x[i]
	}
	return y
}

func linearCase(parts []*cases.Part, ports []*cases.Port) *cases.Circuit {
	c := &cases.Circuit{Parts: parts, Ports: ports}
	seen := map[string]bool{}
	for _, p := range parts {
		for _, n := range p.Nodes {
			if n != cases.Ground && !seen[n] {
				seen[n] = true
				c.Nodes = append(c.Nodes, n)
			}
		}
	}
	return c
}

// A divider R1 = 1 kΩ (in–out), R2 = 3 kΩ (out–gnd), C = 1 µF across R2,
// driven by source V1 at "in". Every expected value follows from Ohm's law
// and the impedance of a capacitor, 1/(sC) (circuit theory, closed form).
func TestSetupKinds(t *testing.T) {
	const r1, r2, cv = 1e3, 3e3, 1e-6
	parts := []*cases.Part{
		{Name: "V1", Kind: cases.VoltageSource, DC: 5, Nodes: []string{"in", "gnd"}},
		{Name: "R1", Kind: cases.Resistor, Value: r1, Nodes: []string{"in", "out"}},
		{Name: "R2", Kind: cases.Resistor, Value: r2, Nodes: []string{"out", "gnd"}},
		{Name: "C1", Kind: cases.Capacitor, Value: cv, Nodes: []string{"out", "gnd"}},
	}
	ports := []*cases.Port{
		{Name: "src", Source: "V1"},
		{Name: "in", Plus: "in", Minus: "gnd"},
		{Name: "out", Plus: "out", Minus: "gnd"},
	}
	c := linearCase(parts, ports)
	s := complex(0, 2*math.Pi*100)
	z2 := 1 / (1/complex(r2, 0) + s*cv) // R2 ∥ C
	par := func(a, b complex128) complex128 { return a * b / (a + b) }
	tests := []struct {
		from, to string
		kind     cases.TransferKind
		want     complex128
	}{
		{"src", "out", cases.VoltageGain, z2 / (r1 + z2)},
		{"in", "out", cases.VoltageGain, z2 / (r1 + z2)}, // node pair on V1's terminals is V1's port
		{"in", "out", cases.InputImpedance, r1 + z2},
		{"src", "out", cases.Transconductance, 1 / complex(r1, 0)}, // output shorted
		{"src", "out", cases.InputImpedance, r1 + z2},              // V1 replaced by the test current
		{"src", "out", cases.OutputImpedance, par(r1, z2)},         // V1 shorted
		{"src", "out", cases.Transimpedance, z2},                   // source opened by the current drive
		{"src", "out", cases.CurrentGain, 1},                       // all test current leaves through the short
	}
	for _, tt := range tests {
		p, err := Setup(c, &cases.Transfer{From: tt.from, To: tt.to, Kind: tt.kind})
		if err != nil {
			t.Fatalf("%s %s→%s: %v", tt.kind, tt.from, tt.to, err)
		}
		got := evalProblem(t, p, s)
		if cmplx.Abs(got-tt.want) > 1e-12*cmplx.Abs(tt.want) {
			t.Errorf("%s %s→%s: H = %v, want %v", tt.kind, tt.from, tt.to, got, tt.want)
		}
	}
}

// A current-source port drives the node its current enters (to); for a
// transimpedance the current source's port is driven by the test current.
func TestSetupCurrentSourcePort(t *testing.T) {
	parts := []*cases.Part{
		{Name: "I1", Kind: cases.CurrentSource, DC: 1e-3, Nodes: []string{"gnd", "n"}},
		{Name: "R1", Kind: cases.Resistor, Value: 2e3, Nodes: []string{"n", "gnd"}},
	}
	c := linearCase(parts, []*cases.Port{{Name: "sig", Source: "I1"}, {Name: "n", Plus: "n", Minus: "gnd"}})
	p, err := Setup(c, &cases.Transfer{From: "sig", To: "n", Kind: cases.Transimpedance})
	if err != nil {
		t.Fatal(err)
	}
	if got := evalProblem(t, p, 0); cmplx.Abs(got-2e3) > 1e-9 {
		t.Errorf("transimpedance = %v, want 2000 Ω (Ohm's law)", got)
	}
	// Output impedance at n with the current-source port open: R1.
	p, err = Setup(c, &cases.Transfer{From: "sig", To: "n", Kind: cases.OutputImpedance})
	if err != nil {
		t.Fatal(err)
	}
	if got := evalProblem(t, p, 0); cmplx.Abs(got-2e3) > 1e-9 {
		t.Errorf("output impedance = %v, want 2000 Ω", got)
	}
}
