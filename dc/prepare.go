package dc

import (
	"fmt"

	"tangent/cases"
	"tangent/internal/sparse"
	"tangent/mna"
)

// Prepared is a circuit set up for its operating point: the devices
// built, their terminal resistances expanded (see Expand), the MNA
// equations written, the Newton matrix's pattern laid out, its pivot
// order chosen at the start point from zero, and the layout of the result
// tables worked out. Solve then costs only the Newton iterations and the
// numbers of the tables, so a caller that solves one circuit many times
// (SweepSource, a benchmark, a run from several start points) pays the
// set-up once.
//
// Every Solve starts from the same prepared state, so its answer depends
// only on the circuit and the options, never on earlier solves: a
// Prepared's Solve and a fresh SolveWith give the same numbers, bit for
// bit. A Prepared is not safe for concurrent use. The operating points it
// returns share only its immutable parts (the expanded circuit, the
// System, the terminal resistances and the device parameters) and stay
// valid after later solves.
type Prepared struct {
	s   *solver
	trs []TerminalResistance
	// lu holds the pivot order analysed at the start point from zero.
	// It never factors again: each Solve restarts the solver's working
	// LU from it (sparse.LU.Restart), so a re-analysis during one solve
	// cannot reach the next.
	lu     sparse.LU
	layout resultLayout
}

// Prepare sets c up for Solve. It fails on what no iteration can mend:
// an undefined or mismatched model, a clash of internal names, or
// equations that are structurally singular (*SingularError).
func Prepare(c *cases.Circuit) (*Prepared, error) {
	devs, err := buildDevices(c)
	if err != nil {
		return nil, err
	}
	ex, trs, err := expand(c, devs)
	if err != nil {
		return nil, err
	}
	sys, err := mna.Build(ex)
	if err != nil {
		return nil, err
	}
	s, err := newSolver(ex, sys, devs)
	if err != nil {
		return nil, err
	}
	p := &Prepared{s: s, trs: trs}
	// The first matrix plain Newton from zero factors: devices at zero,
	// unlimited, no helper conductance, full sources. When it is
	// singular (say every transistor off) there is no order to keep, and
	// each Solve analyses as it goes.
	s.resetDevices()
	s.evaluate(false)
	s.assemble(0, 1)
	if s.lu.Factor(s.jac) == nil {
		p.lu, s.lu = s.lu, sparse.LU{} // each Solve restarts a working LU from it
	}
	p.layout = newResultLayout(s, trs)
	return p, nil
}

// Solve finds the operating point as SolveWith does.
func (p *Prepared) Solve(opt Options) (*OperatingPoint, error) {
	s := p.s
	s.lu.Restart(&p.lu)
	x0 := s.x0
	clear(x0)
	if g := opt.Guess; g != nil && g.System != nil && g.System.Layout == s.sys.Layout && len(g.X) == len(x0) {
		copy(x0, g.X) // an answer of this circuit (a sweep's last point)
	} else if g != nil && g.System != nil {
		for i, u := range s.sys.Layout.Unknowns {
			var j int
			var ok bool
			if u.Branch {
				j, ok = g.System.Layout.Branch(u.Name)
			} else {
				j, ok = g.System.Layout.Node(u.Name)
			}
			if ok && j >= 0 && j < len(g.X) {
				x0[i] = g.X[j]
			}
		}
	}
	fallbacks := opt.Fallbacks
	if fallbacks == nil {
		fallbacks = []Method{ConductanceContinuation, SourceRamp}
	}
	if opt.NoFallbacks {
		fallbacks = nil
	}
	for _, f := range fallbacks {
		if f != ConductanceContinuation && f != SourceRamp {
			return nil, fmt.Errorf("dc: unknown fallback method %q", f)
		}
	}
	var attempts []Attempt
	var reports []runReport
	total := 0
	for k := -1; k < len(fallbacks); k++ {
		name := Newton
		if k >= 0 {
			name = fallbacks[k]
		}
		var r attemptResult
		switch name {
		case Newton:
			r = s.plainNewton(x0)
		case ConductanceContinuation:
			r = s.conductanceContinuation(x0)
		default:
			r = s.sourceRamp()
		}
		total += r.iterations
		if attempts == nil {
			attempts = make([]Attempt, 0, 1+len(fallbacks))
		}
		attempts = append(attempts, Attempt{Method: name, Iterations: r.iterations, Converged: r.converged, Detail: r.detail})
		if r.converged {
			return p.result(attempts, total, name, r.helper), nil
		}
		reports = append(reports, s.last)
	}
	return nil, s.noConvergence(attempts, reports)
}
