package smallsignal

import (
	"fmt"

	"tangent/cases"
	"tangent/dc"
)

// Equivalent is the linear incremental circuit of a biased circuit.
type Equivalent struct {
	// Circuit has the linear parts of the expanded circuit (terminal
	// resistances included as resistors), every device replaced by the
	// parts of its small-signal model, and the independent sources with
	// their AC values. Ports and transfers are those of the case.
	Circuit *cases.Circuit
	// Devices lists each device's small-signal parameters, in part order.
	Devices []Device
	// Bias is the operating point the equivalent was taken at.
	Bias *dc.OperatingPoint
}

// Device is one device's incremental model and the bias it came from.
// Exactly one of BJT, MOSFET and Diode is set.
type Device struct {
	Name   string
	Kind   cases.Kind
	Model  string
	Region string

	BJT    *BJTParams
	MOSFET *MOSParams
	Diode  *DiodeParams

	// Input names the input-side voltage of Validity: "be", "gs" or "ak";
	// SwingMinus < 0 < SwingPlus are the swings of it, in V, at which the
	// large-signal current departs 10 % from the tangent line (see
	// Validity). NaN where the device has no tangent (cutoff).
	Input                 string
	SwingMinus, SwingPlus float64
}

// Linearize returns the small-signal equivalent of a circuit at its
// operating point.
func Linearize(op *dc.OperatingPoint) (*Equivalent, error) {
	src := op.Circuit
	eq := &cases.Circuit{
		File:        src.File,
		Title:       src.Title,
		Temperature: src.Temperature,
		Models:      map[string]*cases.Model{},
		Ports:       src.Ports,
		Transfers:   src.Transfers,
		Solver:      src.Solver,
	}
	e := &Equivalent{Circuit: eq, Bias: op}
	names := map[string]bool{}
	for _, p := range src.Parts {
		names[p.Name] = true
	}
	add := func(parts ...*cases.Part) error {
		for _, p := range parts {
			if names[p.Name] {
				return fmt.Errorf("smallsignal: the equivalent's part %s clashes with a part of the circuit", p.Name)
			}
			eq.Parts = append(eq.Parts, p)
		}
		return nil
	}
	for i := range op.Parts {
		r := &op.Parts[i]
		p := partByName(src, r.Name)
		if p == nil {
			return nil, fmt.Errorf("smallsignal: no part %s in the circuit", r.Name)
		}
		if r.Device == nil {
			q := *p
			eq.Parts = append(eq.Parts, &q)
			continue
		}
		d, parts, err := linearizeDevice(p, r.Device)
		if err != nil {
			return nil, err
		}
		if err := add(parts...); err != nil {
			return nil, err
		}
		e.Devices = append(e.Devices, d)
	}
	if g := op.HelperConductance; g > 0 {
		for _, n := range op.Nodes {
			if err := add(conductance("dc_helper:"+n.Name, n.Name, cases.Ground, g)); err != nil {
				return nil, err
			}
		}
	}
	eq.Nodes = NodesOf(eq.Parts)
	return e, nil
}

func linearizeDevice(p *cases.Part, r *dc.DeviceResult) (Device, []*cases.Part, error) {
	d := Device{Name: p.Name, Kind: p.Kind, Model: p.Model, Region: r.Region}
	v := func(i int) float64 { return r.Voltages[i].Value }
	switch {
	case r.BJT != nil:
		hp := HybridPi(r.BJT, v(0), v(1))
		d.BJT = &hp
		d.Input = "be"
		d.SwingMinus, d.SwingPlus = BJTValidity(r.BJT, v(0), v(1))
		return d, hp.Parts(p.Name, p.Nodes[0], p.Nodes[1], p.Nodes[2]), nil
	case r.MOSFET != nil:
		mp := SquareLaw(r.MOSFET, v(0), v(1), v(2))
		d.MOSFET = &mp
		d.Input = "gs"
		d.SwingMinus, d.SwingPlus = MOSValidity(r.MOSFET, v(0), v(1), v(2))
		body := p.Nodes[2]
		if len(p.Nodes) > 3 && p.Nodes[3] != "" {
			body = p.Nodes[3]
		}
		return d, mp.Parts(p.Name, p.Nodes[0], p.Nodes[1], p.Nodes[2], body), nil
	case r.Diode != nil:
		jp := Junction(r.Diode, v(0))
		d.Diode = &jp
		d.Input = "ak"
		d.SwingMinus, d.SwingPlus = DiodeValidity(r.Diode, v(0))
		return d, jp.Parts(p.Name, p.Nodes[0], p.Nodes[1]), nil
	}
	return d, nil, fmt.Errorf("smallsignal: %s: no device evaluation at the bias point", p.Name)
}

func partByName(c *cases.Circuit, name string) *cases.Part {
	for _, p := range c.Parts {
		if p.Name == name {
			return p
		}
	}
	return nil
}

// NodesOf lists the nodes of parts in order of first appearance (parts in
// order, terminals in cases.Terminals order), ground excluded: the order
// package cases gives the nodes of a file, so an exported equivalent read
// back numbers its unknowns the same way.
func NodesOf(parts []*cases.Part) []string {
	seen := map[string]bool{cases.Ground: true}
	var nodes []string
	for _, p := range parts {
		for _, n := range p.Nodes {
			if !seen[n] {
				seen[n] = true
				nodes = append(nodes, n)
			}
		}
	}
	return nodes
}
