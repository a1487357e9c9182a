package explain

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"tangent/ac"
	"tangent/cases"
	"tangent/internal/cdense"
)

// Thevenin's and Norton's theorems (any circuit-theory text; from
// memory): a load RL across the port sees V = Voc·RL/(RL + Zth) =
// Isc·Zth·RL/(RL + Zth). Checked against a direct solve of the circuit
// with the load in it (ac.Setup on the loaded circuit, then Gaussian
// elimination of (G + s·C)·x = B),
// for three loads, at frequencies spanning the roots, for every kind of
// drive port (node pair, voltage source, current source) and both drive
// kinds, to 1e-9 relative.
func TestPortEquivalentsReproduceLoads(t *testing.T) {
	for _, tc := range []struct {
		name         string
		c            *cases.Circuit
		drive, port  string
		voltageDrive bool
	}{
		{"common emitter", commonEmitter(), "src", "out", true},
		{"voltage source port, current drive", allKinds(), "src", "out", false},
		{"current source port, current drive", allKinds(), "isrc", "out", false},
		{"current source port, voltage drive", allKinds(), "isrc", "out", true},
		{"node pair, voltage drive", allKinds(), "mid", "out", true},
		{"node pair, current drive", allKinds(), "mid", "out", false},
	} {
		pe, err := PortAt(tc.c, tc.drive, tc.port, tc.voltageDrive)
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		kind := cases.VoltageGain
		if !tc.voltageDrive {
			kind = cases.Transimpedance
		}
		worst := 0.0
		for _, rl := range []float64{100, 5e3, 1e6} {
			loaded := *tc.c
			loaded.Parts = append(append([]*cases.Part(nil), tc.c.Parts...), part("RLOAD", cases.Resistor, rl, "out", "gnd"))
			p := problemOf(t, &loaded, tc.drive, tc.port, kind)
			for _, f := range []float64{10, 1e3, 1e5, 1e7, 1e9} {
				s := complex(0, 2*math.Pi*f)
				want := directSolve(p, s)
				zl := complex(rl, 0)
				voc, zth, isc := pe.Voc.Eval(s), pe.Zth.Eval(s), pe.Isc.Eval(s)
				for _, got := range []complex128{voc * zl / (zl + zth), isc * zth * zl / (zl + zth)} {
					e := cmplx.Abs(got-want) / cmplx.Abs(want)
					worst = math.Max(worst, e)
					if e > 1e-9 {
						t.Errorf("%s: RL = %g Ω, f = %g Hz: %v from the equivalent, %v solved (error %.2g)", tc.name, rl, f, got, want, e)
					}
				}
			}
		}
		t.Logf("%s: worst %.2g", tc.name, worst)
	}
}

// At DC the common-emitter stage's output is gm·v(b) into RL: with the
// drive shorted v(b) = 0, so Zth(0) = RL; Voc(0) = −gm·RL·rπ/(rπ + RS)
// and Isc(0) = Voc(0)/RL (hybrid-π closed form, Gray & Meyer; from
// memory).
func TestPortEquivalentCommonEmitterDC(t *testing.T) {
	pe, err := PortAt(commonEmitter(), "src", "out", true)
	if err != nil {
		t.Fatal(err)
	}
	z0, _ := pe.Zth.DCGain()
	v0, _ := pe.Voc.DCGain()
	i0, _ := pe.Isc.DCGain()
	wantV := -ceGm * ceRL * ceRPi / (ceRPi + ceRS)
	for _, c := range []struct {
		what      string
		got, want float64
	}{
		{"Zth(0)", z0, ceRL},
		{"Voc(0)", v0, wantV},
		{"Isc(0)", i0, wantV / ceRL},
	} {
		if e := relErr(c.got, c.want); e > 1e-9 {
			t.Errorf("%s = %g, want %g", c.what, c.got, c.want)
		}
	}
}

func TestPortAtErrors(t *testing.T) {
	for _, tc := range []struct{ drive, port string }{
		{"src", "src"}, {"nope", "out"}, {"src", "nope"},
	} {
		if _, err := PortAt(commonEmitter(), tc.drive, tc.port, true); err == nil {
			t.Errorf("PortAt(%s, %s): no error", tc.drive, tc.port)
		} else if msg := fmt.Sprint(err); len(msg) < 10 || msg[:8] != "explain:" {
			t.Errorf("PortAt(%s, %s): %q, want a message prefixed explain:", tc.drive, tc.port, msg)
		}
	}
}

// directSolve returns H(s) = Out·(G + s·C)⁻¹·B by Gaussian elimination
// with partial pivoting.
func directSolve(p *ac.Problem, s complex128) complex128 {
	n, _ := p.G.Dims()
	a := make([]complex128, n*n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			a[i*n+j] = complex(p.G.At(i, j), 0) + s*complex(p.C.At(i, j), 0)
		}
	}
	x := make([]complex128, n)
	for i := range x {
		x[i] = complex(p.B[i], 0)
	}
	var f cdense.LU
	f.Factor(a, n)
	f.Solve(x)
	var h complex128
	for i := range x {
		h += complex(p.Out[i], 0) * x[i]
	}
	return h
}

// A port driven by an ideal voltage source (here a vcvs output) has
// Zth ≡ 0 and no Norton equivalent: shorting it is a contradiction (common
// practice).
func TestPortDrivenByIdealSource(t *testing.T) {
	c := circuit([]*cases.Part{
		{Name: "V1", Kind: cases.VoltageSource, Nodes: []string{"in", "gnd"}},
		part("R1", cases.Resistor, 1e3, "in", "a"),
		part("C1", cases.Capacitor, 1e-9, "a", "gnd"),
		part("E1", cases.VCVS, 2, "out", "gnd", "a", "gnd"),
	}, &cases.Port{Name: "src", Source: "V1"}, &cases.Port{Name: "out", Plus: "out", Minus: "gnd"})
	pe, err := PortAt(c, "src", "out", true)
	if err != nil {
		t.Fatal(err)
	}
	if pe.Isc != nil || pe.NoNorton == "" {
		t.Errorf("Norton %+v (%q), want none with a reason", pe.Isc, pe.NoNorton)
	}
	if pe.Zth.K0 != 0 {
		t.Errorf("Zth = %+v, want ≡ 0", pe.Zth)
	}
	// Voc = 2/(1 + s·R1·C1) (closed form).
	if v, _ := pe.Voc.DCGain(); relErr(v, 2) > 1e-12 || len(pe.Voc.Poles) != 1 || relErr(real(pe.Voc.Poles[0]), -1e6) > 1e-9 {
		t.Errorf("Voc = %+v, want 2/(1 + s/1e6)", pe.Voc)
	}
}
