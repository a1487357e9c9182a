package explain

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"tangent/ac"
	"tangent/cases"
	"tangent/mna"
)

// The derivative stamps of elements, placed on the circuit's unknowns, are
// exactly the change of the transfer's problem matrices (ac.Setup, with its
// test branches and opened sources) per unit change of the element's
// linear parameter: ac.Setup of the circuit with x̂ + 1 less ac.Setup of
// the circuit (the stamps are linear in x̂; source: mna's stamps, and the
// check that ac.Setup numbers the circuit's unknowns as mna.Build does).
func TestStampsMatchSetup(t *testing.T) {
	c := allKinds()
	sys, err := mna.Build(c)
	if err != nil {
		t.Fatal(err)
	}
	elems, err := elements(c, sys, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, tr := range []struct {
		from, to string
		kind     cases.TransferKind
	}{
		{"src", "out", cases.VoltageGain},
		{"src", "out", cases.CurrentGain},
		{"isrc", "out", cases.Transimpedance},
		{"mid", "out", cases.Transconductance},
		{"src", "out", cases.InputImpedance},
		{"src", "out", cases.OutputImpedance},
		{"isrc", "src", cases.VoltageGain}, // a voltage-source port observed as a voltage: its row is cleared
	} {
		name := fmt.Sprintf("%s→%s %s", tr.from, tr.to, tr.kind)
		p0 := problemOf(t, c, tr.from, tr.to, tr.kind)
		if err := sameLayout(sys.Layout, p0.Layout); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		n, _ := p0.G.Dims()
		for _, e := range elems {
			v := e.Value + 1
			if e.Kind == cases.Resistor {
				v = 1 / (1/e.Value + 1)
			}
			p1 := problemOf(t, withValue(c, e.Part, v), tr.from, tr.to, tr.kind)
			for _, m := range []struct {
				what     string
				a, b     *mat.Dense
				stamp    mna.Triplets
				tol, ref float64
			}{
				{"G", p0.G, p1.G, e.dG, 1e-12, 1},
				{"C", p0.C, p1.C, e.dC, 1e-12, 1},
			} {
				want := mat.NewDense(n, n, nil)
				for _, t := range m.stamp {
					want.Set(t.Row, t.Col, want.At(t.Row, t.Col)+t.Value)
				}
				var got mat.Dense
				got.Sub(m.b, m.a)
				for i := 0; i < n; i++ {
					for j := 0; j < n; j++ {
						if d := math.Abs(got.At(i, j) - want.At(i, j)); d > m.tol*m.ref {
							t.Errorf("%s: %s: ∂%s[%d,%d] = %g by Setup, %g by the stamp", name, e.Part, m.what, i, j, got.At(i, j), want.At(i, j))
						}
					}
				}
			}
		}
	}
}

// Euler's theorem on homogeneous functions. Scaling every capacitance and
// inductance by k scales every root by 1/k, so Σ S over them is −1 (and
// the imaginary parts sum to 0). Scaling every admittance by α (G, gm, C
// by α; L and transresistances by 1/α; dimensionless gains fixed) leaves
// every root in place (impedance scaling; common result of network
// theory, from memory), so with the first identity
//
//	Σ_G S + Σ_gm S − Σ_rm S − 2·Σ_L S = +1,   S_G = −S_R,
//
// which for an RC-gm circuit is the brief's "conductances and
// transconductances sum to +1". Both hold for poles and zeros, to 1e-9;
// so do the storage shares of a root at the origin, which nothing moves.
func TestEulerIdentities(t *testing.T) {
	for _, tc := range []struct {
		name string
		c    *cases.Circuit
		from string
		kind cases.TransferKind
	}{
		{"common emitter", commonEmitter(), "src", cases.VoltageGain},
		{"all kinds", allKinds(), "src", cases.VoltageGain},
		{"all kinds, transimpedance", allKinds(), "isrc", cases.Transimpedance},
		{"all kinds, output impedance", allKinds(), "src", cases.OutputImpedance},
	} {
		x := explainOf(t, tc.c, tc.from, "out", tc.kind)
		roots := append(append([]Root(nil), x.Poles...), x.Zeros...)
		checked := 0
		for _, r := range roots {
			if r.Sens == nil {
				if r.S != 0 {
					t.Errorf("%s: root %v has no sensitivities: %s", tc.name, r.S, r.Note)
				}
				continue
			}
			var share float64
			for _, s := range r.Sens {
				share += s.Storage
			}
			if math.Abs(share-1) > 1e-9 {
				t.Errorf("%s: root %v: storage shares sum to %g", tc.name, r.S, share)
			}
			if r.S == 0 {
				continue // no element moves it: storage shares only
			}
			checked++
			var storage, scale complex128
			for _, s := range r.Sens {
				switch x.Elements[s.Element].Kind {
				case cases.Capacitor:
					storage += s.S
				case cases.Inductor:
					storage += s.S
					scale -= 2 * s.S
				case cases.Resistor:
					scale -= s.S
				case cases.VCCS:
					scale += s.S
				case cases.CCVS:
					scale -= s.S
				}
			}
			if e := cmplx.Abs(storage + 1); e > 1e-9 {
				t.Errorf("%s: root %v: Σ S over C and L = %v, want −1 (error %.2g)", tc.name, r.S, storage, e)
			}
			if e := cmplx.Abs(scale - 1); e > 1e-9 {
				t.Errorf("%s: root %v: Σ S_G + Σ S_gm − Σ S_rm − 2Σ S_L = %v, want +1 (error %.2g)", tc.name, r.S, scale, e)
			}
		}
		complexRoots := 0
		for _, r := range roots {
			if imag(r.S) != 0 && r.Sens != nil {
				complexRoots++
			}
		}
		if tc.c.Parts[1].Name == "R1" && complexRoots < 2 {
			t.Errorf("%s: %d complex roots checked, want the pair of R1-L1-C1", tc.name, complexRoots)
		}
		if checked < 3 {
			t.Errorf("%s: only %d roots checked", tc.name, checked)
		}
	}
}

// The first-order sensitivities agree with central differences of roots
// found again by package ac on the circuit with each element value moved
// by ±0.01 % (a general-purpose check of the perturbation formula): to
// 1e-5, relative to max(1, |S|).
func TestSensitivitiesMatchFiniteDifferences(t *testing.T) {
	const h = 1e-4
	for _, tc := range []struct {
		name string
		c    *cases.Circuit
		from string
		kind cases.TransferKind
	}{
		{"common emitter", commonEmitter(), "src", cases.VoltageGain},
		{"all kinds", allKinds(), "src", cases.VoltageGain},
		{"all kinds, current drive", allKinds(), "isrc", cases.Transimpedance},
	} {
		x := explainOf(t, tc.c, tc.from, "out", tc.kind)
		worst := 0.0
		for i, e := range x.Elements {
			var rp, rm [2][]complex128 // poles, zeros at x(1+h), x(1−h)
			for k, f := range []float64{1 + h, 1 - h} {
				p := problemOf(t, withValue(tc.c, e.Part, e.Value*f), tc.from, "out", tc.kind)
				poles, err := ac.Poles(p)
				if err != nil {
					t.Fatal(err)
				}
				zeros, err := ac.Zeros(p)
				if err != nil {
					t.Fatal(err)
				}
				if k == 0 {
					rp = [2][]complex128{poles, zeros}
				} else {
					rm = [2][]complex128{poles, zeros}
				}
			}
			for k, roots := range [][]Root{x.Poles, x.Zeros} {
				for _, r := range roots {
					if r.Sens == nil {
						continue
					}
					fd := (nearest(rp[k], r.S) - nearest(rm[k], r.S)) / complex(2*h, 0) / r.S
					got := sensOf(r, i)
					err := cmplx.Abs(got-fd) / math.Max(1, cmplx.Abs(fd))
					worst = math.Max(worst, err)
					if err > 1e-5 {
						t.Errorf("%s: root %v, %s: S = %v, finite difference %v", tc.name, r.S, e.Label(), got, fd)
					}
				}
			}
		}
		t.Logf("%s: worst difference %.2g", tc.name, worst)
	}
}

// A mode that the transfer cannot see (an RC branch across the ideal
// drive source) is a pole of the circuit's pencil that a zero cancels: it
// is listed, not visible, with its own sensitivities (common practice: an
// element across an ideal voltage source has no effect on the rest).
func TestCancelledPole(t *testing.T) {
	c := circuit([]*cases.Part{
		{Name: "V1", Kind: cases.VoltageSource, Nodes: []string{"in", "gnd"}},
		part("R1", cases.Resistor, 1e3, "in", "out"),
		part("C1", cases.Capacitor, 1e-6, "out", "gnd"),
		part("R2", cases.Resistor, 1e3, "in", "x"),
		part("C2", cases.Capacitor, 10e-9, "x", "gnd"),
	}, &cases.Port{Name: "src", Source: "V1"}, &cases.Port{Name: "out", Plus: "out", Minus: "gnd"})
	x := explainOf(t, c, "src", "out", cases.VoltageGain)
	var hidden *Root
	for i := range x.Poles {
		if !x.Poles[i].Visible {
			hidden = &x.Poles[i]
		}
	}
	if hidden == nil || relErr(real(hidden.S), -1e5) > 1e-9 {
		t.Fatalf("poles %+v: want the hidden mode −1/(R2·C2) = −1e5 rad/s", x.Poles)
	}
	if s := sensOf(*hidden, elementIndex(t, x, "C2")); cmplx.Abs(s+1) > 1e-9 {
		t.Errorf("hidden pole: S_C2 = %v, want −1", s)
	}
	if x.Summary.HighPole < 0 || relErr(real(x.Poles[x.Summary.HighPole].S), -1e3) > 1e-9 {
		t.Errorf("f_high set by pole %d, want the visible −1e3 rad/s", x.Summary.HighPole)
	}
}

// Two equal RC sections with a buffer between them have a double pole at
// −1/(R·C) (closed form), whose first-order sensitivities do not exist:
// a perturbation moves a double root by the square root of its size
// (Wilkinson; from memory). It is reported, not differentiated.
func TestMultiplePole(t *testing.T) {
	c := circuit([]*cases.Part{
		{Name: "V1", Kind: cases.VoltageSource, Nodes: []string{"in", "gnd"}},
		part("R1", cases.Resistor, 1e3, "in", "a"),
		part("C1", cases.Capacitor, 1e-9, "a", "gnd"),
		part("E1", cases.VCVS, 1, "b", "gnd", "a", "gnd"),
		part("R2", cases.Resistor, 1e3, "b", "out"),
		part("C2", cases.Capacitor, 1e-9, "out", "gnd"),
	}, &cases.Port{Name: "src", Source: "V1"}, &cases.Port{Name: "out", Plus: "out", Minus: "gnd"})
	x := explainOf(t, c, "src", "out", cases.VoltageGain)
	if len(x.Poles) != 2 {
		t.Fatalf("poles %+v", x.Poles)
	}
	for _, p := range x.Poles {
		if relErr(real(p.S), -1e6) > 1e-6 || p.Sens != nil || p.Note != "multiple root" {
			t.Errorf("pole %+v: want −1e6 rad/s, a multiple root without sensitivities", p)
		}
	}
	if !strings.Contains(strings.Join(x.Notes, "\n"), "multiple root") {
		t.Errorf("notes %v", x.Notes)
	}
	// The open-circuit identity holds all the same: Σ τ = 2·R·C = b1.
	if relErr(x.Open.Sum, 2e-6) > 1e-12 || relErr(x.Open.Sum, x.Rational.Denominator()[1]) > 1e-9 {
		t.Errorf("Σ τ = %g, want 2 µs", x.Open.Sum)
	}
}

// Labels: the longest device name that prefixes a part name wins, with
// either separator smallsignal and the DC expansion use.
func TestDeviceLabels(t *testing.T) {
	devs := []string{"Q1", "Q10", "M1"}
	for _, tc := range []struct{ part, device, param string }{
		{"Q1_c_mu", "Q1", "c_mu"},
		{"Q10_gm", "Q10", "gm"},
		{"Q1.base_resistance", "Q1", "base_resistance"},
		{"M1_gds", "M1", "gds"},
		{"RL", "", ""},
		{"Q1_", "", ""},
		{"dc_helper:out", "", ""},
	} {
		d, p := deviceOf(tc.part, devs)
		if d != tc.device || p != tc.param {
			t.Errorf("deviceOf(%q) = %q, %q; want %q, %q", tc.part, d, p, tc.device, tc.param)
		}
	}
}
