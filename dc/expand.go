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

// expand is Expand with the devices of c's parts already built. The new
// parts, their node lists and their names are carved from a few slabs:
// one allocation each instead of several per device.
func expand(c *cases.Circuit, devs []*device) (*cases.Circuit, []TerminalResistance, error) {
	var buf [3]termRes
	var names kindTerminals
	nres, ndev, nnodes, nbytes := 0, 0, 0, 0
	for _, d := range devs {
		rs := d.terminalResistances(buf[:0])
		if len(rs) == 0 {
			continue
		}
		ndev++
		nnodes += len(d.part.Nodes)
		terms := names.of(d.kind)
		for _, r := range rs {
			nres++
			nbytes += 2*len(d.part.Name) + 2 + len(terms[r.index]) + len(r.key)
		}
	}
	if nres == 0 {
		return c, nil, nil
	}
	// Only names with a colon can clash with an internal node, and only
	// names with a dot with a terminal-resistance part. The names made
	// here cannot clash with each other: part names are unique and
	// terminal names and keys hold neither character.
	var taken, partNames map[string]bool
	for _, n := range c.Nodes {
		if strings.IndexByte(n, ':') >= 0 {
			if taken == nil {
				taken = map[string]bool{}
			}
			taken[n] = true
		}
	}
	for _, p := range c.Parts {
		if strings.IndexByte(p.Name, '.') >= 0 {
			if partNames == nil {
				partNames = map[string]bool{}
			}
			partNames[p.Name] = true
		}
		for _, n := range p.Nodes {
			if strings.IndexByte(n, ':') >= 0 {
				if taken == nil {
					taken = map[string]bool{}
				}
				taken[n] = true
			}
		}
	}
	// All new names, as substrings of one string.
	var sb strings.Builder
	sb.Grow(nbytes)
	for _, d := range devs {
		terms := names.of(d.kind)
		for _, r := range d.terminalResistances(buf[:0]) {
			sb.WriteString(d.part.Name)
			sb.WriteByte(':')
			sb.WriteString(terms[r.index])
			sb.WriteString(d.part.Name)
			sb.WriteByte('.')
			sb.WriteString(r.key)
		}
	}
	text := sb.String()

	out := *c
	out.Parts = make([]*cases.Part, 0, len(c.Parts)+nres)
	out.Nodes = make([]string, len(c.Nodes), len(c.Nodes)+nres)
	copy(out.Nodes, c.Nodes)
	parts := make([]cases.Part, ndev+nres)
	nodes := make([]string, nnodes+2*nres)
	added := make([]TerminalResistance, 0, nres)
	k := 0 // index into devs, which follow the device parts in order
	for _, p := range c.Parts {
		if !cases.IsDevice(p.Kind) {
			out.Parts = append(out.Parts, p)
			continue
		}
		rs := devs[k].terminalResistances(buf[:0])
		k++
		if len(rs) == 0 {
			out.Parts = append(out.Parts, p)
			continue
		}
		dev := &parts[0]
		parts = parts[1:]
		*dev = *p
		dev.Nodes, nodes = nodes[:len(p.Nodes):len(p.Nodes)], nodes[len(p.Nodes):]
		copy(dev.Nodes, p.Nodes)
		out.Parts = append(out.Parts, dev)
		terms := names.of(p.Kind)
		for _, r := range rs {
			n := len(p.Name) + 1 + len(terms[r.index])
			inner := text[:n]
			m := n + len(p.Name) + 1 + len(r.key)
			name := text[n:m]
			text = text[m:]
			if taken[inner] {
				return nil, nil, fmt.Errorf("dc: internal node %q for %s of %s clashes with a node of the circuit", inner, r.key, p.Name)
			}
			if partNames[name] {
				return nil, nil, fmt.Errorf("dc: part name %q for %s of %s clashes with a part of the circuit", name, r.key, p.Name)
			}
			outer := dev.Nodes[r.index]
			dev.Nodes[r.index] = inner
			out.Nodes = append(out.Nodes, inner)
			res := &parts[0]
			parts = parts[1:]
			rn := nodes[:2:2]
			nodes = nodes[2:]
			rn[0], rn[1] = outer, inner
			*res = cases.Part{Name: name, Kind: cases.Resistor, Nodes: rn, Line: p.Line, Value: r.ohms}
			out.Parts = append(out.Parts, res)
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

// terminalResistances appends the device's nonzero terminal resistances,
// already divided by the part's area by the device equations, to rs.
func (d *device) terminalResistances(rs []termRes) []termRes {
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
