package smallsignal

import (
	"math"

	"tangent/cases"
)

// The linear parts that stand for a device are named after the device and
// the quantity, so a reader of the equivalent can point back: Q1_gm,
// Q1_r_pi, M1_gds, D1_c_j. A conductance is drawn as a resistor when it is
// positive and as a vccs controlled by its own terminals when it is
// negative (a resistor value must be positive); one below OpenConductance
// is left out, as are zero capacitances.

// conductance returns the part for a conductance g between a and b, or nil.
func conductance(name, a, b string, g float64) *cases.Part {
	switch {
	case math.Abs(g) < OpenConductance:
		return nil
	case g > 0:
		return &cases.Part{Name: name, Kind: cases.Resistor, Value: 1 / g, Nodes: []string{a, b}}
	default:
		return &cases.Part{Name: name, Kind: cases.VCCS, Value: g, Nodes: []string{a, b, a, b}}
	}
}

// transconductance returns a vccs pushing gm·(V(cp) − V(cm)) from node
// from into node to, or nil when gm is zero.
func transconductance(name, from, to, cp, cm string, gm float64) *cases.Part {
	if gm == 0 {
		return nil
	}
	return &cases.Part{Name: name, Kind: cases.VCCS, Value: gm, Nodes: []string{from, to, cp, cm}}
}

func capacitor(name, a, b string, c float64) *cases.Part {
	if c == 0 {
		return nil
	}
	return &cases.Part{Name: name, Kind: cases.Capacitor, Value: c, Nodes: []string{a, b}}
}

func collect(parts ...*cases.Part) []*cases.Part {
	out := parts[:0]
	for _, p := range parts {
		if p != nil {
			out = append(out, p)
		}
	}
	return out
}

// Parts returns the hybrid-π equivalent of a bjt named name whose intrinsic
// collector, base and emitter are the nodes c, b, e.
func (p BJTParams) Parts(name, c, b, e string) []*cases.Part {
	return collect(
		conductance(name+"_r_pi", b, e, p.GPi),
		conductance(name+"_r_mu", b, c, p.GMu),
		conductance(name+"_r_o", c, e, p.GO),
		transconductance(name+"_gm", c, e, b, e, p.Gm),
		capacitor(name+"_c_pi", b, e, p.CPi),
		capacitor(name+"_c_mu", b, c, p.CMu),
	)
}

// Parts returns the small-signal equivalent of a mosfet named name with
// drain, gate, source and body nodes d, g, s, bd: id = gm·vgs + gds·vds +
// gmb·vbs from drain to source, and the gate capacitances.
func (p MOSParams) Parts(name, d, g, s, bd string) []*cases.Part {
	var gmb *cases.Part
	if bd != s {
		gmb = transconductance(name+"_gmb", d, s, bd, s, p.Gmb)
	}
	var cgb *cases.Part
	if bd != g {
		cgb = capacitor(name+"_cgb", g, bd, p.Cgb)
	}
	return collect(
		transconductance(name+"_gm", d, s, g, s, p.Gm),
		conductance(name+"_gds", d, s, p.Gds),
		gmb,
		capacitor(name+"_cgs", g, s, p.Cgs),
		capacitor(name+"_cgd", g, d, p.Cgd),
		cgb,
	)
}

// Parts returns the small-signal equivalent of a diode named name between
// intrinsic anode a and cathode k.
func (p DiodeParams) Parts(name, a, k string) []*cases.Part {
	return collect(
		conductance(name+"_gd", a, k, p.Gd),
		capacitor(name+"_c_j", a, k, p.CJ),
		capacitor(name+"_c_d", a, k, p.CD),
	)
}
