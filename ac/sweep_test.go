package ac

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"tangent/cases"
)

// The O(n²) Hessenberg sweep equals a direct complex solve of
// (G + jωC)·x = B (evalProblem, a plain Gaussian elimination) to 1e-9
// relative at every point of a 20-points-per-decade grid spanning the
// circuit's roots and three decades beyond them.
func TestSweepMatchesDirectSolve(t *testing.T) {
	hybridPi := voltageDriven(t,
		part("RS", cases.Resistor, 1e3, "in", "b"), part("RPI", cases.Resistor, 2.5e3, "b", "gnd"),
		part("CPI", cases.Capacitor, 10e-12, "b", "gnd"), part("CMU", cases.Capacitor, 1e-12, "b", "out"),
		part("GM", cases.VCCS, 40e-3, "out", "gnd", "b", "gnd"), part("RL", cases.Resistor, 5e3, "out", "gnd"))
	tests := []struct {
		name   string
		p      *Problem
		lo, hi float64 // Hz
	}{
		{"butterworth7", ladderButterworth(t, 7, 600, 2*math.Pi*10e3), 10, 10e6},
		{"ladder50", rcLadder(t, 50, 1e3, 1e-9), 1, 1e10},
		{"hybrid-pi", hybridPi, 1e3, 1e12},
		{"pole at origin (G singular)", currentDrivenOrigin(t, 1e3, 1e-6, 2e-6), 0.01, 1e6},
		{"rc network 40", rcNetwork(40, 3), 1, 1e9},
	}
	for _, tt := range tests {
		sw, err := NewSweeper(tt.p)
		if err != nil {
			t.Fatal(err)
		}
		f := (&cases.Sweep{Start: tt.lo, Stop: tt.hi, PointsPerDecade: 20}).Frequencies()
		got := sw.Response(f, nil)
		worst := 0.0
		for i, fi := range f {
			want := evalProblem(t, tt.p, complex(0, 2*math.Pi*fi))
			if e := relErr(got[i], want); e > worst {
				worst = e
			}
		}
		if worst > 1e-9 {
			t.Errorf("%s: worst relative error %.2g over %d points (%d by the direct fallback)", tt.name, worst, len(f), sw.direct)
		}
	}
}

// The per-point evaluation allocates nothing.
func TestSweepNoAllocation(t *testing.T) {
	sw, err := NewSweeper(rcNetwork(30, 1))
	if err != nil {
		t.Fatal(err)
	}
	f := []float64{1, 10, 100, 1e3, 1e4, 1e5, 1e6}
	dst := make([]complex128, len(f))
	if a := testing.AllocsPerRun(10, func() { sw.Response(f, dst) }); a != 0 {
		t.Errorf("%v allocations per sweep, want 0", a)
	}
	if a := testing.AllocsPerRun(10, func() { sw.At(complex(0, 1e15)) }); a != 0 {
		t.Errorf("%v allocations per fallback point, want 0", a)
	}
}

// rcNetwork is a deterministic random RC (and, with rlc, RLC) network of
// n nodes: a chain with random shunt and bridging elements, values over
// two decades. The source V1 drives node "in" through RS; the output is
// the last node.
func rcNetwork(n int, seed uint64) *Problem {
	return randomNetwork(n, seed, false)
}

func randomNetwork(n int, seed uint64, rlc bool) *Problem {
	rng := rand.New(rand.NewPCG(seed, 7))
	val := func(base float64) float64 { return base * math.Pow(10, 2*rng.Float64()-1) }
	node := func(i int) string {
		if i == n-1 {
			return "out"
		}
		return fmt.Sprintf("n%d", i)
	}
	parts := []*cases.Part{
		{Name: "V1", Kind: cases.VoltageSource, Nodes: []string{"in", "gnd"}},
		part("RS", cases.Resistor, 50, "in", node(0)),
	}
	for i := 0; i < n; i++ {
		parts = append(parts, part(fmt.Sprintf("C%d", i), cases.Capacitor, val(1e-9), node(i), "gnd"))
		if i+1 < n {
			if rlc && i%3 == 1 {
				parts = append(parts, part(fmt.Sprintf("L%d", i), cases.Inductor, val(1e-5), node(i), node(i+1)),
					part(fmt.Sprintf("RD%d", i), cases.Resistor, val(1e3), node(i), node(i+1)))
			} else {
				parts = append(parts, part(fmt.Sprintf("R%d", i), cases.Resistor, val(1e2), node(i), node(i+1)))
			}
		}
		if rng.IntN(4) == 0 {
			parts = append(parts, part(fmt.Sprintf("RG%d", i), cases.Resistor, val(1e4), node(i), "gnd"))
		}
		if j := i + 2 + rng.IntN(3); j < n && rng.IntN(3) == 0 {
			parts = append(parts, part(fmt.Sprintf("RB%d", i), cases.Resistor, val(1e3), node(i), node(j)))
		}
	}
	c := linearCase(parts, []*cases.Port{{Name: "src", Source: "V1"}, {Name: "out", Plus: "out", Minus: "gnd"}})
	p, err := Setup(c, &cases.Transfer{From: "src", To: "out", Kind: cases.VoltageGain})
	if err != nil {
		panic(err)
	}
	return p
}

// The poles of a passive RC network are real and negative, one per
// capacitor when every capacitor has its own node to ground (RC network
// theory, common practice); the sweep of such a network was checked
// against direct solves above.
func TestRandomRCNetworkPoles(t *testing.T) {
	p := randomNetwork(60, 11, false)
	poles, err := Poles(p)
	if err != nil {
		t.Fatal(err)
	}
	if len(poles) != 60 {
		t.Fatalf("%d poles, want 60", len(poles))
	}
	for _, s := range poles {
		if imag(s) != 0 || real(s) >= 0 {
			t.Errorf("pole %v is not real and negative", s)
		}
	}
	ph, err := Poles(randomNetwork(60, 11, true))
	if err != nil {
		t.Fatal(err)
	}
	checkTidy(t, "RLC poles", ph)
	_ = cmplx.Abs
}
