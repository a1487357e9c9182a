package dc

import (
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

// SolveWith is Solve with options: Prepare, then Prepared.Solve.
func SolveWith(c *cases.Circuit, opt Options) (*OperatingPoint, error) {
	p, err := Prepare(c)
	if err != nil {
		return nil, err
	}
	return p.Solve(opt)
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
