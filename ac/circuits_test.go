package ac

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"tangent/cases"
)

// Poles and zeros of small circuits whose structure exercises the
// reduction: zeros at the origin of several orders, zeros on the
// imaginary axis, floating capacitors, an improper transfer, a pole at
// the origin, a voltage source driving a capacitor. Each against its
// closed form (circuit theory, derivation in the comment), and the
// factored H against a direct solve.
func TestCircuitRoots(t *testing.T) {
	vs := &cases.Part{Name: "V1", Kind: cases.VoltageSource, Nodes: []string{"in", "gnd"}}
	ports := []*cases.Port{{Name: "src", Source: "V1"}, {Name: "out", Plus: "out", Minus: "gnd"}}
	// CR–CR high-pass: H = s²·R1C1R2C2/(s²·R1C1R2C2 + s·(R1C1 + R2C2 + R1C2) + 1)
	// (nodal analysis of the two-section ladder, closed form).
	const c1, r1, c2, r2 = 1e-6, 1e3, 1e-7, 1e4
	b2, b1 := r1*c1*r2*c2, r1*c1+r2*c2+r1*c2
	q := -(b1 + math.Sqrt(b1*b1-4*b2)) / 2
	// Twin-T with R, R, C3 = 2C (low-pass T) and C, C, R3 = R/2 (high-pass
	// T): a notch, zeros ±j/(RC) (any filter text; from memory).
	const rt, ct = 1e4, 1e-8
	tests := []struct {
		name         string
		p            *Problem
		poles, zeros []complex128
	}{
		{"CR-CR high-pass", voltageDriven(t, part("C1", cases.Capacitor, c1, "in", "a"), part("R1", cases.Resistor, r1, "a", "gnd"),
			part("C2", cases.Capacitor, c2, "a", "out"), part("R2", cases.Resistor, r2, "out", "gnd")),
			[]complex128{complex(q/b2, 0), complex(1/q, 0)}, []complex128{0, 0}},
		{"twin-T notch", voltageDriven(t, part("R1", cases.Resistor, rt, "in", "a"), part("R2", cases.Resistor, rt, "a", "out"),
			part("C3", cases.Capacitor, 2*ct, "a", "gnd"), part("C1", cases.Capacitor, ct, "in", "b"),
			part("C2", cases.Capacitor, ct, "b", "out"), part("R3", cases.Resistor, rt/2, "b", "gnd")),
			nil, []complex128{complex(0, 1/(rt*ct)), complex(0, -1/(rt*ct))}},
		// Output current through a short at out, fed through R ∥ C:
		// Y = 1/R + s·C, one zero −1/(RC) and no pole (improper).
		{"transconductance of R∥C", setup(t, []*cases.Part{vs, part("C1", cases.Capacitor, 1e-9, "in", "out"),
			part("R1", cases.Resistor, 1e3, "in", "out"), part("R2", cases.Resistor, 10, "out", "gnd")},
			ports, "src", "out", cases.Transconductance), nil, []complex128{-1e6}},
		// Z = R + 1/(s·C) = (1 + s·RC)/(s·C).
		{"input impedance of series R–C", setup(t, []*cases.Part{vs, part("R1", cases.Resistor, 1e3, "in", "out"),
			part("C1", cases.Capacitor, 1e-9, "out", "gnd")}, ports, "src", "out", cases.InputImpedance),
			[]complex128{0}, []complex128{-1e6}},
		// Floating capacitors C1 (a–b) and C2 (b–c), R1 from the source to
		// a, R2 from c to ground, R3 from b to out, R4 from out to ground:
		// v_out ∝ v_b vanishes where C1 blocks (s = 0) and where the
		// branch R2 + 1/(s·C2) from b to ground is a short,
		// s = −1/(R2·C2) (circuit theory, closed form).
		{"series capacitors", voltageDriven(t, part("R1", cases.Resistor, 1e3, "in", "a"), part("C1", cases.Capacitor, 1e-9, "a", "b"),
			part("C2", cases.Capacitor, 2e-9, "b", "c"), part("R2", cases.Resistor, 1e3, "c", "gnd"),
			part("R3", cases.Resistor, 5e3, "b", "out"), part("R4", cases.Resistor, 5e3, "out", "gnd")),
			nil, []complex128{0, -1 / (1e3 * 2e-9)}},
		// AC-coupled common-emitter stage (hybrid-π rπ, Cπ, gm; no Cμ)
		// with an emitter bypass: CIN and COUT block DC, a double zero at
		// the origin, and the output vanishes where the emitter impedance
		// RE ∥ 1/(s·CE) is infinite, s = −1/(RE·CE) (circuit theory,
		// closed form).
		{"AC-coupled common emitter", voltageDriven(t, part("RS", cases.Resistor, 1e3, "in", "a"),
			part("CIN", cases.Capacitor, 1e-6, "a", "b"), part("RB", cases.Resistor, 8.5e3, "b", "gnd"),
			part("RPI", cases.Resistor, 5e3, "b", "e"), part("CPI", cases.Capacitor, 20e-12, "b", "e"),
			part("GM", cases.VCCS, 35e-3, "c", "e", "b", "e"), part("RC", cases.Resistor, 5.6e3, "c", "gnd"),
			part("RE", cases.Resistor, 1.2e3, "e", "gnd"), part("CE", cases.Capacitor, 100e-6, "e", "gnd"),
			part("COUT", cases.Capacitor, 1e-6, "c", "out"), part("RL", cases.Resistor, 47e3, "out", "gnd")),
			nil, []complex128{0, 0, -1 / (1.2e3 * 100e-6)}},
		// Current gain of a source with R1 across it, through C1 into a
		// short that also shorts L1: all of the current through C1 leaves
		// by the short, H = s·R1·C1/(1 + s·R1·C1). The pencil has a pole
		// at the origin (the loop of L1 and the short) and a double zero
		// there, one of which cancels it (nodal analysis, closed form).
		{"current gain through a capacitor", setup(t, []*cases.Part{{Name: "I1", Kind: cases.CurrentSource, Nodes: []string{"gnd", "in"}},
			part("R1", cases.Resistor, 1e3, "in", "gnd"), part("C1", cases.Capacitor, 1e-9, "in", "out"),
			part("L1", cases.Inductor, 1e-3, "out", "gnd")},
			[]*cases.Port{{Name: "src", Source: "I1"}, {Name: "out", Plus: "out", Minus: "gnd"}}, "src", "out", cases.CurrentGain),
			[]complex128{-1e6}, []complex128{0}},
	}
	for _, tt := range tests {
		h, err := Analyze(tt.p)
		if err != nil {
			t.Fatalf("%s: %v", tt.name, err)
		}
		if tt.poles != nil {
			checkRoots(t, tt.name+" poles", h.Poles, tt.poles, 1e-10)
		}
		if tt.zeros != nil {
			checkRoots(t, tt.name+" zeros", h.Zeros, tt.zeros, 1e-10)
			for i, z := range tt.zeros {
				if z == 0 && h.Zeros[i] != 0 {
					t.Errorf("%s: zero %v, want exactly 0", tt.name, h.Zeros[i])
				}
			}
		}
		checkTidy(t, tt.name+" poles", h.Poles)
		checkTidy(t, tt.name+" zeros", h.Zeros)
		for _, s := range []complex128{complex(0, 10), complex(0, 3e3), complex(-2e4, 5e4), complex(0, 1e6), complex(0, 1e9)} {
			if e := directErr(t, tt.p, s, h.Eval(s), 1e-10); e > 1e-10 {
				t.Errorf("%s: H(%v) relative error %.2g", tt.name, s, e)
			}
		}
	}
}

// nodeLadder returns the nodal G and C of an RC ladder with its input
// node grounded: R[k] joins node k−1 (ground for k = 0) to node k, C[k]
// goes from node k to ground.
func nodeLadder(r, c []float64) (*mat.Dense, *mat.Dense) {
	n := len(r)
	g := mat.NewDense(n, n, nil)
	cm := mat.NewDense(n, n, nil)
	for k := 0; k < n; k++ {
		g.Set(k, k, g.At(k, k)+1/r[k])
		if k > 0 {
			g.Set(k-1, k-1, g.At(k-1, k-1)+1/r[k])
			g.Set(k-1, k, -1/r[k])
			g.Set(k, k-1, -1/r[k])
		}
		cm.Set(k, k, c[k])
	}
	return g, cm
}

// Capacitors from 1 F to 1 aF on an RC ladder: three real poles near
// −1/(R·C) each, 18 decades apart; the smallest capacitance still counts.
// Reference: the tridiagonal continuant polished in 256-bit arithmetic
// (continuantRoot, as in TestPolesTwelveDecades).
func TestPolesEighteenDecades(t *testing.T) {
	p := voltageDriven(t, part("R1", cases.Resistor, 1e3, "in", "a"), part("C1", cases.Capacitor, 1, "a", "gnd"),
		part("R2", cases.Resistor, 1e3, "a", "b"), part("C2", cases.Capacitor, 1e-9, "b", "gnd"),
		part("R3", cases.Resistor, 1e3, "b", "out"), part("C3", cases.Capacitor, 1e-18, "out", "gnd"))
	poles, err := Poles(p)
	if err != nil {
		t.Fatal(err)
	}
	if len(poles) != 3 {
		t.Fatalf("poles %v, want 3", poles)
	}
	// The node equations of a, b, out (the source node is grounded).
	g, c := nodeLadder([]float64{1e3, 1e3, 1e3}, []float64{1, 1e-9, 1e-18})
	for i, s := range poles {
		ref := continuantRoot(g, c, real(s))
		if e := math.Abs(real(s)-ref) / math.Abs(ref); e > 1e-9 || imag(s) != 0 {
			t.Errorf("pole %d = %v, reference %.17g (relative error %.2g)", i, s, ref, e)
		}
	}
}

// The general path (orthogonal staircase), which PencilRoots and
// problemRoots keep for pencils that structure does not reduce, agrees
// with the reduction on circuits both can do.
func TestGeneralPathAgrees(t *testing.T) {
	for name, p := range map[string]*Problem{
		"butterworth7": ladderButterworth(t, 7, 600, 2*math.Pi*10e3),
		"ladder20":     rcLadder(t, 20, 1e3, 1e-9),
		"rc network":   rcNetwork(12, 5),
	} {
		r, err := problemRoots(p, true)
		if err != nil {
			t.Fatal(err)
		}
		gp, gz, err := generalProblemRoots(p, true)
		if err != nil {
			t.Fatal(err)
		}
		checkRoots(t, name+" poles", gp, r.poles, 1e-8)
		checkRoots(t, name+" zeros", gz, r.zeros, 1e-6)
	}
}
