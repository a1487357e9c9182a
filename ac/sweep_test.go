package ac

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"tangent/cases"
)

// The sweep (banded elimination or the O(n²) Hessenberg form) equals a
// direct complex solve of (G + jωC)·x = B to 1e-9 relative at every point
// of a 20-points-per-decade grid spanning the circuit's roots and three
// decades beyond them. The direct solve is evalProblem, a plain Gaussian
// elimination, and where it disagrees the same elimination in 128-bit
// arithmetic (directErr): far above the cut-off of the Butterworth ladder
// the float64 elimination is itself off by 5e-9.
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
		// The Hessenberg form too, which NewSweeper leaves for dense
		// pencils.
		hs, err := newHessenbergSweeper(tt.p, sw.de)
		if err != nil {
			t.Fatal(err)
		}
		f := (&cases.Sweep{Start: tt.lo, Stop: tt.hi, PointsPerDecade: 20}).Frequencies()
		for _, s := range []*Sweeper{sw, hs} {
			got := s.Response(f, nil)
			worst := 0.0
			for i, fi := range f {
				if e := directErr(t, tt.p, complex(0, 2*math.Pi*fi), got[i], 1e-9); e > worst {
					worst = e
				}
			}
			if worst > 1e-9 {
				t.Errorf("%s (band %v): worst relative error %.2g over %d points (%d by the banded fallback)", tt.name, s.band, worst, len(f), s.direct)
			}
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
		t.Errorf("%v allocations per far point, want 0", a)
	}
	hs, err := newHessenbergSweeper(rcNetwork(30, 1), sw.de)
	if err != nil {
		t.Fatal(err)
	}
	if a := testing.AllocsPerRun(10, func() { hs.Response(f, dst); hs.At(complex(0, 1e15)) }); a != 0 {
		t.Errorf("Hessenberg form: %v allocations per sweep and fallback point, want 0", a)
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

// Bridged random RC and RLC networks of 60 nodes, several seeds: the poles
// of the RC networks are real and negative, one per capacitor, every
// node having its own capacitor to ground (RC network theory, common
// practice); for all of them the factored transfer function (poles, zeros
// and K0 from Analyze) equals a direct solve (directErr) to 1e-8 relative
// at 10 points per decade from a decade below the lowest pole to a decade
// above the highest, through a stop band where |H| falls to 1e-70 and
// below: the zeros there are only right when the zeros at infinity
// (relative degree 20 to 40 here) are removed exactly.
func TestRandomNetworks(t *testing.T) {
	for seed := uint64(1); seed <= 4; seed++ {
		for _, rlc := range []bool{false, true} {
			p := randomNetwork(60, seed, rlc)
			h, err := Analyze(p)
			if err != nil {
				t.Fatal(err)
			}
			name := fmt.Sprintf("seed %d rlc %v", seed, rlc)
			if !rlc {
				if len(h.Poles)+len(h.Cancelled) != 60 {
					t.Errorf("%s: %d poles and %d cancelled, want 60 in all", name, len(h.Poles), len(h.Cancelled))
				}
				for _, s := range append(append([]complex128(nil), h.Poles...), h.Cancelled...) {
					if imag(s) != 0 || real(s) >= 0 {
						t.Errorf("%s: pole %v is not real and negative", name, s)
					}
				}
			}
			checkTidy(t, name+" poles", h.Poles)
			checkTidy(t, name+" zeros", h.Zeros)
			lo, hi := math.Inf(1), 0.0
			for _, v := range h.Poles {
				lo, hi = math.Min(lo, cmplx.Abs(v)), math.Max(hi, cmplx.Abs(v))
			}
			worst := 0.0
			for e := math.Floor(math.Log10(lo)) - 1; e <= math.Log10(hi)+1; e += 0.1 {
				s := complex(0, math.Pow(10, e))
				if err := directErr(t, p, s, h.Eval(s), 1e-8); err > worst || math.IsNaN(err) {
					worst = err
				}
			}
			if worst > 1e-8 {
				t.Errorf("%s: factored H off a direct solve by %.2g relative (%d poles, %d zeros, %d cancelled)",
					name, worst, len(h.Poles), len(h.Zeros), len(h.Cancelled))
			}
		}
	}
}
