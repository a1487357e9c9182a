package dc

import (
	"fmt"
	"testing"

	"tangent/cases"
	"tangent/mna"
)

// amplifierChain returns n capacitor-coupled npn common-emitter stages on
// one 12 V supply, each with divider bias (56k/10k), a 5.6 kΩ collector
// and a 1 kΩ emitter resistor, and a 120 Ω base resistance in the model:
// n devices, 4n + 1 nodes.
func amplifierChain(n int) *cases.Circuit {
	ms := map[string]*cases.Model{"q": model(cases.DeviceNPN, map[string]float64{
		"saturation_current": 5e-15, "forward_beta": 180, "reverse_beta": 3,
		"forward_early_voltage": 90, "base_resistance": 120})}
	parts := []*cases.Part{vsrc("VCC", "vcc", "gnd", 12)}
	for k := 0; k < n; k++ {
		b, c, e := fmt.Sprintf("b%d", k), fmt.Sprintf("c%d", k), fmt.Sprintf("e%d", k)
		parts = append(parts,
			res("RB1_"+b, "vcc", b, 56e3),
			res("RB2_"+b, b, "gnd", 10e3),
			res("RC_"+c, "vcc", c, 5.6e3),
			res("RE_"+e, e, "gnd", 1e3),
			bjt(fmt.Sprintf("Q%d", k), "q", c, b, e))
		if k+1 < n {
			parts = append(parts, &cases.Part{Name: fmt.Sprintf("CC%d", k), Kind: cases.Capacitor,
				Nodes: []string{c, fmt.Sprintf("b%d", k+1)}, Value: 1e-6})
		}
	}
	return build(ms, parts...)
}

func TestAmplifierChain(t *testing.T) {
	for _, n := range []int{1, 10, 100} {
		op, err := Solve(amplifierChain(n))
		if err != nil {
			t.Fatalf("n=%d: %v", n, err)
		}
		// Every stage is biased alike (the coupling capacitors are open at
		// DC), so each collector sits where the single stage's does.
		first := nodeV(t, op, "c0")
		last := nodeV(t, op, fmt.Sprintf("c%d", n-1))
		if !near(last, first, 1e-9, 0) {
			t.Errorf("n=%d: V(c0) = %g, V(c%d) = %g", n, first, n-1, last)
		}
		checkBalance(t, op, 1e-9, 1e-14)
	}
}

// BenchmarkChain times a whole operating point (expansion, equations,
// pivot analysis, Newton, results) of chains of N stages.
func BenchmarkChain(b *testing.B) {
	for _, n := range []int{1, 10, 100} {
		c := amplifierChain(n)
		b.Run(fmt.Sprintf("N=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Solve(c); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkChainPrepared times the operating point of chains of N stages
// set up once with Prepare: each Solve runs Newton from zero (9
// iterations at every N) and builds the result tables.
func BenchmarkChainPrepared(b *testing.B) {
	for _, n := range []int{1, 10, 100} {
		p, err := Prepare(amplifierChain(n))
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("N=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := p.Solve(Options{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkPrepare times the set-up alone (devices, expansion, equations,
// pattern, pivot order, result layout) of chains of N stages.
func BenchmarkPrepare(b *testing.B) {
	for _, n := range []int{1, 10, 100} {
		c := amplifierChain(n)
		b.Run(fmt.Sprintf("N=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Prepare(c); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkExamples times the operating point of each embedded example.
func BenchmarkExamples(b *testing.B) {
	for _, name := range cases.Examples() {
		c, err := cases.Example(name)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Solve(c); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// newtonSolver returns the solver of c with its pivot order analysed.
func newtonSolver(tb testing.TB, c *cases.Circuit) *solver {
	devs, err := buildDevices(c)
	if err != nil {
		tb.Fatal(err)
	}
	ex, _, err := expand(c, devs)
	if err != nil {
		tb.Fatal(err)
	}
	sys, err := mna.Build(ex)
	if err != nil {
		tb.Fatal(err)
	}
	s, err := newSolver(ex, sys, devs)
	if err != nil {
		tb.Fatal(err)
	}
	s.resetDevices()
	s.evaluate(false)
	s.assemble(0, 1)
	if err := s.lu.Factor(s.jac); err != nil {
		tb.Fatal(err)
	}
	return s
}

// One Newton iteration (evaluate every device, assemble, refactor, solve,
// residual) allocates nothing.
func TestNewtonIterationAllocatesNothing(t *testing.T) {
	s := newtonSolver(t, amplifierChain(10))
	allocs := testing.AllocsPerRun(50, func() {
		s.evaluate(true)
		s.residual(0, 1)
		s.assemble(0, 1)
		if err := s.lu.Factor(s.jac); err != nil {
			t.Fatal(err)
		}
		s.lu.Solve(s.xNew, s.rhs)
	})
	if allocs != 0 {
		t.Errorf("a Newton iteration allocates %v times", allocs)
	}
}

// BenchmarkDeviceEvaluation times evaluating and stamping one device
// (per op: one device), which must not allocate.
func BenchmarkDeviceEvaluation(b *testing.B) {
	s := newtonSolver(b, amplifierChain(100))
	b.ReportAllocs()
	k := 0
	for b.Loop() {
		d := s.devs[k%len(s.devs)]
		d.evaluate(s.x, true)
		d.stamp(s.jac.Values, s.rhs)
		k++
	}
}

// BenchmarkNewtonIteration times one iteration on 100 stages.
func BenchmarkNewtonIteration(b *testing.B) {
	s := newtonSolver(b, amplifierChain(100))
	b.ReportAllocs()
	for b.Loop() {
		s.evaluate(true)
		s.residual(0, 1)
		s.assemble(0, 1)
		if err := s.lu.Factor(s.jac); err != nil {
			b.Fatal(err)
		}
		s.lu.Solve(s.xNew, s.rhs)
	}
}
