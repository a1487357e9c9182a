package explain

import (
	"math"
	"strings"
	"testing"

	"tangent/cases"
	"tangent/dc"
	"tangent/smallsignal"
)

// exampleEquivalent linearizes an embedded example at its bias point.
func exampleEquivalent(t *testing.T, name string) (*cases.Circuit, []string) {
	t.Helper()
	c, err := cases.Example(name)
	if err != nil {
		t.Fatal(err)
	}
	op, err := dc.Solve(c)
	if err != nil {
		t.Fatal(err)
	}
	eq, err := smallsignal.Linearize(op)
	if err != nil {
		t.Fatal(err)
	}
	var devs []string
	for _, d := range eq.Devices {
		devs = append(devs, d.Name)
	}
	return eq.Circuit, devs
}

// The open-circuit time constants sum to b1, the s¹ coefficient of the
// normalized denominator 1 + b1·s + … + b_m·s^m, and the reciprocal
// short-circuit time constants to b_{m−1}/b_m, the ratio of its two
// highest coefficients (common results of the two methods, Gray & Meyer
// and Sedra & Smith; from memory). Both to 1e-9. Where the transfer
// cancels a mode, the sums equal those of the pencil det(G + s·C),
// −Σ 1/p and −Σ p over all its poles, and the transfer's own denominator
// is not compared.
func TestTimeConstantSums(t *testing.T) {
	ce, devs := exampleEquivalent(t, "ce_amplifier")
	compared := 0
	for _, tc := range []struct {
		name string
		c    *cases.Circuit
		from string
		kind cases.TransferKind
	}{
		{"common emitter", commonEmitter(), "src", cases.VoltageGain},
		{"all kinds", allKinds(), "src", cases.VoltageGain},
		{"all kinds, output impedance", allKinds(), "src", cases.OutputImpedance},
		{"ce_amplifier example", ce, "in", cases.VoltageGain},
	} {
		x, err := Explain(tc.c, &cases.Transfer{From: tc.from, To: "out", Kind: tc.kind}, Options{Devices: devs})
		if err != nil {
			t.Fatal(err)
		}
		if x.Open == nil || x.Short == nil {
			t.Fatalf("%s: methods missing: %v", tc.name, x.Notes)
		}
		if len(x.Rational.Cancelled) == 0 {
			den := x.Rational.Denominator()
			m := len(den) - 1
			if e := relErr(x.Open.Sum, den[1]); e > 1e-9 {
				t.Errorf("%s: Σ τ open = %g, b1 = %g (error %.2g)", tc.name, x.Open.Sum, den[1], e)
			}
			if e := relErr(x.Short.Sum, den[m-1]/den[m]); e > 1e-9 {
				t.Errorf("%s: Σ 1/τ short = %g, b_{m−1}/b_m = %g (error %.2g)", tc.name, x.Short.Sum, den[m-1]/den[m], e)
			}
			compared++
		}
		if e := relErr(x.Open.Sum, x.B1); e > 1e-9 {
			t.Errorf("%s: Σ τ open = %g, −Σ 1/p = %g", tc.name, x.Open.Sum, x.B1)
		}
		if e := relErr(x.Short.Sum, x.PoleSum); e > 1e-9 {
			t.Errorf("%s: Σ 1/τ short = %g, −Σ p = %g", tc.name, x.Short.Sum, x.PoleSum)
		}
		// The networks here see no negative resistance (C4 sees the short
		// of L2 at DC, and L2 that of C4 at high frequency: R = 0).
		for _, tcs := range []*TimeConstants{x.Open, x.Short} {
			for _, it := range tcs.Items {
				if !(it.R >= 0) {
					t.Errorf("%s: %s sees R = %g", tc.name, x.Elements[it.Element].Label(), it.R)
				}
			}
		}
	}
	if compared < 3 {
		t.Errorf("the transfer's denominator was compared on %d circuits only", compared)
	}
}

// Series R1–L1–R2 to ground, driven by a voltage: the inductor sees
// R1 + R2 in both methods and the only pole is −(R1 + R2)/L (closed form).
func TestInductorTimeConstant(t *testing.T) {
	c := circuit([]*cases.Part{
		{Name: "V1", Kind: cases.VoltageSource, Nodes: []string{"in", "gnd"}},
		part("R1", cases.Resistor, 30, "in", "a"),
		part("L1", cases.Inductor, 2e-3, "a", "out"),
		part("R2", cases.Resistor, 70, "out", "gnd"),
	}, &cases.Port{Name: "src", Source: "V1"}, &cases.Port{Name: "out", Plus: "out", Minus: "gnd"})
	x := explainOf(t, c, "src", "out", cases.VoltageGain)
	for _, tc := range []*TimeConstants{x.Open, x.Short} {
		if tc == nil || len(tc.Items) != 1 || relErr(tc.Items[0].R, 100) > 1e-12 || relErr(tc.Items[0].Tau, 2e-5) > 1e-12 {
			t.Errorf("time constants %+v, want R = 100 Ω, τ = 20 µs", tc)
		}
	}
	if f := x.Open.EstimateHz; relErr(f, 1/(2*math.Pi*2e-5)) > 1e-12 || relErr(*x.Bandwidth.HighHz, f) > 1e-9 {
		t.Errorf("f_high estimate %g, exact %g: a single pole makes them equal", f, *x.Bandwidth.HighHz)
	}
}

// The Miller effect in a common-emitter stage (Gray & Meyer; Sedra &
// Smith; from memory): Cμ sees R′(1 + gm·RL) + RL with R′ = RS∥rπ, Cπ sees
// R′, and Cμ's Miller-multiplied time constant dominates the upper corner:
// it has the largest share of the lowest pole, and the element most
// sensitive to that pole is Cμ or the gain-setting gm or RL.
func TestMillerCommonEmitter(t *testing.T) {
	x := explainOf(t, commonEmitter(), "src", "out", cases.VoltageGain)
	rp := ceRS * ceRPi / (ceRS + ceRPi)
	cmu, cpi := elementIndex(t, x, "Q1_c_mu"), elementIndex(t, x, "Q1_c_pi")
	want := map[int]float64{cmu: rp*(1+ceGm*ceRL) + ceRL, cpi: rp}
	for _, it := range x.Open.Items {
		if e := relErr(it.R, want[it.Element]); e > 1e-9 {
			t.Errorf("%s sees %g Ω, want %g (error %.2g)", x.Elements[it.Element].Label(), it.R, want[it.Element], e)
		}
	}
	if it := x.Open.Items[0]; it.Element != cmu || relErr(it.Miller, want[cmu]/(rp+ceRL)) > 1e-9 {
		t.Errorf("largest open-circuit τ: %+v, want Q1 c_mu with Miller ratio %g", it, want[cmu]/(rp+ceRL))
	}
	low := x.Poles[0]
	if x.Summary.HighPole != 0 {
		t.Fatalf("f_high set by pole %d, want the lowest", x.Summary.HighPole)
	}
	top := x.Elements[low.Sens[0].Element].Part
	if top != "Q1_c_mu" && top != "Q1_gm" && top != "RL" {
		t.Errorf("most sensitive element of the lowest pole is %s", top)
	}
	var best Sensitivity
	for _, s := range low.Sens {
		if s.Storage > best.Storage {
			best = s
		}
	}
	if best.Element != cmu || best.Storage < 0.9 {
		t.Errorf("largest storage share of the lowest pole: %s %.3f, want Q1 c_mu above 90 %%", x.Elements[best.Element].Label(), best.Storage)
	}
	words := strings.Join(x.Summary.Lines, "\n")
	for _, w := range []string{"f_high", "Q1 c_mu", "Miller ×", "open-circuit time constants estimate"} {
		if !strings.Contains(words, w) {
			t.Errorf("summary lacks %q:\n%s", w, words)
		}
	}
	// The open-circuit estimate 1/(2π·b1) is within 10 % of the exact
	// f_high here, where the poles are 30× apart (dominant pole).
	if e := relErr(x.Open.EstimateHz, *x.Bandwidth.HighHz); e > 0.1 {
		t.Errorf("estimate %g Hz, exact %g Hz", x.Open.EstimateHz, *x.Bandwidth.HighHz)
	}
}

// The embedded common-emitter amplifier: the low-frequency set is the
// coupling and bypass capacitors, the high-frequency set the transistor's;
// both estimates land near the exact band edges (within 25 %, the usual
// accuracy of the methods with interacting poles; common practice).
func TestExampleBandEstimates(t *testing.T) {
	c, devs := exampleEquivalent(t, "ce_amplifier")
	x, err := Explain(c, &cases.Transfer{From: "in", To: "out", Kind: cases.VoltageGain}, Options{Devices: devs})
	if err != nil {
		t.Fatal(err)
	}
	for i, e := range x.Elements {
		if !e.Storage() {
			continue
		}
		wantLow := e.Device == ""
		if x.LowFrequency[i] != wantLow {
			t.Errorf("%s: low-frequency %v", e.Label(), x.LowFrequency[i])
		}
	}
	if x.High == nil || x.Low == nil {
		t.Fatalf("estimates missing: %v", x.Notes)
	}
	if e := relErr(x.High.EstimateHz, *x.Bandwidth.HighHz); e > 0.25 {
		t.Errorf("f_high estimate %g, exact %g", x.High.EstimateHz, *x.Bandwidth.HighHz)
	}
	if e := relErr(x.Low.EstimateHz, *x.Bandwidth.LowHz); e > 0.25 {
		t.Errorf("f_low estimate %g, exact %g", x.Low.EstimateHz, *x.Bandwidth.LowHz)
	}
	t.Logf("%s", strings.Join(x.Summary.Lines, "\n"))
}

// Parallel capacitors are a loop: with either shorted the other sees
// R = 0, so the short-circuit sum is unbounded and a note says why, while
// the open-circuit sum is R·(C1 + C2), the one pole's time constant
// (closed form).
func TestCapacitorLoop(t *testing.T) {
	c := circuit([]*cases.Part{
		{Name: "V1", Kind: cases.VoltageSource, Nodes: []string{"in", "gnd"}},
		part("R1", cases.Resistor, 1e3, "in", "out"),
		part("C1", cases.Capacitor, 1e-9, "out", "gnd"),
		part("C2", cases.Capacitor, 3e-9, "out", "gnd"),
	}, &cases.Port{Name: "src", Source: "V1"}, &cases.Port{Name: "out", Plus: "out", Minus: "gnd"})
	x := explainOf(t, c, "src", "out", cases.VoltageGain)
	if relErr(x.Open.Sum, 4e-6) > 1e-12 || relErr(x.Open.Sum, x.B1) > 1e-9 {
		t.Errorf("Σ τ = %g, want R·(C1 + C2) = 4 µs", x.Open.Sum)
	}
	if x.Short == nil || !math.IsInf(x.Short.Sum, 1) || x.Short.Items[0].R != 0 {
		t.Errorf("short-circuit method %+v: want R = 0 and an unbounded sum", x.Short)
	}
	if !strings.Contains(strings.Join(x.Notes, "\n"), "loops of capacitors") {
		t.Errorf("notes %v", x.Notes)
	}
}

// The embedded CMOS stage: its coupling capacitor CIN forms a loop with
// the driving source and M1's cgs, and M2's cgd joins a node to itself.
// The band is then set by single poles (CIN for f_low, the load CL for
// f_high), so both estimates land within 1 % (dominant poles three
// decades apart; common practice).
func TestExampleMirrorEstimates(t *testing.T) {
	c, devs := exampleEquivalent(t, "cs_mirror")
	x, err := Explain(c, &cases.Transfer{From: "in", To: "out", Kind: cases.VoltageGain}, Options{Devices: devs})
	if err != nil {
		t.Fatal(err)
	}
	if x.High == nil || x.Low == nil {
		t.Fatalf("estimates missing: %v", x.Notes)
	}
	if e := relErr(x.High.EstimateHz, *x.Bandwidth.HighHz); e > 0.01 {
		t.Errorf("f_high estimate %g, exact %g", x.High.EstimateHz, *x.Bandwidth.HighHz)
	}
	if e := relErr(x.Low.EstimateHz, *x.Bandwidth.LowHz); e > 0.01 {
		t.Errorf("f_low estimate %g, exact %g", x.Low.EstimateHz, *x.Bandwidth.LowHz)
	}
	if lo := x.Low.Items; len(lo) != 1 || x.Elements[lo[0].Element].Part != "CIN" {
		t.Errorf("low-frequency set %+v, want CIN alone", lo)
	}
	words := strings.Join(x.Summary.Lines, "\n")
	for _, w := range []string{"set by CL", "set by CIN"} {
		if !strings.Contains(words, w) {
			t.Errorf("summary lacks %q:\n%s", w, words)
		}
	}
}
