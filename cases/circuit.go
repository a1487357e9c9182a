package cases

import "math"

// Ground is the name of the reference node. Its voltage is zero by definition.
const Ground = "gnd"

// Kind names a part kind as written in the case file.
type Kind string

// Part kinds. Terminal order for each kind is given by Terminals.
const (
	Resistor      Kind = "resistor"
	Capacitor     Kind = "capacitor"
	Inductor      Kind = "inductor"
	VoltageSource Kind = "voltage_source"
	CurrentSource Kind = "current_source"
	VCVS          Kind = "vcvs"
	VCCS          Kind = "vccs"
	CCCS          Kind = "cccs"
	CCVS          Kind = "ccvs"
	Diode         Kind = "diode"
	BJT           Kind = "bjt"
	MOSFET        Kind = "mosfet"
)

// Terminals returns the terminal keys of a part kind in canonical order.
// Part.Nodes holds the node of each terminal in this order. The reference
// direction of a part's current is into its first terminal.
func Terminals(k Kind) []string {
	switch k {
	case Resistor, Capacitor, Inductor:
		return []string{"a", "b"}
	case VoltageSource, CCVS:
		return []string{"plus", "minus"}
	case CurrentSource, CCCS:
		return []string{"from", "to"}
	case VCVS:
		return []string{"plus", "minus", "control_plus", "control_minus"}
	case VCCS:
		return []string{"from", "to", "control_plus", "control_minus"}
	case Diode:
		return []string{"anode", "cathode"}
	case BJT:
		return []string{"collector", "base", "emitter"}
	case MOSFET:
		return []string{"drain", "gate", "source", "body"}
	}
	return nil
}

// IsDevice reports whether parts of kind k are nonlinear semiconductor
// devices that need a model.
func IsDevice(k Kind) bool { return k == Diode || k == BJT || k == MOSFET }

// Circuit is a decoded and validated case.
type Circuit struct {
	File        string  // path or name the case was read from
	Title       string  // optional
	Temperature float64 // K; default 300.15 (27 °C)

	// Nodes lists every node except Ground, in order of first appearance in
	// the file (parts in file order, terminals in canonical order).
	Nodes []string
	// Parts in file order. Names are unique.
	Parts []*Part
	// Models by name.
	Models map[string]*Model
	// Ports in file order.
	Ports []*Port
	// Transfers in file order.
	Transfers []*Transfer
	// Variants in file order. Not applied; see ApplyVariant.
	Variants []*Variant
	// Solver holds the [solver] table with defaults filled in.
	Solver SolverOptions
	// Warnings found during validation (e.g. a node with one connection).
	Warnings []Diagnostic
	// Variant is the name of the variant applied by ApplyVariant, or ""
	// for the base case.
	Variant string

	// src is the decoded source (TOML tree and key lines), kept so that
	// ApplyVariant and WithOverrides can re-validate; nil for a Circuit
	// built in code.
	src *rawCase
}

// Part is one element of the circuit.
//
// Value holds the part's principal quantity in SI units: resistance (Ω),
// capacitance (F), inductance (H), vcvs gain (V/V), vccs transconductance
// (S), cccs gain (A/A), ccvs transresistance (Ω). Sources use DC, AC and
// ACPhase. Devices use Model and the geometry fields.
type Part struct {
	Name  string
	Kind  Kind
	Nodes []string // one node per terminal, in the order of Terminals(Kind)
	Line  int      // line of the part's table header in the file

	Value     float64
	Tolerance float64 // relative (0.05 for 5 %); 0 when not given

	DC      float64 // V or A
	AC      float64 // magnitude, V or A; 0 when not given
	ACPhase float64 // radians; given in degrees in the file

	Control string // cccs, ccvs: name of the two-terminal part whose current controls

	Model      string  // diode, bjt, mosfet
	Area       float64 // diode, bjt; default 1
	Width      float64 // mosfet, m; 0 means take the model's
	Length     float64 // mosfet, m; 0 means take the model's
	Multiplier float64 // mosfet; default 1
}

// Node returns the node connected to the named terminal, or "" when the
// kind has no such terminal.
func (p *Part) Node(terminal string) string {
	for i, t := range Terminals(p.Kind) {
		if t == terminal && i < len(p.Nodes) {
			return p.Nodes[i]
		}
	}
	return ""
}

// Device kinds of a model.
const (
	DeviceDiode = "diode"
	DeviceNPN   = "npn"
	DevicePNP   = "pnp"
	DeviceNMOS  = "nmos"
	DevicePMOS  = "pmos"
)

// Model is a named device model. Params holds only the keys given in the
// file, in SI units (+Inf where "inf" was written); defaults belong to the
// device equations (package devices) and are filled in by the solver.
type Model struct {
	Name   string
	Device string // DeviceDiode, DeviceNPN, ...
	Params map[string]float64
	Line   int
}

// Param returns the model parameter key, or def when the file does not set it.
func (m *Model) Param(key string, def float64) float64 {
	if v, ok := m.Params[key]; ok {
		return v
	}
	return def
}

// Port is a pair of nodes, or the terminals of an independent source.
type Port struct {
	Name   string
	Plus   string // for a source port: a voltage source's plus, a current source's to
	Minus  string // defaults to Ground; for a source port: the other terminal
	Source string // name of the independent source defining the port, or ""
	Line   int
}

// TransferKind names what a transfer computes.
type TransferKind string

// Transfer kinds; see DESIGN.md "Ports and transfers" for drive and load
// conventions.
const (
	VoltageGain      TransferKind = "voltage"
	CurrentGain      TransferKind = "current"
	Transconductance TransferKind = "transconductance"
	Transimpedance   TransferKind = "transimpedance"
	InputImpedance   TransferKind = "input_impedance"
	OutputImpedance  TransferKind = "output_impedance"
)

// Transfer asks for one small-signal ratio between two ports.
type Transfer struct {
	From, To string // port names
	Kind     TransferKind
	Sweep    *Sweep // nil when no sweep is asked for
	Line     int
}

// Sweep is a logarithmic frequency sweep.
type Sweep struct {
	Start, Stop     float64 // Hz, 0 < Start < Stop
	PointsPerDecade int
}

// Frequencies returns the sweep's frequencies in Hz: Start, then
// PointsPerDecade points per decade, ending exactly at Stop.
func (s *Sweep) Frequencies() []float64 {
	decades := math.Log10(s.Stop / s.Start)
	n := int(math.Ceil(decades*float64(s.PointsPerDecade)-1e-9)) + 1
	if n < 2 {
		n = 2
	}
	f := make([]float64, n)
	for i := range f {
		f[i] = s.Start * math.Pow(10, decades*float64(i)/float64(n-1))
	}
	f[n-1] = s.Stop
	return f
}

// SolverOptions controls the DC operating-point solver. Names are set in the
// case file's [solver] table.
type SolverOptions struct {
	RelativeTolerance float64 // relative_tolerance; default 1e-9
	VoltageTolerance  float64 // voltage_tolerance, V; default 1e-9
	CurrentTolerance  float64 // current_tolerance, A; default 1e-12
	MaxIterations     int     // max_iterations per Newton run; default 100
}

// DefaultSolverOptions returns the defaults used when [solver] is absent.
func DefaultSolverOptions() SolverOptions {
	return SolverOptions{RelativeTolerance: 1e-9, VoltageTolerance: 1e-9, CurrentTolerance: 1e-12, MaxIterations: 100}
}

// Variant is a named set of overrides applied on top of the base case.
type Variant struct {
	Name      string
	Note      string
	Overrides []Override
	Line      int
}

// Override sets one dotted key path of the case, e.g.
// models.lownoise.forward_early_voltage, to a new raw TOML value. A
// one-element path may name a switch such as early_effect (see the package
// comment), whose value is a bool or a table {value, models}.
type Override struct {
	Path  []string
	Value any // as decoded by TOML: string, int64, float64, bool, map[string]any
	Line  int
}

// Diagnostic is one problem found in a case file.
type Diagnostic struct {
	File    string
	Line    int    // 1-based; 0 when unknown
	Key     string // dotted key path, e.g. parts.Q1.model; "" when none
	Message string // what is wrong and what was expected
	Warning bool
}
