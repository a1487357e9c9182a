package explain

import (
	"fmt"
	"strings"

	"tangent/cases"
	"tangent/mna"
)

// Element is one element value x of the linear circuit: a part with a
// value that the root sensitivities are taken with respect to.
type Element struct {
	Part  string     // the part's name in the linear circuit, e.g. "Q1_c_mu"
	Kind  cases.Kind // resistor, capacitor, inductor, vcvs, vccs, cccs, ccvs
	Value float64    // x in SI units: Ω, F, H, V/V, S, A/A, Ω (the part's Value)
	// Device is the device the part stands for ("Q1") and Param its
	// small-signal name ("c_mu", "gm", "base_resistance"); both "" for a
	// part of the file.
	Device, Param string
}

// Label is the element's name for people: "Q1 c_mu" for a device's
// small-signal element, the part's name otherwise.
func (e Element) Label() string {
	if e.Device != "" {
		return e.Device + " " + e.Param
	}
	return e.Part
}

// Unit returns the SI unit of the element's value.
func (e Element) Unit() string {
	switch e.Kind {
	case cases.Resistor, cases.CCVS:
		return "Ω"
	case cases.Capacitor:
		return "F"
	case cases.Inductor:
		return "H"
	case cases.VCCS:
		return "S"
	case cases.VCVS:
		return "V/V"
	}
	return "A/A"
}

// Storage reports whether the element stores energy (a capacitor or an
// inductor): the elements whose sensitivities sum to −1 for every root.
func (e Element) Storage() bool { return e.Kind == cases.Capacitor || e.Kind == cases.Inductor }

// hasValue reports whether parts of kind k carry an element value.
func hasValue(k cases.Kind) bool {
	switch k {
	case cases.Resistor, cases.Capacitor, cases.Inductor, cases.VCVS, cases.VCCS, cases.CCCS, cases.CCVS:
		return true
	}
	return false
}

// element is an Element with the derivative of the circuit's matrices with
// respect to its linear parameter x̂: x̂ = 1/R for a resistor (the stamp
// is linear in the conductance), x̂ = x for every other kind. dG and dC
// are ∂G/∂x̂ and ∂C/∂x̂ on the circuit's unknowns (mna.Build's layout).
type element struct {
	Element
	dG, dC mna.Triplets
	xhat   float64
	// a, b are the unknown indices of the two terminals of a two-terminal
	// part (−1 for ground), and k its branch (−1 when it has none).
	a, b, k int
}

// elements lists the element values of the linear circuit c in part order,
// with their derivative stamps on sys's layout (sys = mna.Build(c)). Each
// derivative is the part's own stamp (see mna's Build) with value 1:
//
//	resistor   ∂G/∂(1/R) = conductance stamp of 1 S between a and b
//	capacitor  ∂C/∂C     = the same stamp in C
//	inductor   ∂C/∂L     = −1 at (k, k), k its branch
//	vcvs       ∂G/∂μ     = −1 at (k, control+), +1 at (k, control−)
//	vccs       ∂G/∂gm    = transconductance stamp of 1 S
//	cccs       ∂G/∂β     = +1 at (from, kc), −1 at (to, kc), kc the control's branch
//	ccvs       ∂G/∂rm    = −1 at (k, kc)
//
// devices names the devices the parts stand for, for labels.
func elements(c *cases.Circuit, sys *mna.System, devices []string) ([]element, error) {
	var out []element
	for k, p := range c.Parts {
		if !hasValue(p.Kind) {
			continue
		}
		t := sys.Terminals[k]
		e := element{Element: Element{Part: p.Name, Kind: p.Kind, Value: p.Value}, xhat: p.Value, a: -1, b: -1, k: -1}
		e.Device, e.Param = deviceOf(p.Name, devices)
		if len(t) >= 2 {
			e.a, e.b = t[0], t[1]
		}
		if k, ok := sys.Layout.Branch(p.Name); ok {
			e.k = k
		}
		branch := func() (int, error) {
			if e.k < 0 {
				return 0, fmt.Errorf("explain: %s: no branch current in the layout", p.Name)
			}
			return e.k, nil
		}
		control := func() (int, error) {
			kc, ok := sys.Layout.Branch(p.Control)
			if !ok {
				return 0, fmt.Errorf("explain: %s: control part %q has no current", p.Name, p.Control)
			}
			return kc, nil
		}
		switch p.Kind {
		case cases.Resistor:
			if !(p.Value > 0) {
				return nil, fmt.Errorf("explain: %s: resistance %g Ω, want > 0", p.Name, p.Value)
			}
			e.xhat = 1 / p.Value
			mna.Conductance(&e.dG, t[0], t[1], 1)
		case cases.Capacitor:
			mna.Conductance(&e.dC, t[0], t[1], 1)
		case cases.Inductor:
			k, err := branch()
			if err != nil {
				return nil, err
			}
			e.dC.Add(k, k, -1)
		case cases.VCVS:
			k, err := branch()
			if err != nil {
				return nil, err
			}
			addIf(&e.dG, k, t[2], -1)
			addIf(&e.dG, k, t[3], 1)
		case cases.VCCS:
			mna.Transconductance(&e.dG, t[0], t[1], t[2], t[3], 1)
		case cases.CCCS:
			kc, err := control()
			if err != nil {
				return nil, err
			}
			addIf(&e.dG, t[0], kc, 1)
			addIf(&e.dG, t[1], kc, -1)
		case cases.CCVS:
			k, err := branch()
			if err != nil {
				return nil, err
			}
			kc, err := control()
			if err != nil {
				return nil, err
			}
			e.dG.Add(k, kc, -1)
		}
		out = append(out, e)
	}
	return out, nil
}

func addIf(m mna.Adder, i, j int, v float64) {
	if i >= 0 && j >= 0 {
		m.Add(i, j, v)
	}
}

// deviceOf splits a part name made by package smallsignal ("Q1_c_mu") or
// by the DC solver's expansion of terminal resistances
// ("Q1.base_resistance") into the device and its element, for a device
// of the list. The longest matching device name wins, so that Q1 and Q10
// are told apart.
func deviceOf(part string, devices []string) (device, param string) {
	for _, d := range devices {
		if len(d) <= len(device) {
			continue
		}
		for _, sep := range []string{"_", "."} {
			if rest, ok := strings.CutPrefix(part, d+sep); ok && rest != "" {
				device, param = d, rest
			}
		}
	}
	return device, param
}
