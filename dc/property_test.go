package dc

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"tangent/cases"
)

// randomModels are the device models random circuits draw from; their
// values are of the size found in small-signal parts (common practice).
func randomModels() map[string]*cases.Model {
	return map[string]*cases.Model{
		"d":  model(cases.DeviceDiode, map[string]float64{"saturation_current": 2e-15, "emission_coefficient": 1.1, "series_resistance": 3}),
		"z":  model(cases.DeviceDiode, map[string]float64{"saturation_current": 1e-14, "breakdown_voltage": 4.7, "breakdown_current": 1e-3}),
		"qn": model(cases.DeviceNPN, map[string]float64{"saturation_current": 5e-15, "forward_beta": 150, "reverse_beta": 2, "forward_early_voltage": 80, "base_resistance": 100}),
		"qp": model(cases.DevicePNP, map[string]float64{"saturation_current": 2e-15, "forward_beta": 90, "reverse_beta": 3, "forward_early_voltage": 50, "emitter_resistance": 1}),
		"mn": model(cases.DeviceNMOS, map[string]float64{"threshold_voltage": 0.6, "process_transconductance": 150e-6, "width": 10e-6, "length": 1e-6, "channel_length_modulation": 0.03, "body_effect": 0.4}),
		"mp": model(cases.DevicePMOS, map[string]float64{"threshold_voltage": -0.7, "process_transconductance": 60e-6, "width": 20e-6, "length": 1e-6, "channel_length_modulation": 0.04}),
	}
}

// randomCircuit builds a valid circuit: a resistor tree ties every node to
// ground, supplies sit behind resistors, and devices, current sources and
// a controlled source connect random nodes.
func randomCircuit(rng *rand.Rand) *cases.Circuit {
	logR := func() float64 { return math.Pow(10, 2+3*rng.Float64()) } // 100 Ω … 100 kΩ
	n := 3 + rng.IntN(8)
	node := func(i int) string {
		if i < 0 {
			return cases.Ground
		}
		return fmt.Sprintf("n%d", i)
	}
	var parts []*cases.Part
	for i := 0; i < n; i++ {
		parts = append(parts, res(fmt.Sprintf("RT%d", i), node(i), node(rng.IntN(i+1)-1), logR()))
	}
	for k := 0; k < 2+rng.IntN(3); k++ {
		parts = append(parts, res(fmt.Sprintf("RX%d", k), node(rng.IntN(n)), node(rng.IntN(n+1)-1), logR()))
	}
	for k := 0; k < 1+rng.IntN(2); k++ {
		s := fmt.Sprintf("s%d", k)
		v := (rng.Float64()*2 - 0.5) * 12
		parts = append(parts, vsrc(fmt.Sprintf("V%d", k), s, cases.Ground, v), res(fmt.Sprintf("RS%d", k), s, node(rng.IntN(n)), 100+logR()/10))
	}
	for k := 0; k < rng.IntN(3); k++ {
		parts = append(parts, isrc(fmt.Sprintf("I%d", k), node(rng.IntN(n+1)-1), node(rng.IntN(n)), (rng.Float64()-0.3)*2e-3))
	}
	if rng.IntN(3) == 0 {
		parts = append(parts,
			&cases.Part{Name: "E1", Kind: cases.VCVS, Nodes: []string{"e", cases.Ground, node(rng.IntN(n)), node(rng.IntN(n+1) - 1)}, Value: 2 * rng.Float64()},
			res("RE1", "e", node(rng.IntN(n)), 1e3+logR()))
	}
	if rng.IntN(3) == 0 {
		parts = append(parts, &cases.Part{Name: "G1", Kind: cases.VCCS, Nodes: []string{node(rng.IntN(n)), node(rng.IntN(n+1) - 1), node(rng.IntN(n)), cases.Ground}, Value: 1e-4 * rng.Float64()})
	}
	for k := 0; k < 1+rng.IntN(4); k++ {
		a, b, c := node(rng.IntN(n)), node(rng.IntN(n+1)-1), node(rng.IntN(n+1)-1)
		name := fmt.Sprintf("X%d", k)
		switch rng.IntN(6) {
		case 0:
			parts = append(parts, diode(name, "d", a, b))
		case 1:
			parts = append(parts, diode(name, "z", b, a))
		case 2:
			parts = append(parts, bjt(name, "qn", a, b, c))
		case 3:
			parts = append(parts, bjt(name, "qp", a, b, c))
		case 4:
			parts = append(parts, mos(name, "mn", a, b, c, cases.Ground))
		default:
			parts = append(parts, mos(name, "mp", a, b, c, c))
		}
	}
	return build(randomModels(), parts...)
}

// On random valid circuits the solution satisfies Kirchhoff's current law
// at every node to 1e-9 of the node's largest current, and the absorbed
// powers sum to zero (Tellegen's theorem, which holds for any currents
// that satisfy KCL; common practice). The 1e-14 A floor is the rounding
// of a current computed through a small resistance, ε·V/R ≈ 2.2e-16·12 V
// /1 Ω ≈ 3e-15 A (IEEE 754 double precision), which no solver can beat at
// nodes that carry only leakage. The same circuit solved twice gives the
// same bits.
func TestRandomCircuits(t *testing.T) {
	methods := map[Method]int{}
	for seed := uint64(1); seed <= 1000; seed++ {
		c := randomCircuit(rand.New(rand.NewPCG(seed, 42)))
		op, err := Solve(c)
		if err != nil {
			t.Errorf("seed %d: %v", seed, err)
			continue
		}
		methods[op.Method]++
		checkBalance(t, op, 1e-9, 1e-14)
		if op.HelperConductance != 0 {
			t.Errorf("seed %d: helper conductance %g S left in", seed, op.HelperConductance)
		}
		again, err := Solve(c)
		if err != nil {
			t.Fatalf("seed %d: second solve: %v", seed, err)
		}
		for i := range op.X {
			if math.Float64bits(op.X[i]) != math.Float64bits(again.X[i]) {
				t.Fatalf("seed %d: not deterministic at unknown %d: %v vs %v", seed, i, op.X[i], again.X[i])
			}
		}
	}
	t.Logf("methods used: %v", methods)
}
