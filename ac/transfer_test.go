package ac

import (
	"math"
	"math/cmplx"
	"testing"

	"tangent/cases"
)

// A resistive T network, R1 (p1–m), R2 (m–p2), R3 (m–gnd): its z
// parameters are z11 = R1 + R3, z22 = R2 + R3, z12 = z21 = R3 (circuit
// theory, closed form). A source at port 1 is removed for the two-port.
func TestTwoPortT(t *testing.T) {
	const r1, r2, r3 = 100.0, 220.0, 1e3
	parts := []*cases.Part{
		{Name: "V1", Kind: cases.VoltageSource, DC: 1, Nodes: []string{"p1", "gnd"}},
		{Name: "R1", Kind: cases.Resistor, Value: r1, Nodes: []string{"p1", "m"}},
		{Name: "R2", Kind: cases.Resistor, Value: r2, Nodes: []string{"m", "p2"}},
		{Name: "R3", Kind: cases.Resistor, Value: r3, Nodes: []string{"m", "gnd"}},
	}
	c := linearCase(parts, []*cases.Port{
		{Name: "a", Source: "V1", Plus: "p1", Minus: "gnd"},
		{Name: "b", Plus: "p2", Minus: "gnd"},
	})
	z, err := TwoPortAt(c, "a", "b", 1e3)
	if err != nil {
		t.Fatal(err)
	}
	want := [2][2]complex128{{r1 + r3, r3}, {r3, r2 + r3}}
	for i := range want {
		for j := range want[i] {
			if cmplx.Abs(z.M[i][j]-want[i][j]) > 1e-9*cmplx.Abs(want[i][j]) {
				t.Errorf("z%d%d = %v, want %v", i+1, j+1, z.M[i][j], want[i][j])
			}
		}
	}
}

// First-order RC low-pass through Analyse: DC gain 1, f_high = 1/(2πRC)
// (closed form), the response on the asked frequencies equal to
// 1/(1 + jωRC).
func TestAnalyseRC(t *testing.T) {
	const r, cv = 1e3, 1e-6
	parts := []*cases.Part{
		{Name: "V1", Kind: cases.VoltageSource, Nodes: []string{"in", "gnd"}},
		{Name: "R1", Kind: cases.Resistor, Value: r, Nodes: []string{"in", "out"}},
		{Name: "C1", Kind: cases.Capacitor, Value: cv, Nodes: []string{"out", "gnd"}},
	}
	c := linearCase(parts, []*cases.Port{{Name: "in", Source: "V1"}, {Name: "out", Plus: "out", Minus: "gnd"}})
	f := []float64{10, 159.15494309189535, 1e4}
	res, err := Analyse(c, &cases.Transfer{From: "in", To: "out", Kind: cases.VoltageGain}, f)
	if err != nil {
		t.Fatal(err)
	}
	if g, ok := res.Rational.DCGain(); !ok || math.Abs(g-1) > 1e-12 {
		t.Errorf("DC gain %g (ok %v), want 1", g, ok)
	}
	fc := 1 / (2 * math.Pi * r * cv)
	if h := res.Bandwidth.HighHz; h == nil || math.Abs(*h-fc) > 1e-9*fc {
		t.Errorf("f_high = %v, want %g", h, fc)
	}
	for i, fi := range f {
		want := 1 / complex(1, 2*math.Pi*fi*r*cv)
		if cmplx.Abs(res.Response[i]-want) > 1e-12 {
			t.Errorf("H(%g Hz) = %v, want %v", fi, res.Response[i], want)
		}
	}
	if res.UnityGainHz != nil {
		t.Errorf("a passive low-pass never crosses |H| = 1 above DC, got %g Hz", *res.UnityGainHz)
	}
}
