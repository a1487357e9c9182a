package dc

import (
	"fmt"

	"tangent/cases"
	"tangent/mna"
)

// Sweep is the operating point of a circuit along a DC sweep of one
// independent source: the transfer characteristic of a stage, the I-V
// curve of a junction.
type Sweep struct {
	Source string     // the swept part
	Kind   cases.Kind // voltage_source (values in V) or current_source (A)
	Values []float64
	// Points holds the operating point at each value. A point's Circuit
	// and System carry the swept value; everything else they share with
	// the other points.
	Points []*OperatingPoint
}

// SweepSource solves c at each of the given DC values of its independent
// source named source, in order. Each point starts from the answer of
// the one before (the first from zero, or from opt.Guess), which is how
// a sweep follows one branch of the solutions through a region where a
// circuit has several; where Newton fails from there the fallbacks of
// Solve take over. The circuit is set up once (see Prepare). A point that
// fails gives a *SweepError; the points before it are not returned.
func SweepSource(c *cases.Circuit, source string, values []float64, opt Options) (*Sweep, error) {
	k := -1
	for i, p := range c.Parts {
		if p.Name == source {
			k = i
		}
	}
	if k < 0 {
		return nil, fmt.Errorf("dc: sweep: no part named %q", source)
	}
	kind := c.Parts[k].Kind
	if kind != cases.VoltageSource && kind != cases.CurrentSource {
		return nil, fmt.Errorf("dc: sweep: %s is a %s; only an independent source (voltage_source, current_source) can be swept", source, kind)
	}
	p, err := Prepare(c)
	if err != nil {
		return nil, err
	}
	// The source's position in the expanded circuit, whose parts are
	// the file's with terminal resistances inserted after their device.
	ex := p.s.c
	ek := -1
	for i, q := range ex.Parts {
		if q.Name == source {
			ek = i
		}
	}
	sw := &Sweep{Source: source, Kind: kind, Values: append([]float64(nil), values...)}
	sw.Points = make([]*OperatingPoint, 0, len(values))
	sys0 := p.s.sys
	for _, v := range values {
		pc, sys := sweepPoint(ex, sys0, ek, v)
		p.s.c, p.s.sys = pc, sys
		copy(p.s.b, sys.DC)
		op, err := p.Solve(opt)
		if err != nil {
			return nil, &SweepError{Source: source, Kind: kind, Index: len(sw.Points), Value: v, Err: err}
		}
		sw.Points = append(sw.Points, op)
		opt.Guess = op
	}
	return sw, nil
}

// SweepError reports the point at which a sweep failed.
type SweepError struct {
	Source string
	Kind   cases.Kind
	Index  int     // the point, counted from 0
	Value  float64 // its value, V or A
	Err    error   // why it failed: a *NoConvergenceError, say
}

func (e *SweepError) Error() string {
	return fmt.Sprintf("dc: sweep of %s at %s: %v", e.Source, sweepValue(e.Kind, e.Value), e.Err)
}

func (e *SweepError) Unwrap() error { return e.Err }

// sweepPoint returns copies of the expanded circuit ex and its system
// with part k's DC value set to v: a new parts list sharing every part
// but k, and a system sharing all but its DC right-hand side.
func sweepPoint(ex *cases.Circuit, sys *mna.System, k int, v float64) (*cases.Circuit, *mna.System) {
	pc := *ex
	pc.Parts = append([]*cases.Part(nil), ex.Parts...)
	part := *ex.Parts[k]
	part.DC = v
	pc.Parts[k] = &part
	ps := *sys
	ps.DC = make([]float64, len(sys.DC))
	ps.DCSources(&pc, ps.DC)
	return &pc, &ps
}

// sweepValue formats a swept value with its unit for messages.
func sweepValue(k cases.Kind, v float64) string {
	if k == cases.CurrentSource {
		return fmt.Sprintf("%g A", v)
	}
	return fmt.Sprintf("%g V", v)
}
