package devices

import "math"

// depletionBreak is the fraction of the junction potential at which the
// depletion capacitance leaves its power law for its tangent line. DESIGN.md
// fixes it at one half.
const depletionBreak = 0.5

// depletionCapacitance returns the depletion (junction) capacitance in
// farads of a pn junction at forward voltage v (DESIGN.md):
//
//	Cj(V) = Cj0/(1 − V/φ)^m                                  for V ≤ φ/2
//	Cj(V) = Cj0/(1 − fc)^m·(1 + m·(V − fc·φ)/(φ·(1 − fc)))   for V > φ/2
//
// with fc = 1/2: beyond φ/2 the tangent line of the power law, which would
// otherwise grow without bound at V = φ. cj0 is the zero-bias capacitance,
// phi the junction potential φ in volts, m the grading coefficient.
func depletionCapacitance(v, cj0, phi, m float64) float64 {
	if cj0 == 0 {
		return 0
	}
	if v <= depletionBreak*phi {
		return cj0 * math.Pow(1-v/phi, -m)
	}
	c := cj0 * math.Pow(1-depletionBreak, -m)
	return c * (1 + m*(v-depletionBreak*phi)/(phi*(1-depletionBreak)))
}
