package dc

import (
	"fmt"
	"math"

	"tangent/cases"
	"tangent/devices"
	"tangent/mna"
)

// Method names how an operating point was found.
type Method string

// Methods, in the order Solve tries them.
const (
	Newton                  Method = "newton"                   // plain Newton-Raphson from the start point
	ConductanceContinuation Method = "conductance_continuation" // helper conductance stepped to zero
	SourceRamp              Method = "source_ramp"              // sources ramped from zero, then the helper stepped out
)

// Options controls Solve.
type Options struct {
	// NoFallbacks stops after plain Newton: no continuation is tried.
	NoFallbacks bool
	// Fallbacks lists the continuations to try after plain Newton, in
	// order; nil means ConductanceContinuation, then SourceRamp.
	Fallbacks []Method
	// Guess is a start point: an operating point of this or a similar
	// circuit (e.g. the same one with a parameter changed). Its values are
	// matched to the unknowns by name; unknowns it lacks start at zero.
	Guess *OperatingPoint
}

// Attempt is one method tried, in order.
type Attempt struct {
	Method     Method
	Iterations int    // Newton iterations it spent (all its stages)
	Converged  bool   // it found the answer
	Detail     string // how it ended when it did not converge
}

// OperatingPoint is the DC solution of a circuit.
type OperatingPoint struct {
	// Circuit is the expanded circuit (see Expand): terminal resistances
	// are resistor parts and the devices sit on internal nodes.
	Circuit             *cases.Circuit
	TerminalResistances []TerminalResistance
	// System is the circuit's linear MNA system; X its solution (node
	// voltages in V, then branch currents in A, in System.Layout order).
	System *mna.System
	X      []float64

	Temperature float64 // K
	Converged   bool    // always true for a point returned without error
	Iterations  int     // Newton iterations over all attempts
	Method      Method  // the method that found the point
	// HelperConductance is a conductance from every node to ground left
	// in the answer, S: 0 normally, at most 1e-12 S when the circuit has a
	// node that nothing else ties down at its bias (e.g. between two
	// cut-off transistors). Its currents are included in Residual.
	HelperConductance float64
	Attempts          []Attempt
	// Tolerances are the solver options in force (the case's [solver]
	// table with defaults filled in).
	Tolerances cases.SolverOptions

	Nodes []NodeVoltage // in layout order: the file's nodes, then internal ones
	Parts []PartResult  // in the expanded circuit's part order

	// Residual is the KCL residual of each unknown's node (A): the sum of
	// the terminal currents of Parts at that node (helper conductance
	// included); 0 for branch unknowns. ResidualScale is the largest
	// terminal current magnitude at the node.
	Residual      []float64
	ResidualScale []float64

	devs []*device
}

// NodeVoltage is the voltage of one node to ground.
type NodeVoltage struct {
	Name     string
	Voltage  float64 // V
	Internal bool    // an internal node made by Expand
}

// PartResult is one part at the operating point.
type PartResult struct {
	Name string
	Kind cases.Kind
	// Current is the current into the part's first terminal, A.
	Current float64
	// Power is the power the part absorbs, W (negative when it delivers):
	// Σ over terminals of V(terminal)·I(into terminal).
	Power float64
	// Terminals holds the current into each terminal, in
	// cases.Terminals order (zero for controlling terminals).
	Terminals []TerminalCurrent
	// TerminalResistance is set for a resistor Expand made from a device
	// terminal resistance.
	TerminalResistance *TerminalResistance
	// Device is set for diodes, bjts and mosfets.
	Device *DeviceResult
}

// TerminalCurrent is the current into one terminal of a part.
type TerminalCurrent struct {
	Terminal string
	Node     string
	Current  float64 // A
}

// NamedVoltage is a voltage between two device terminals, named after them
// ("be" = V(base) − V(emitter)).
type NamedVoltage struct {
	Name  string
	Value float64 // V
}

// DeviceResult is a device evaluated at the operating point. Its voltages
// are those at the device's own terminals, which are internal nodes where
// the model has terminal resistances (the intrinsic junction voltages).
// Exactly one of Diode, BJT and MOSFET is set; the state beside it is the
// evaluation at the answer, from which package smallsignal linearizes.
type DeviceResult struct {
	Region   string
	Voltages []NamedVoltage // diode "ak"; bjt "be", "bc", "ce"; mosfet "gs", "ds", "bs"

	Diode            *devices.Diode
	DiodeCurrent     float64 // A, anode to cathode through the junction
	DiodeConductance float64 // dI/dV, S

	BJT      *devices.BJT
	BJTState devices.BJTState

	MOSFET   *devices.MOSFET
	MOSState devices.MOSState

	// MaxPower is the model's max_power, W (+Inf when not given).
	MaxPower float64
}

// Solve finds the DC operating point of c: plain Newton-Raphson from zero,
// then, if that fails, helper-conductance continuation and then source
// ramping. It returns a *NoConvergenceError when all fail and a
// *SingularError when the circuit's equations cannot determine some
// unknown whatever its values.
func Solve(c *cases.Circuit) (*OperatingPoint, error) { return SolveWith(c, Options{}) }

// SolveFrom is Solve starting from guess, an operating point of the same
// or a slightly changed circuit (for sweeps and sensitivities).
func SolveFrom(c *cases.Circuit, guess *OperatingPoint) (*OperatingPoint, error) {
	return SolveWith(c, Options{Guess: guess})
}

// SolveWith is Solve with options.
func SolveWith(c *cases.Circuit, opt Options) (*OperatingPoint, error) {
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
	x0 := make([]float64, s.n)
	if g := opt.Guess; g != nil && g.System != nil {
		for i, u := range sys.Layout.Unknowns {
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
	type method struct {
		name Method
		run  func() attemptResult
	}
	methods := []method{{Newton, func() attemptResult { return s.plainNewton(x0) }}}
	fallbacks := opt.Fallbacks
	if fallbacks == nil {
		fallbacks = []Method{ConductanceContinuation, SourceRamp}
	}
	if opt.NoFallbacks {
		fallbacks = nil
	}
	for _, f := range fallbacks {
		switch f {
		case ConductanceContinuation:
			methods = append(methods, method{f, func() attemptResult { return s.conductanceContinuation(x0) }})
		case SourceRamp:
			methods = append(methods, method{f, s.sourceRamp})
		default:
			return nil, fmt.Errorf("dc: unknown fallback method %q", f)
		}
	}
	var attempts []Attempt
	var reports []runReport
	total := 0
	for _, m := range methods {
		r := m.run()
		total += r.iterations
		attempts = append(attempts, Attempt{Method: m.name, Iterations: r.iterations, Converged: r.converged, Detail: r.detail})
		if r.converged {
			op := s.result(trs, attempts, total, m.name, r.helper)
			return op, nil
		}
		reports = append(reports, s.last)
	}
	return nil, s.noConvergence(attempts, reports)
}

// result builds the operating point from the converged solver state.
func (s *solver) result(trs []TerminalResistance, attempts []Attempt, iterations int, m Method, helper float64) *OperatingPoint {
	x := append([]float64(nil), s.x...)
	op := &OperatingPoint{
		Circuit: s.c, TerminalResistances: trs, System: s.sys, X: x,
		Temperature: temperatureOf(s.c), Converged: true, Iterations: iterations,
		Method: m, HelperConductance: helper, Attempts: attempts, Tolerances: s.opts, devs: s.devs,
	}
	l := s.sys.Layout
	byPart := map[string]*TerminalResistance{}
	for i := range trs {
		byPart[trs[i].Part] = &trs[i]
	}
	// Internal nodes: those Expand made and mna's sense nodes, which no
	// part names.
	named := make([]bool, s.n)
	op.Residual = make([]float64, s.n)
	op.ResidualScale = make([]float64, s.n)
	op.Parts = make([]PartResult, 0, len(s.c.Parts))
	nterm := 0
	for _, p := range s.c.Parts {
		nterm += partTerminals(p)
	}
	slab := make([]TerminalCurrent, nterm) // all parts' terminals in one allocation
	k := 0                                 // next device
	for _, p := range s.c.Parts {
		terms := cases.Terminals(p.Kind)
		idx := s.sys.Terminals[p.Name]
		r := PartResult{Name: p.Name, Kind: p.Kind, TerminalResistance: byPart[p.Name]}
		nt := partTerminals(p)
		r.Terminals, slab = slab[:nt:nt], slab[nt:]
		for t := range r.Terminals {
			node := p.Nodes[min(t, 2)] // a missing mosfet body is on the source
			if t < len(p.Nodes) {
				node = p.Nodes[t]
			}
			r.Terminals[t] = TerminalCurrent{Terminal: terms[t], Node: node}
		}
		if cases.IsDevice(p.Kind) {
			d := s.devs[k]
			k++
			for t := range r.Terminals {
				r.Terminals[t].Current = d.cur[t]
			}
			r.Current = d.cur[0]
			r.Device = d.result()
		} else {
			i := s.sys.PartCurrent(p, x)
			r.Current = i
			r.Terminals[0].Current = i
			r.Terminals[1].Current = -i
		}
		for t, tc := range r.Terminals {
			// The unknown of the terminal's own node: mna may have put a
			// sense node in its place, at the same voltage.
			i := idx[min(t, len(idx)-1)]
			if i < 0 || l.Unknowns[i].Name != tc.Node {
				i, _ = l.Node(tc.Node)
			}
			r.Power += volt(x, i) * tc.Current
			if i >= 0 {
				named[i] = true
				op.Residual[i] += tc.Current
				op.ResidualScale[i] = math.Max(op.ResidualScale[i], math.Abs(tc.Current))
			}
		}
		op.Parts = append(op.Parts, r)
	}
	internal := map[string]bool{}
	for i := range trs {
		internal[trs[i].Inner] = true
	}
	for i, u := range l.Unknowns {
		if u.Branch {
			continue
		}
		op.Nodes = append(op.Nodes, NodeVoltage{Name: u.Name, Voltage: x[i], Internal: internal[u.Name] || !named[i]})
		if helper > 0 {
			op.Residual[i] += helper * x[i]
			op.ResidualScale[i] = math.Max(op.ResidualScale[i], math.Abs(helper*x[i]))
		}
	}
	return op
}

// partTerminals returns the number of terminals reported for p: its
// nodes, and always four for a mosfet (body included).
func partTerminals(p *cases.Part) int {
	if p.Kind == cases.MOSFET {
		return 4
	}
	return len(p.Nodes)
}

// result describes an evaluated device.
func (d *device) result() *DeviceResult {
	r := &DeviceResult{}
	switch d.kind {
	case cases.Diode:
		dd := d.diode
		r.Diode, r.DiodeCurrent, r.DiodeConductance = &dd, d.di, d.dg
		r.Region = dd.Region(d.v[0])
		r.Voltages = []NamedVoltage{{"ak", d.v[0]}}
		r.MaxPower = dd.MaxPower
	case cases.BJT:
		q := d.bjt
		r.BJT, r.BJTState = &q, d.bs
		r.Region = q.Region(d.v[0], d.v[1])
		r.Voltages = []NamedVoltage{{"be", d.v[0]}, {"bc", d.v[1]}, {"ce", d.v[0] - d.v[1]}}
		r.MaxPower = q.MaxPower
	default:
		m := d.mos
		r.MOSFET, r.MOSState = &m, d.ms
		r.Region = d.ms.Region
		r.Voltages = []NamedVoltage{{"gs", d.v[0]}, {"ds", d.v[1]}, {"bs", d.v[2]}}
		r.MaxPower = m.MaxPower
	}
	return r
}

// Node returns the voltage of a node by name (0 for ground); ok is false
// for an unknown name.
func (op *OperatingPoint) Node(name string) (v float64, ok bool) {
	i, ok := op.System.Layout.Node(name)
	if !ok {
		return 0, false
	}
	return volt(op.X, i), true
}

// Part returns the result of a part by name, or nil.
func (op *OperatingPoint) Part(name string) *PartResult {
	for i := range op.Parts {
		if op.Parts[i].Name == name {
			return &op.Parts[i]
		}
	}
	return nil
}

// MaxRelativeResidual returns the largest |Residual|/ResidualScale over
// the nodes, with the scale never taken below the current tolerance: at a
// node that carries only leakage, currents below it are rounding noise.
func (op *OperatingPoint) MaxRelativeResidual() float64 {
	var m float64
	for i, r := range op.Residual {
		if sc := math.Max(op.ResidualScale[i], op.Tolerances.CurrentTolerance); sc > 0 {
			m = math.Max(m, math.Abs(r)/sc)
		}
	}
	return m
}

// PowerBalance returns the power delivered by the parts that deliver
// (positive number) and the power absorbed by the others, W; the helper
// conductance, if any, counts as absorbing. They are equal (Tellegen's
// theorem) up to the residual of the solution.
func (op *OperatingPoint) PowerBalance() (delivered, absorbed float64) {
	for _, p := range op.Parts {
		if p.Power < 0 {
			delivered -= p.Power
		} else {
			absorbed += p.Power
		}
	}
	if op.HelperConductance > 0 {
		for _, n := range op.Nodes {
			absorbed += op.HelperConductance * n.Voltage * n.Voltage
		}
	}
	return delivered, absorbed
}
