package ac

import (
	"errors"
	"math"
	"math/big"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/mat"

	"tangent/cases"
)

// RC low-pass R = 1 kΩ, C = 100 nF: H = 1/(1 + sRC), one pole at −1/RC,
// −3 dB at 1/(2πRC) (circuit theory, closed form).
func TestRCLowPass(t *testing.T) {
	const r, c = 1e3, 100e-9
	p := voltageDriven(t, part("R1", cases.Resistor, r, "in", "out"), part("C1", cases.Capacitor, c, "out", "gnd"))
	h, err := Analyze(p)
	if err != nil {
		t.Fatal(err)
	}
	checkRoots(t, "poles", h.Poles, []complex128{-1 / (r * c)}, 1e-12)
	if len(h.Zeros) != 0 || len(h.Cancelled) != 0 {
		t.Errorf("zeros %v, cancelled %v, want none", h.Zeros, h.Cancelled)
	}
	if g, ok := h.DCGain(); !ok || math.Abs(g-1) > 1e-12 {
		t.Errorf("DC gain %v %v, want 1", g, ok)
	}
	den := h.Denominator()
	if len(den) != 2 || den[0] != 1 || math.Abs(den[1]-r*c) > 1e-12*r*c {
		t.Errorf("denominator %v, want [1 %g]", den, r*c)
	}
	if h.Order() != 1 {
		t.Errorf("order %d, want 1", h.Order())
	}
	bw := h.Bandwidth()
	want := 1 / (2 * math.Pi * r * c)
	if bw.HighHz == nil || math.Abs(*bw.HighHz-want) > 1e-10*want || bw.WidthHz == nil || *bw.WidthHz != *bw.HighHz || bw.LowHz != nil {
		t.Errorf("bandwidth %+v, want f_high = %g Hz", bw, want)
	}
}

// Series RLC driven by a voltage: across C, H = 1/(1 + sRC + s²LC); across
// R, a band-pass with peak 1 at ω0 = 1/√(LC), Q = √(L/C)/R, −3 dB points
// ω0·(√(1 + 1/(4Q²)) ∓ 1/(2Q)) and bandwidth ω0/Q (circuit theory, closed
// form; any filter text).
func TestSeriesRLC(t *testing.T) {
	const r, l, c = 50.0, 10e-3, 100e-9
	w0, q := 1/math.Sqrt(l*c), math.Sqrt(l/c)/r
	lowPass := voltageDriven(t, part("R1", cases.Resistor, r, "in", "a"), part("L1", cases.Inductor, l, "a", "out"),
		part("C1", cases.Capacitor, c, "out", "gnd"))
	h, err := Analyze(lowPass)
	if err != nil {
		t.Fatal(err)
	}
	pairs := h.Pairs()
	if len(pairs) != 1 || math.Abs(pairs[0].W0-w0) > 1e-12*w0 || math.Abs(pairs[0].Q-q) > 1e-11*q {
		t.Fatalf("pairs %+v, want ω0 = %g, Q = %g", pairs, w0, q)
	}
	checkTidy(t, "poles", h.Poles)
	den, num := h.Denominator(), h.Numerator()
	wantDen := []float64{1, r * c, l * c}
	for i := range wantDen {
		if len(den) != 3 || math.Abs(den[i]-wantDen[i]) > 1e-12*wantDen[i] {
			t.Fatalf("denominator %v, want %v", den, wantDen)
		}
	}
	if len(num) != 1 || math.Abs(num[0]-1) > 1e-12 {
		t.Errorf("numerator %v, want [1]", num)
	}

	bandPass := voltageDriven(t, part("L1", cases.Inductor, l, "in", "a"), part("C1", cases.Capacitor, c, "a", "out"),
		part("R1", cases.Resistor, r, "out", "gnd"))
	h, err = Analyze(bandPass)
	if err != nil {
		t.Fatal(err)
	}
	checkRoots(t, "zeros", h.Zeros, []complex128{0}, 0)
	if g, ok := h.DCGain(); !ok || g != 0 {
		t.Errorf("DC gain %v %v, want 0 (zero at the origin)", g, ok)
	}
	bw := h.Bandwidth()
	k := 1 / (2 * q)
	wl, wh := w0*(math.Sqrt(1+k*k)-k), w0*(math.Sqrt(1+k*k)+k)
	if math.Abs(bw.Reference-1) > 1e-12 || math.Abs(bw.RefHz-w0/(2*math.Pi)) > 1e-6*w0 {
		t.Errorf("reference %g at %g Hz, want 1 at %g Hz", bw.Reference, bw.RefHz, w0/(2*math.Pi))
	}
	if bw.LowHz == nil || bw.HighHz == nil || bw.WidthHz == nil {
		t.Fatalf("bandwidth %+v: missing edges", bw)
	}
	for _, c := range []struct{ got, want float64 }{{*bw.LowHz, wl}, {*bw.HighHz, wh}, {*bw.WidthHz, w0 / q}} {
		if want := c.want / (2 * math.Pi); math.Abs(c.got-want) > 1e-10*want {
			t.Errorf("band edge %g Hz, want %g Hz", c.got, want)
		}
	}
}

// Doubly terminated Butterworth LC ladders: poles ωc·exp(jπ(2k+n−1)/(2n)),
// k = 1..n, DC gain 1/2, −3 dB at ωc (any filter-design handbook, e.g.
// Zverev, Handbook of Filter Synthesis; from memory).
func TestButterworthLadder(t *testing.T) {
	for _, n := range []int{3, 7, 15} {
		for _, sc := range []struct{ r0, wc float64 }{{1, 1}, {600, 2 * math.Pi * 10e3}} {
			p := ladderButterworth(t, n, sc.r0, sc.wc)
			h, err := Analyze(p)
			if err != nil {
				t.Fatal(err)
			}
			var want []complex128
			for k := 1; k <= n; k++ {
				want = append(want, cmplx.Rect(sc.wc, math.Pi*float64(2*k+n-1)/float64(2*n)))
			}
			checkRoots(t, "Butterworth poles", h.Poles, want, 1e-8)
			checkTidy(t, "Butterworth poles", h.Poles)
			if len(h.Zeros) != 0 {
				t.Errorf("n = %d: zeros %v, want none", n, h.Zeros)
			}
			if g, ok := h.DCGain(); !ok || math.Abs(g-0.5) > 1e-12 {
				t.Errorf("n = %d: DC gain %v, want 1/2", n, g)
			}
			bw := h.Bandwidth()
			if f := sc.wc / (2 * math.Pi); bw.HighHz == nil || math.Abs(*bw.HighHz-f) > 1e-8*f {
				t.Errorf("n = %d: f_high %v, want %g (%+v)", n, *bw.HighHz, f, bw)
			}
		}
	}
}

// Uniform RC ladder of N = 50 sections (R from the grounded source to node
// 1 and between nodes, C from each node to ground, far end open):
// G = T/R with T tridiagonal (−1, 2, −1) except T_NN = 1, C = c·I. With
// v_j = sin(jθ), the interior rows give λ = 2 − 2cos θ and the last row
// sin((N+1)θ) = sin(Nθ), so θ_k = (2k−1)π/(2N+1) and the poles are
// s_k = −4·sin²(θ_k/2)/(RC) (eigenvalues of a tridiagonal Toeplitz
// matrix, closed form; derivation here).
func TestRCLadder50(t *testing.T) {
	const n, r, c = 50, 1e3, 1e-9
	h, err := Analyze(rcLadder(t, n, r, c))
	if err != nil {
		t.Fatal(err)
	}
	var want []complex128
	for k := 1; k <= n; k++ {
		th := float64(2*k-1) * math.Pi / float64(2*n+1)
		s := math.Sin(th / 2)
		want = append(want, complex(-4*s*s/(r*c), 0))
	}
	checkRoots(t, "ladder poles", h.Poles, want, 1e-10)
	if len(h.Zeros) != 0 {
		t.Errorf("zeros %v, want none", h.Zeros)
	}
	if g, ok := h.DCGain(); !ok || math.Abs(g-1) > 1e-10 {
		t.Errorf("DC gain %v, want 1", g)
	}
}

// Poles over 12 decades, τ = 1 s … 1 ps.
func TestPolesTwelveDecades(t *testing.T) {
	const m = 13
	// Decoupled sections G = diag(1/R), C = diag(C): poles −1/(R·C)
	// exactly (closed form).
	g := mat.NewDense(m, m, nil)
	c := mat.NewDense(m, m, nil)
	var want []complex128
	for i := 0; i < m; i++ {
		r, cv := 1e3*float64(i+1), math.Pow(10, -float64(i))/(1e3*float64(i+1))
		g.Set(i, i, 1/r)
		c.Set(i, i, cv)
		want = append(want, complex(-1/(r*cv), 0))
	}
	got, err := PencilRoots(g, c)
	if err != nil {
		t.Fatal(err)
	}
	checkRoots(t, "decoupled", got, want, 1e-9)

	// Coupled: node i has R_i = 1 kΩ to ground and C_i = 10⁻ⁱ mF, and
	// 4.7 kΩ joins consecutive nodes. Reference: the roots of the
	// tridiagonal determinant by its continuant recurrence
	// D_k = a_k·D_{k−1} − b_k²·D_{k−2} (closed form) evaluated in 256-bit
	// math/big arithmetic and polished by Newton's method there.
	g.Zero()
	c.Zero()
	const rg, rc = 1e3, 4.7e3
	for i := 0; i < m; i++ {
		g.Set(i, i, g.At(i, i)+1/rg)
		c.Set(i, i, math.Pow(10, -float64(i))*1e-3)
		if i+1 < m {
			g.Set(i, i, g.At(i, i)+1/rc)
			g.Set(i+1, i+1, g.At(i+1, i+1)+1/rc)
			g.Set(i, i+1, -1/rc)
			g.Set(i+1, i, -1/rc)
		}
	}
	got, err = PencilRoots(g, c)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != m {
		t.Fatalf("coupled: %d roots, want %d", len(got), m)
	}
	for i, s := range got {
		ref := continuantRoot(g, c, real(s))
		if e := math.Abs(real(s)-ref) / math.Abs(ref); e > 1e-9 || imag(s) != 0 {
			t.Errorf("coupled root %d = %v, reference %.17g (relative error %.2g)", i, s, ref, e)
		}
	}
}

// continuantRoot polishes a real root of det(G + sC) for a symmetric
// tridiagonal G and diagonal C by Newton's method in 256-bit arithmetic.
func continuantRoot(g, c *mat.Dense, s0 float64) float64 {
	const prec = 256
	n, _ := g.Dims()
	nf := func(x float64) *big.Float { return new(big.Float).SetPrec(prec).SetFloat64(x) }
	s := nf(s0)
	for it := 0; it < 60; it++ {
		d2, d1 := nf(0), nf(1) // D_{k−2}, D_{k−1}
		p2, p1 := nf(0), nf(0) // derivatives
		for k := 0; k < n; k++ {
			a := new(big.Float).SetPrec(prec).Mul(s, nf(c.At(k, k)))
			a.Add(a, nf(g.At(k, k)))
			b2 := nf(0)
			if k > 0 {
				b2.Mul(nf(g.At(k, k-1)), nf(g.At(k, k-1)))
			}
			d := new(big.Float).SetPrec(prec).Mul(a, d1)
			d.Sub(d, new(big.Float).SetPrec(prec).Mul(b2, d2))
			p := new(big.Float).SetPrec(prec).Mul(nf(c.At(k, k)), d1)
			p.Add(p, new(big.Float).SetPrec(prec).Mul(a, p1))
			p.Sub(p, new(big.Float).SetPrec(prec).Mul(b2, p2))
			d2, d1, p2, p1 = d1, d, p1, p
		}
		step := new(big.Float).SetPrec(prec).Quo(d1, p1)
		s.Sub(s, step)
		if st, _ := step.Float64(); math.Abs(st) < 1e-40*math.Abs(s0) {
			break
		}
	}
	v, _ := s.Float64()
	return v
}

// RC lead network: R1 ∥ C in series, R2 to ground. H = R2(1 + sR1C) /
// (R1 + R2 + sR1R2C): zero −1/(R1C), pole −(R1+R2)/(R1R2C), DC gain
// R2/(R1+R2) (circuit theory, closed form).
func TestRCLead(t *testing.T) {
	const r1, r2, c = 10e3, 1e3, 10e-9
	h, err := Analyze(voltageDriven(t, part("R1", cases.Resistor, r1, "in", "out"), part("C1", cases.Capacitor, c, "in", "out"),
		part("R2", cases.Resistor, r2, "out", "gnd")))
	if err != nil {
		t.Fatal(err)
	}
	checkRoots(t, "lead zeros", h.Zeros, []complex128{-1 / (r1 * c)}, 1e-12)
	checkRoots(t, "lead poles", h.Poles, []complex128{-(r1 + r2) / (r1 * r2 * c)}, 1e-12)
	if g, _ := h.DCGain(); math.Abs(g-r2/(r1+r2)) > 1e-12 {
		t.Errorf("DC gain %g, want %g", g, r2/(r1+r2))
	}
	num := h.Numerator()
	if want := r2 / (r1 + r2) * r1 * c; len(num) != 2 || math.Abs(num[1]-want) > 1e-12*want {
		t.Errorf("numerator %v, want [%g %g]", num, r2/(r1+r2), want)
	}
}

// Hybrid-π common-emitter stage with source resistance Rs and load RL:
// H = −gm·RL·rπ/(rπ+Rs)·(1 − s·Cμ/gm)/(1 + s·b1 + s²·b2) with R' = Rs∥rπ,
// b1 = R'Cπ + R'Cμ(1 + gm·RL) + RL·Cμ, b2 = R'·RL·Cπ·Cμ (Gray, Hurst, Lewis
// & Meyer, Analysis and Design of Analog Integrated Circuits, the
// common-emitter frequency response; from memory).
func TestHybridPiCommonEmitter(t *testing.T) {
	const rs, rpi, cpi, cmu, gm, rl = 1e3, 2.5e3, 10e-12, 1e-12, 40e-3, 5e3
	p := voltageDriven(t,
		part("RS", cases.Resistor, rs, "in", "b"),
		part("RPI", cases.Resistor, rpi, "b", "gnd"),
		part("CPI", cases.Capacitor, cpi, "b", "gnd"),
		part("CMU", cases.Capacitor, cmu, "b", "out"),
		part("GM", cases.VCCS, gm, "out", "gnd", "b", "gnd"),
		part("RL", cases.Resistor, rl, "out", "gnd"))
	h, err := Analyze(p)
	if err != nil {
		t.Fatal(err)
	}
	rp := rs * rpi / (rs + rpi)
	b1 := rp*cpi + rp*cmu*(1+gm*rl) + rl*cmu
	b2 := rp * rl * cpi * cmu
	// Roots of b2·s² + b1·s + 1 by the cancellation-free form.
	q := -(b1 + math.Sqrt(b1*b1-4*b2)) / 2
	checkRoots(t, "CE poles", h.Poles, []complex128{complex(q/b2, 0), complex(1/q, 0)}, 1e-9)
	checkRoots(t, "CE zeros", h.Zeros, []complex128{gm / cmu}, 1e-9)
	if g, _ := h.DCGain(); math.Abs(g-(-gm*rl*rpi/(rpi+rs))) > 1e-12*gm*rl {
		t.Errorf("DC gain %g, want %g", g, -gm*rl*rpi/(rpi+rs))
	}
	den := h.Denominator()
	if len(den) != 3 || math.Abs(den[1]-b1) > 1e-9*b1 || math.Abs(den[2]-b2) > 1e-9*b2 {
		t.Errorf("denominator %v, want [1 %g %g]", den, b1, b2)
	}
}

// Compensated attenuator R1 ∥ C1 over R2 ∥ C2 with R1·C1 = R2·C2: H is the
// constant R2/(R1+R2), its pole and zero at −1/(R1·C1) cancel (the
// oscilloscope-probe compensation, common practice).
func TestCompensatedAttenuator(t *testing.T) {
	const r1, c1, r2, c2 = 9e6, 10e-12, 1e6, 90e-12
	h, err := Analyze(voltageDriven(t, part("R1", cases.Resistor, r1, "in", "out"), part("C1", cases.Capacitor, c1, "in", "out"),
		part("R2", cases.Resistor, r2, "out", "gnd"), part("C2", cases.Capacitor, c2, "out", "gnd")))
	if err != nil {
		t.Fatal(err)
	}
	if len(h.Poles) != 0 || len(h.Zeros) != 0 {
		t.Errorf("poles %v zeros %v, want none left", h.Poles, h.Zeros)
	}
	checkRoots(t, "cancelled", h.Cancelled, []complex128{-1 / (r1 * c1)}, 1e-9)
	if g, _ := h.DCGain(); math.Abs(g-0.1) > 1e-12 {
		t.Errorf("DC gain %g, want 0.1", g)
	}
	if bw := h.Bandwidth(); bw.HighHz != nil {
		t.Errorf("flat response has f_high %g", *bw.HighHz)
	}
}

// A current source into C1, R1 to C2: no DC path, so G is singular and
// Z = 1/(s·(C1 + C2 + s·R1·C1·C2)) has poles 0 and −(C1+C2)/(R1·C1·C2)
// (nodal analysis, closed form).
func TestPoleAtOrigin(t *testing.T) {
	const r1, c1, c2 = 1e3, 1e-6, 2e-6
	p := currentDrivenOrigin(t, r1, c1, c2)
	h, err := Analyze(p)
	if err != nil {
		t.Fatal(err)
	}
	checkRoots(t, "poles", h.Poles, []complex128{0, -(c1 + c2) / (r1 * c1 * c2)}, 1e-12)
	if h.Poles[0] != 0 {
		t.Errorf("pole at the origin is %v, want exactly 0", h.Poles[0])
	}
	if _, ok := h.DCGain(); ok {
		t.Error("DC gain reported finite with a pole at the origin")
	}
	if bw := h.Bandwidth(); bw.Reference != 0 || bw.HighHz != nil {
		t.Errorf("bandwidth %+v, want none", bw)
	}
	s := complex(0, 300.0)
	if want := 1 / (s * (c1 + c2 + s*r1*c1*c2)); relErr(h.Eval(s), want) > 1e-12 {
		t.Errorf("H(j300) = %v, want %v", h.Eval(s), want)
	}
}

func currentDrivenOrigin(t testing.TB, r1, c1, c2 float64) *Problem {
	return setup(t, []*cases.Part{
		{Name: "I1", Kind: cases.CurrentSource, Nodes: []string{"gnd", "n"}},
		part("C1", cases.Capacitor, c1, "n", "gnd"),
		part("R1", cases.Resistor, r1, "n", "m"),
		part("C2", cases.Capacitor, c2, "m", "gnd"),
	}, []*cases.Port{{Name: "sig", Source: "I1"}, {Name: "m", Plus: "m", Minus: "gnd"}}, "sig", "m", cases.Transimpedance)
}

// det(G + sC) ≡ 0 is an error, not a list of roots.
func TestSingularPencil(t *testing.T) {
	g := mat.NewDense(3, 3, []float64{1, -1, 0, -1, 1, 0, 0, 0, 0})
	c := mat.NewDense(3, 3, []float64{1, 0, 0, 0, 0, 0, 0, 0, 0})
	if _, err := PencilRoots(g, c); !errors.Is(err, ErrSingularPencil) {
		t.Errorf("err = %v, want ErrSingularPencil", err)
	}
	// A node connected by a capacitor to nothing else floats at DC only:
	// regular. A loop of two voltage sources is singular at every s.
	parts := []*cases.Part{
		{Name: "V1", Kind: cases.VoltageSource, Nodes: []string{"in", "gnd"}},
		{Name: "V2", Kind: cases.VoltageSource, Nodes: []string{"in", "gnd"}},
		part("R1", cases.Resistor, 1e3, "in", "out"),
	}
	p := setup(t, parts, []*cases.Port{{Name: "src", Source: "V1"}, {Name: "out", Plus: "out", Minus: "gnd"}}, "src", "out", cases.VoltageGain)
	if _, err := Poles(p); !errors.Is(err, ErrSingularPencil) {
		t.Errorf("voltage-source loop: err = %v, want ErrSingularPencil", err)
	}
}

// |H| = A/|1 + jωRC| is 1 at ω = √(A² − 1)/(RC) (closed form).
func TestUnityGain(t *testing.T) {
	const a, r, c = 1000, 1e3, 1e-9
	h, err := Analyze(voltageDriven(t, part("E1", cases.VCVS, a, "x", "gnd", "in", "gnd"),
		part("R1", cases.Resistor, r, "x", "out"), part("C1", cases.Capacitor, c, "out", "gnd")))
	if err != nil {
		t.Fatal(err)
	}
	f, ok := h.UnityGainHz()
	want := math.Sqrt(a*a-1) / (r * c) / (2 * math.Pi)
	if !ok || math.Abs(f-want) > 1e-10*want {
		t.Errorf("unity-gain frequency %g %v, want %g Hz", f, ok, want)
	}
}

// The transfer function matches a direct solve at complex points.
func TestRationalMatchesDirectSolve(t *testing.T) {
	for name, p := range map[string]*Problem{
		"butterworth7": ladderButterworth(t, 7, 600, 2*math.Pi*10e3),
		"ladder50":     rcLadder(t, 50, 1e3, 1e-9),
		"origin":       currentDrivenOrigin(t, 1e3, 1e-6, 2e-6),
	} {
		h, err := Analyze(p)
		if err != nil {
			t.Fatal(err)
		}
		for _, s := range []complex128{complex(0, 1e3), complex(-2e3, 5e4), complex(0, 7e5)} {
			if e := relErr(h.Eval(s), evalProblem(t, p, s)); e > 1e-9 {
				t.Errorf("%s: H(%v) relative error %.2g", name, s, e)
			}
		}
	}
}
