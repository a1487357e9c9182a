package explain

import (
	"errors"
	"fmt"

	"tangent/ac"
	"tangent/cases"
	"tangent/smallsignal"
)

// PortEquivalent is what a port looks like from outside when the circuit
// is driven at another port: a Thevenin source Voc behind Zth, or
// equivalently a Norton source Isc = Voc/Zth in parallel with Zth. With a
// load impedance ZL across the port,
//
//	V = Voc·ZL/(ZL + Zth),   I = Isc·Zth/(ZL + Zth)   (into the load).
//
// Each is a rational function of s per unit of the drive u (1 V for a
// voltage drive, 1 A for a current drive), computed by package ac on its
// own problem rather than divided out, so that each has its own poles and
// zeros:
//
//	Voc/u   the voltage at the port left open: ac kind voltage (u in V)
//	        or transimpedance (u in A);
//	Isc/u   the current out of the port's plus node through a short:
//	        transconductance or current;
//	Zth     V/I at the port with the drive zeroed (a voltage drive
//	        shorted, a current drive open) and every independent source
//	        zeroed (Ω).
type PortEquivalent struct {
	Port, Drive  string // port names
	VoltageDrive bool   // the drive is a test voltage (else a test current)
	Voc, Zth     *ac.Rational
	// Isc is nil where the port may not be shorted (an ideal voltage
	// source, such as a vcvs output, drives it: Zth ≡ 0); NoNorton says
	// why.
	Isc      *ac.Rational
	NoNorton string
}

// PortAt returns the equivalent of port seen from outside the linear circuit
// c when it is driven at port drive by a test voltage (voltageDrive) or
// current, as ac.Setup drives a transfer's from port.
func PortAt(c *cases.Circuit, drive, port string, voltageDrive bool) (*PortEquivalent, error) {
	if drive == port {
		return nil, fmt.Errorf("explain: port equivalent of %s driven at itself", port)
	}
	dp, err := portNamed(c, drive)
	if err != nil {
		return nil, err
	}
	if _, err := portNamed(c, port); err != nil {
		return nil, err
	}
	vk, ik := cases.VoltageGain, cases.Transconductance
	if !voltageDrive {
		vk, ik = cases.Transimpedance, cases.CurrentGain
	}
	pe := &PortEquivalent{Port: port, Drive: drive, VoltageDrive: voltageDrive}
	analyze := func(c *cases.Circuit, from, to string, k cases.TransferKind) (*ac.Rational, error) {
		p, err := ac.Setup(c, &cases.Transfer{From: from, To: to, Kind: k})
		if err != nil {
			return nil, err
		}
		r, err := ac.Analyze(p)
		if err != nil {
			return nil, fmt.Errorf("explain: port %s driven at %s (%s): %w", port, drive, k, err)
		}
		return r, nil
	}
	if pe.Voc, err = analyze(c, drive, port, vk); err != nil {
		return nil, err
	}
	if pe.Isc, err = analyze(c, drive, port, ik); errors.Is(err, ac.ErrSingularPencil) {
		pe.NoNorton = "shorting the port makes the circuit singular: an ideal voltage source drives it"
	} else if err != nil {
		return nil, err
	}
	zc, err := zeroedDrive(c, dp, voltageDrive)
	if err != nil {
		return nil, err
	}
	if pe.Zth, err = analyze(zc, port, port, cases.InputImpedance); err != nil {
		return nil, err
	}
	return pe, nil
}

func portNamed(c *cases.Circuit, name string) (*cases.Port, error) {
	for _, p := range c.Ports {
		if p.Name == name {
			return p, nil
		}
	}
	return nil, fmt.Errorf("explain: no port %q", name)
}

// zeroedDriveName names the zero-volt source that stands for a zeroed
// voltage drive; the colon keeps it apart from the parts of a file.
const zeroedDriveName = "explain:zeroed_drive"

// zeroedDrive returns a copy of c in which the drive port is zeroed as
// the drive's kind requires, so that an input impedance at another port
// sees what a Thevenin impedance must: a voltage drive becomes a short (a
// zero-volt source across a node pair, or in place of a current source),
// a current drive an open (a voltage source that defines the port is
// left out, a current source stays open). Parts are shared, not copied; c
// is not modified.
func zeroedDrive(c *cases.Circuit, dp *cases.Port, voltageDrive bool) (*cases.Circuit, error) {
	dp = ac.SourcePort(c, dp) // as ac.Setup reads the port
	q := *c
	q.Parts = make([]*cases.Part, 0, len(c.Parts)+1)
	found := dp.Source == ""
	for _, p := range c.Parts {
		if p.Name != dp.Source {
			q.Parts = append(q.Parts, p)
			continue
		}
		found = true
		switch {
		case p.Kind == cases.VoltageSource && voltageDrive, p.Kind == cases.CurrentSource && !voltageDrive:
			q.Parts = append(q.Parts, p) // zeroed, it is the short or the open already
		case p.Kind == cases.CurrentSource:
			q.Parts = append(q.Parts, &cases.Part{Name: zeroedDriveName, Kind: cases.VoltageSource, Nodes: []string{p.Nodes[1], p.Nodes[0]}})
		}
	}
	if !found {
		return nil, fmt.Errorf("explain: port %s: no source %q", dp.Name, dp.Source)
	}
	if dp.Source == "" && voltageDrive {
		q.Parts = append(q.Parts, &cases.Part{Name: zeroedDriveName, Kind: cases.VoltageSource, Nodes: []string{dp.Plus, dp.Minus}})
	}
	// Nodes that only a removed source touched would float.
	q.Nodes = smallsignal.NodesOf(q.Parts)
	return &q, nil
}
