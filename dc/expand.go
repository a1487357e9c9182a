package dc

import (
	"fmt"
	"strings"

	"tangent/cases"
	"tangent/devices"
)

// TerminalResistance names a resistor that Expand put in for a device's
// terminal resistance.
type TerminalResistance struct {
	Part     string // the resistor part, e.g. "Q1.base_resistance"
	Device   string // the device part, e.g. "Q1"
	Terminal string // the device terminal, e.g. "base"
	Outer    string // the node of the file
	Inner    string // the internal node, e.g. "Q1:base"
}

// Expand returns a copy of c in which every nonzero device terminal
// resistance (diode series_resistance; bjt base_, collector_ and
// emitter_resistance, each divided by the part's area) is a resistor part
// of its own: "Q1.base_resistance" from the file's node to an internal
// node "Q1:base", to which the device's terminal moves. The device
// equations then see only the intrinsic junctions, and the AC stage finds
// the same resistors in the linear equivalent. Each resistor follows its
// device in the part list; internal nodes follow the file's nodes. c is
// not modified; it is returned itself when no device has a terminal
// resistance. An internal node or part name that is already taken is an
// error.
func Expand(c *cases.Circuit) (*cases.Circuit, []TerminalResistance, error) {
	devs, err := buildDevices(c)
	if err != nil {
		return nil, nil, err
	}
	return expand(c, devs)
}

// expand is Expand with the devices of c's parts already built.
func expand(c *cases.Circuit, devs []*device) (*cases.Circuit, []TerminalResistance, error) {
	var rs [][]termRes
	some := false
	for _, d := range devs {
		r := d.terminalResistances()
		rs = append(rs, r)
		some = some || len(r) > 0
	}
	if !some {
		return c, nil, nil
	}
	out := *c
	out.Parts = make([]*cases.Part, 0, len(c.Parts)+len(devs))
	out.Nodes = append([]string(nil), c.Nodes...)
	// Only names with a colon can clash with an internal node, and only
	// names with a dot with a terminal-resistance part.
	taken := map[string]bool{}
	for _, n := range c.Nodes {
		if strings.IndexByte(n, ':') >= 0 {
			taken[n] = true
		}
	}
	names := map[string]bool{}
	for _, p := range c.Parts {
		if strings.IndexByte(p.Name, '.') >= 0 {
			names[p.Name] = true
		}
		for _, n := range p.Nodes {
			if strings.IndexByte(n, ':') >= 0 {
				taken[n] = true
			}
		}
	}
	var added []TerminalResistance
	k := 0 // index into devs, which follow the device parts in order
	for _, p := range c.Parts {
		if !cases.IsDevice(p.Kind) {
			out.Parts = append(out.Parts, p)
			continue
		}
		r := rs[k]
		k++
		if len(r) == 0 {
			out.Parts = append(out.Parts, p)
			continue
		}
		dev := *p
		dev.Nodes = append([]string(nil), p.Nodes...)
		out.Parts = append(out.Parts, &dev)
		terms := cases.Terminals(p.Kind)
		for _, r := range r {
			inner := p.Name + ":" + terms[r.index]
			name := p.Name + "." + r.key
			if taken[inner] {
				return nil, nil, fmt.Errorf("dc: internal node %q for %s of %s clashes with a node of the circuit", inner, r.key, p.Name)
			}
			if names[name] {
				return nil, nil, fmt.Errorf("dc: part name %q for %s of %s clashes with a part of the circuit", name, r.key, p.Name)
			}
			taken[inner], names[name] = true, true
			outer := dev.Nodes[r.index]
			dev.Nodes[r.index] = inner
			out.Nodes = append(out.Nodes, inner)
			out.Parts = append(out.Parts, &cases.Part{
				Name: name, Kind: cases.Resistor, Nodes: []string{outer, inner}, Line: p.Line, Value: r.ohms,
			})
			added = append(added, TerminalResistance{Part: name, Device: p.Name, Terminal: terms[r.index], Outer: outer, Inner: inner})
		}
	}
	return &out, added, nil
}

type termRes struct {
	key   string
	index int // terminal index in cases.Terminals order
	ohms  float64
}

// terminalResistances returns the device's nonzero terminal resistances,
// already divided by the part's area by the device equations.
func (d *device) terminalResistances() []termRes {
	var rs []termRes
	add := func(key string, index int, r float64) {
		if r > 0 {
			rs = append(rs, termRes{key, index, r})
		}
	}
	switch d.kind {
	case cases.Diode:
		add("series_resistance", 0, d.diode.SeriesResistance) // at the anode
	case cases.BJT:
		add("collector_resistance", 0, d.bjt.CollectorResistance)
		add("base_resistance", 1, d.bjt.BaseResistance)
		add("emitter_resistance", 2, d.bjt.EmitterResistance)
	}
	return rs
}

// temperatureOf returns the circuit temperature, K; a circuit built in
// code with no temperature is at the nominal 27 °C.
func temperatureOf(c *cases.Circuit) float64 {
	if c.Temperature > 0 {
		return c.Temperature
	}
	return devices.NominalTemperature
}
