package dc

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"tangent/cases"
)

// Expand turns terminal resistances into resistor parts to internal
// nodes, dividing them by the area (DESIGN.md: area divides the terminal
// resistances).
func TestExpand(t *testing.T) {
	ms := map[string]*cases.Model{
		"q": model(cases.DeviceNPN, map[string]float64{"saturation_current": 1e-15, "base_resistance": 200, "emitter_resistance": 2}),
		"d": model(cases.DeviceDiode, map[string]float64{"saturation_current": 1e-14}),
	}
	q := bjt("Q1", "q", "c", "b", "e")
	q.Area = 4
	c := build(ms, vsrc("V", "c", "gnd", 5), res("RB", "c", "b", 100e3), q, res("RE", "e", "gnd", 1e3), diode("D1", "d", "b", "gnd"))
	ex, trs, err := Expand(c)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, p := range ex.Parts {
		names = append(names, p.Name)
	}
	if got := strings.Join(names, " "); got != "V RB Q1 Q1.base_resistance Q1.emitter_resistance RE D1" {
		t.Errorf("parts %s", got)
	}
	if got := strings.Join(ex.Parts[2].Nodes, " "); got != "c Q1:base Q1:emitter" {
		t.Errorf("Q1 nodes %s", got)
	}
	if r := ex.Parts[3]; r.Value != 50 || r.Nodes[0] != "b" || r.Nodes[1] != "Q1:base" {
		t.Errorf("base resistance %+v, want 50 Ω from b to Q1:base", r)
	}
	if len(trs) != 2 || trs[1].Terminal != "emitter" || trs[1].Outer != "e" {
		t.Errorf("terminal resistances %+v", trs)
	}
	if c.Parts[2].Nodes[1] != "b" || len(c.Parts) != 5 {
		t.Error("Expand modified its input")
	}
	// Names that are taken.
	clash := build(ms, vsrc("V", "Q1:base", "gnd", 5), res("RB", "Q1:base", "b", 100e3), bjt("Q1", "q", "Q1:base", "b", "gnd"))
	if _, _, err := Expand(clash); err == nil || !strings.Contains(err.Error(), `"Q1:base"`) {
		t.Errorf("node clash: err = %v", err)
	}
	clash = build(ms, vsrc("V", "c", "gnd", 5), res("Q1.base_resistance", "c", "b", 1e3), bjt("Q1", "q", "c", "b", "gnd"))
	if _, _, err := Expand(clash); err == nil || !strings.Contains(err.Error(), "Q1.base_resistance") {
		t.Errorf("part clash: err = %v", err)
	}
}

// A node reached only through a capacitor and a gate has no DC path: the
// error names it (package cases catches this in files; dc must too).
func TestStructurallySingular(t *testing.T) {
	ms := map[string]*cases.Model{"n": model(cases.DeviceNMOS, map[string]float64{"threshold_voltage": 0.5, "process_transconductance": 1e-4, "width": 1e-5, "length": 1e-6})}
	c := build(ms,
		vsrc("V", "vdd", "gnd", 3),
		res("RD", "vdd", "d", 1e3),
		mos("M1", "n", "d", "float", "gnd", "gnd"),
		&cases.Part{Name: "C1", Kind: cases.Capacitor, Nodes: []string{"vdd", "float"}, Value: 1e-9})
	_, err := Solve(c)
	var se *SingularError
	if !errors.As(err, &se) || len(se.Nodes) != 1 || se.Nodes[0] != "float" {
		t.Fatalf("err = %v, want a SingularError naming node float", err)
	}
	if !strings.Contains(err.Error(), `"float"`) {
		t.Errorf("message %q", err)
	}
}

// Two cut-off transistors in series leave their middle node with nothing
// to tie it: the answer keeps the 1e-12 S helper conductance (the bound
// DESIGN.md allows) and says so; with it the node sits at the voltage
// where the two channels' zero currents and the helper balance, 0 V.
func TestHelperConductanceLeftIn(t *testing.T) {
	ms := map[string]*cases.Model{"n": model(cases.DeviceNMOS, map[string]float64{"threshold_voltage": 0.5, "process_transconductance": 1e-4, "width": 1e-5, "length": 1e-6})}
	c := build(ms,
		vsrc("V", "vdd", "gnd", 3),
		mos("M1", "n", "vdd", "gnd", "mid", "gnd"),
		mos("M2", "n", "mid", "gnd", "gnd", "gnd"))
	op, err := Solve(c)
	if err != nil {
		t.Fatal(err)
	}
	if op.HelperConductance != 1e-12 || op.Method != ConductanceContinuation {
		t.Errorf("helper %g S by %s, want 1e-12 S by conductance continuation", op.HelperConductance, op.Method)
	}
	if v := nodeV(t, op, "mid"); v != 0 {
		t.Errorf("V(mid) = %g", v)
	}
	checkBalance(t, op, 1e-9, 1e-14)
}

// Starting from the answer, Newton needs one step to confirm it; starting
// from the answer of a slightly changed circuit, a few.
func TestSolveFrom(t *testing.T) {
	c := amplifierChain(3)
	op, err := Solve(c)
	if err != nil {
		t.Fatal(err)
	}
	again, err := SolveFrom(c, op)
	if err != nil {
		t.Fatal(err)
	}
	if again.Iterations != 1 || again.Method != Newton {
		t.Errorf("from the answer: %d iterations by %s", again.Iterations, again.Method)
	}
	for i := range op.X {
		if !near(again.X[i], op.X[i], 1e-9, 1e-12) {
			t.Errorf("unknown %d: %g, was %g", i, again.X[i], op.X[i])
		}
	}
	c.Parts[0].DC = 12.1 // supply up 100 mV
	moved, err := SolveFrom(c, op)
	if err != nil {
		t.Fatal(err)
	}
	if moved.Iterations > 4 {
		t.Errorf("after a 100 mV change: %d iterations", moved.Iterations)
	}
	// By hand: the base divider passes 10/66 of the change.
	if d := nodeV(t, moved, "b0") - nodeV(t, op, "b0"); math.Abs(d-0.1*10/66) > 2e-3 {
		t.Errorf("ΔV(b0) = %g V, want about %g V", d, 0.1*10/66)
	}
}

// The failure report lists every method tried with its iterations, and
// the nodes and devices that did not settle.
func TestNoConvergenceReport(t *testing.T) {
	c := amplifierChain(1)
	c.Parts = append(c.Parts, bjt("Q9", "q", "c0", "b0", "e0"))
	c.Solver.MaxIterations = 2
	_, err := Solve(c)
	var nc *NoConvergenceError
	if !errors.As(err, &nc) {
		t.Fatalf("err = %v", err)
	}
	if len(nc.Attempts) != 3 || nc.Attempts[0].Method != Newton || nc.Attempts[1].Method != ConductanceContinuation || nc.Attempts[2].Method != SourceRamp {
		t.Errorf("attempts %+v", nc.Attempts)
	}
	msg := err.Error()
	for _, want := range []string{"dc: test: no operating point found", "tried newton: no convergence in 2 iterations", "tried conductance_continuation", "tried source_ramp", "did not settle", "devices whose junctions still moved: Q"} {
		if !strings.Contains(msg, want) {
			t.Errorf("message lacks %q:\n%s", want, msg)
		}
	}
	if len(nc.Nodes) == 0 || len(nc.Devices) == 0 {
		t.Errorf("nodes %v devices %v", nc.Nodes, nc.Devices)
	}
}

// A device's current may control a cccs: mna moves the diode behind a
// zero-volt sense branch, and the diode still reports its own current.
// By hand: the cccs pushes 3·I(D1) into 1 kΩ.
func TestDeviceControlsCCCS(t *testing.T) {
	ms := map[string]*cases.Model{"d": model(cases.DeviceDiode, map[string]float64{"saturation_current": 1e-14, "series_resistance": 5})}
	c := build(ms,
		vsrc("V", "in", "gnd", 5),
		res("R1", "in", "a", 4.7e3),
		diode("D1", "d", "a", "gnd"),
		&cases.Part{Name: "F1", Kind: cases.CCCS, Nodes: []string{"gnd", "o"}, Control: "D1", Value: 3},
		res("R2", "o", "gnd", 1e3))
	op, err := Solve(c)
	if err != nil {
		t.Fatal(err)
	}
	id := op.Part("D1").Current
	if got := nodeV(t, op, "o"); !near(got, 3*id*1e3, 1e-12, 0) {
		t.Errorf("V(o) = %g V, want 3·%g A·1 kΩ", got, id)
	}
	if ir := op.Part("R1").Current; !near(id, ir, 1e-9, 0) {
		t.Errorf("I(D1) = %g A, I(R1) = %g A", id, ir)
	}
	checkBalance(t, op, 1e-9, 1e-14)
}

// Parts that share a model but not its scaling (area, width, multiplier)
// each get their own parameters; parts that share both share them. Each
// device sits directly across ideal sources, so its current is the closed
// form of its equation: the Shockley law I = area·Is·(e^(V/VT) − 1)
// (DESIGN.md) and the square law in saturation
// Id = (k′/2)·m·(W/L)·(Vgs − Vt)² (DESIGN.md).
func TestSharedModelScaling(t *testing.T) {
	const (
		is, vd   = 2e-14, 0.55
		kp, vt   = 120e-6, 0.7
		vgs, vds = 1.5, 3.0
		length   = 2e-6
	)
	ms := map[string]*cases.Model{
		"d": model(cases.DeviceDiode, map[string]float64{"saturation_current": is}),
		"n": model(cases.DeviceNMOS, map[string]float64{"threshold_voltage": vt, "process_transconductance": kp, "length": length}),
	}
	parts := []*cases.Part{vsrc("VD", "a", "gnd", vd), vsrc("VG", "g", "gnd", vgs), vsrc("VDS", "dr", "gnd", vds)}
	areas := []float64{1, 3, 1, 0.5}
	for k, a := range areas {
		d := diode(fmt.Sprintf("D%d", k), "d", "a", "gnd")
		d.Area = a
		parts = append(parts, d)
	}
	type mosCase struct{ width, mult float64 }
	mosCases := []mosCase{{10e-6, 1}, {30e-6, 1}, {10e-6, 2}, {10e-6, 1}}
	for k, c := range mosCases {
		m := mos(fmt.Sprintf("M%d", k), "n", "dr", "g", "gnd", "gnd")
		m.Width, m.Multiplier = c.width, c.mult
		parts = append(parts, m)
	}
	op, err := Solve(build(ms, parts...))
	if err != nil {
		t.Fatal(err)
	}
	for k, a := range areas {
		want := a * is * math.Expm1(vd/vtRoom)
		if got := op.Part(fmt.Sprintf("D%d", k)).Current; !near(got, want, 1e-12, 0) {
			t.Errorf("D%d (area %g): I = %g A, want %g A", k, a, got, want)
		}
	}
	for k, c := range mosCases {
		want := kp / 2 * c.mult * c.width / length * (vgs - vt) * (vgs - vt)
		if got := op.Part(fmt.Sprintf("M%d", k)).Current; !near(got, want, 1e-12, 0) {
			t.Errorf("M%d (W %g m, m %g): Id = %g A, want %g A", k, c.width, c.mult, got, want)
		}
	}
}

// maxNonNegative is math.Max (standard library) on magnitudes: +0,
// positive numbers, +Inf and NaN.
func TestMaxNonNegative(t *testing.T) {
	values := []float64{0, 5e-324, 1e-300, 1, 2, 5e300, math.MaxFloat64, math.Inf(1), math.NaN()}
	for _, a := range values {
		for _, b := range values {
			if got, want := maxNonNegative(a, b), math.Max(a, b); math.Float64bits(got) != math.Float64bits(want) {
				t.Errorf("maxNonNegative(%g, %g) = %g, math.Max gives %g", a, b, got, want)
			}
		}
	}
}
