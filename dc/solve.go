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
	x0 := s.x0
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
			op := s.result(trs, attempts, total, name, r.helper)
			return op, nil
		}
		reports = append(reports, s.last)
	}
	return nil, s.noConvergence(attempts, reports)
}

// result builds the operating point from the converged solver state.
// Its tables are carved from a few slabs (one allocation per element
// type, not per part), and parts are matched to their terminal
// resistances and unknowns by position rather than by name where the
// order allows it.
func (s *solver) result(trs []TerminalResistance, attempts []Attempt, iterations int, m Method, helper float64) *OperatingPoint {
	n := s.n
	fl := make([]float64, 3*n)
	x := fl[:n:n]
	copy(x, s.x)
	op := &OperatingPoint{
		Circuit: s.c, TerminalResistances: trs, System: s.sys, X: x,
		Temperature: temperatureOf(s.c), Converged: true, Iterations: iterations,
		Method: m, HelperConductance: helper, Attempts: attempts, Tolerances: s.opts, devs: s.devs,
	}
	l := s.sys.Layout
	// Internal nodes: those Expand made (internal[i]) and mna's sense
	// nodes, which no part names (named[i] false).
	flags := make([]bool, 2*n)
	named, internal := flags[:n:n], flags[n:]
	op.Residual = fl[n : 2*n : 2*n]
	op.ResidualScale = fl[2*n:]
	op.Parts = make([]PartResult, len(s.c.Parts))
	nterm, nv := 0, 0
	for _, p := range s.c.Parts {
		nterm += partTerminals(p)
	}
	for _, d := range s.devs {
		nv += d.voltageCount()
	}
	slab := make([]TerminalCurrent, nterm) // all parts' terminals in one allocation
	dr := newDeviceResults(s.devs, nv)
	var names kindTerminals
	k, tr := 0, 0 // next device, next terminal resistance
	for pi, p := range s.c.Parts {
		terms := names.of(p.Kind)
		var idx []int
		var d *device
		if cases.IsDevice(p.Kind) {
			d = s.devs[k]
			k++
			idx = d.term[:d.nt] // as in s.sys.Terminals, a missing mosfet body filled in
		} else {
			idx = s.sys.Terminals[p.Name]
		}
		// Fields are set one by one in the zeroed slab: cheaper than
		// copying whole structs while the garbage collector runs.
		r := &op.Parts[pi]
		r.Name, r.Kind = p.Name, p.Kind
		// Expand lists the terminal resistances in part order.
		if tr < len(trs) && trs[tr].Part == p.Name {
			r.TerminalResistance = &trs[tr]
			tr++
		}
		nt := partTerminals(p)
		r.Terminals, slab = slab[:nt:nt], slab[nt:]
		for t := range r.Terminals {
			node := p.Nodes[min(t, 2)] // a missing mosfet body is on the source
			if t < len(p.Nodes) {
				node = p.Nodes[t]
			}
			r.Terminals[t].Terminal, r.Terminals[t].Node = terms[t], node
		}
		if d != nil {
			for t := range r.Terminals {
				r.Terminals[t].Current = d.cur[t]
			}
			r.Current = d.cur[0]
			r.Device = dr.next(d)
		} else {
			i := s.partCurrent(p, idx, x)
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
				op.ResidualScale[i] = maxNonNegative(op.ResidualScale[i], math.Abs(tc.Current))
			}
		}
	}
	for i := range trs {
		if j, ok := l.Node(trs[i].Inner); ok && j >= 0 {
			internal[j] = true
		}
	}
	nodes := 0
	for _, u := range l.Unknowns {
		if !u.Branch {
			nodes++
		}
	}
	op.Nodes = make([]NodeVoltage, 0, nodes)
	for i, u := range l.Unknowns {
		if u.Branch {
			continue
		}
		op.Nodes = append(op.Nodes, NodeVoltage{Name: u.Name, Voltage: x[i], Internal: internal[i] || !named[i]})
		if helper > 0 {
			op.Residual[i] += helper * x[i]
			op.ResidualScale[i] = maxNonNegative(op.ResidualScale[i], math.Abs(helper*x[i]))
		}
	}
	return op
}

// partCurrent is mna's PartCurrent for the linear part p with terminal
// unknowns idx. Resistors and capacitors that control no other part (their
// first terminal is their own node, not an mna sense node) are computed
// here with the same formula, without PartCurrent's lookups by name.
func (s *solver) partCurrent(p *cases.Part, idx []int, x []float64) float64 {
	if p.Kind == cases.Resistor || p.Kind == cases.Capacitor {
		if i := idx[0]; i < 0 || s.sys.Layout.Unknowns[i].Name == p.Nodes[0] {
			if p.Kind == cases.Capacitor {
				return 0
			}
			return mna.Voltage(x, idx[0], idx[1]) / p.Value
		}
	}
	return s.sys.PartCurrent(p, x)
}

// kindTerminals remembers cases.Terminals per kind: that function builds
// a new slice at every call. A kind not among the first few is looked up
// every time.
type kindTerminals struct {
	n     int
	kinds [8]cases.Kind
	names [8][]string
}

func (c *kindTerminals) of(k cases.Kind) []string {
	for i := 0; i < c.n; i++ {
		if c.kinds[i] == k {
			return c.names[i]
		}
	}
	t := cases.Terminals(k)
	if c.n < len(c.kinds) {
		c.kinds[c.n], c.names[c.n] = k, t
		c.n++
	}
	return t
}

// partTerminals returns the number of terminals reported for p: its
// nodes, and always four for a mosfet (body included).
func partTerminals(p *cases.Part) int {
	if p.Kind == cases.MOSFET {
		return 4
	}
	return len(p.Nodes)
}

// deviceResults hands out the DeviceResults of a circuit's devices, with
// their voltages and model copies carved from slabs.
type deviceResults struct {
	res      []DeviceResult
	voltages []NamedVoltage
	diodes   []devices.Diode
	bjts     []devices.BJT
	mosfets  []devices.MOSFET
}

// newDeviceResults sizes the slabs for devs, whose voltages number nv.
func newDeviceResults(devs []*device, nv int) *deviceResults {
	var nd, nb, nm int
	for _, d := range devs {
		switch d.kind {
		case cases.Diode:
			nd++
		case cases.BJT:
			nb++
		default:
			nm++
		}
	}
	r := &deviceResults{res: make([]DeviceResult, len(devs)), voltages: make([]NamedVoltage, nv)}
	if nd > 0 {
		r.diodes = make([]devices.Diode, nd)
	}
	if nb > 0 {
		r.bjts = make([]devices.BJT, nb)
	}
	if nm > 0 {
		r.mosfets = make([]devices.MOSFET, nm)
	}
	return r
}

// voltageCount returns the number of named voltages the device reports.
func (d *device) voltageCount() int {
	switch d.kind {
	case cases.Diode:
		return 1
	default:
		return 3
	}
}

// next describes the evaluated device d.
func (dr *deviceResults) next(d *device) *DeviceResult {
	r := &dr.res[0]
	dr.res = dr.res[1:]
	nv := d.voltageCount()
	v := dr.voltages[:nv:nv]
	dr.voltages = dr.voltages[nv:]
	switch d.kind {
	case cases.Diode:
		dd := &dr.diodes[0]
		dr.diodes = dr.diodes[1:]
		*dd = *d.diode
		r.Diode, r.DiodeCurrent, r.DiodeConductance = dd, d.di, d.dg
		r.Region = dd.Region(d.v[0])
		v[0] = NamedVoltage{"ak", d.v[0]}
		r.MaxPower = dd.MaxPower
	case cases.BJT:
		q := &dr.bjts[0]
		dr.bjts = dr.bjts[1:]
		*q = *d.bjt
		r.BJT, r.BJTState = q, d.bs
		r.Region = q.Region(d.v[0], d.v[1])
		v[0], v[1], v[2] = NamedVoltage{"be", d.v[0]}, NamedVoltage{"bc", d.v[1]}, NamedVoltage{"ce", d.v[0] - d.v[1]}
		r.MaxPower = q.MaxPower
	default:
		m := &dr.mosfets[0]
		dr.mosfets = dr.mosfets[1:]
		*m = *d.mos
		r.MOSFET, r.MOSState = m, d.ms
		r.Region = d.ms.Region
		v[0], v[1], v[2] = NamedVoltage{"gs", d.v[0]}, NamedVoltage{"ds", d.v[1]}, NamedVoltage{"bs", d.v[2]}
		r.MaxPower = m.MaxPower
	}
	r.Voltages = v
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
