package devices

// THIS FILE IS THE API CONTRACT WRITTEN BEFORE THE IMPLEMENTATION.
// The devices implementer moves each declaration into its own file
// (thermal.go, diode.go, bjt.go, mosfet.go, limit.go) and deletes this file.

// Exact SI values (SI Brochure, 9th edition, 2019).
const (
	Boltzmann        = 1.380649e-23    // J/K
	ElementaryCharge = 1.602176634e-19 // C
)

// ThermalVoltage returns VT = k·T/q in volts at temperature t in kelvin.
func ThermalVoltage(t float64) float64 { return Boltzmann * t / ElementaryCharge }

// Region names, as used in the JSON output.
const (
	RegionForward       = "forward"        // diode
	RegionReverse       = "reverse"        // diode
	RegionBreakdown     = "breakdown"      // diode
	RegionForwardActive = "forward_active" // bjt
	RegionSaturation    = "saturation"     // bjt, mosfet
	RegionCutoff        = "cutoff"         // bjt, mosfet
	RegionReverseActive = "reverse_active" // bjt
	RegionTriode        = "triode"         // mosfet
)

// Diode is a diode model scaled to one temperature and area, ready to
// evaluate. The series resistance is not part of Current: the circuit puts
// it in as a resistor to an internal node.
type Diode struct {
	// exported, scaled values (SI)
	SaturationCurrent   float64 // area·Is(T)
	EmissionCoefficient float64
	SeriesResistance    float64 // divided by area
	BreakdownVoltage    float64 // +Inf when none
	BreakdownCurrent    float64
	JunctionCapacitance float64 // area·Cj0
	JunctionPotential   float64
	GradingCoefficient  float64
	TransitTime         float64
	MaxPower            float64 // +Inf when none
	VT                  float64 // thermal voltage at T
	// unexported helpers may be added (e.g. critical voltage for limiting)
}

// NewDiode builds a diode from a case file's model keys (missing keys take
// the table default of Params("diode")), an area factor and the circuit
// temperature in kelvin.
func NewDiode(params map[string]float64, area, temperature float64) Diode { panic("todo") }

// Current returns the junction current I(V) (anode to cathode through the
// junction) and its exact derivative dI/dV.
func (d *Diode) Current(v float64) (i, g float64) { panic("todo") }

// Capacitance returns the depletion capacitance Cj(V) and the diffusion
// capacitance transit_time·g at junction voltage v, where g = dI/dV.
func (d *Diode) Capacitance(v, g float64) (cj, cd float64) { panic("todo") }

// Region classifies the bias: forward (v > 0), breakdown (v < −BV + a few
// n·VT... exact rule documented), reverse otherwise.
func (d *Diode) Region(v float64) string { panic("todo") }

// LimitStep limits a Newton update of the junction voltage from old to new
// so the exponential does not overflow or jump; it returns the voltage to
// use and whether it changed the step.
func (d *Diode) LimitStep(vnew, vold float64) (float64, bool) { panic("todo") }

// BJT is a bipolar transistor model scaled to one temperature and area.
// Terminal resistances are not part of Eval: the circuit puts them in as
// resistors to internal nodes.
type BJT struct {
	Polarity            float64 // +1 npn, −1 pnp
	SaturationCurrent   float64 // area·Is(T)
	ForwardBeta         float64 // βF(T)
	ReverseBeta         float64 // βR(T)
	ForwardEarlyVoltage float64 // +Inf when none
	ReverseEarlyVoltage float64 // +Inf when none
	BaseResistance      float64 // divided by area
	CollectorResistance float64
	EmitterResistance   float64
	BECapacitance       float64 // area·Cje0
	BCCapacitance       float64 // area·Cjc0
	BEPotential         float64
	BCPotential         float64
	BEGrading           float64
	BCGrading           float64
	ForwardTransitTime  float64
	ReverseTransitTime  float64
	MaxPower            float64
	VT                  float64
}

// NewBJT builds a bjt from model keys (device "npn" or "pnp"), area and
// temperature in kelvin.
func NewBJT(device string, params map[string]float64, area, temperature float64) BJT { panic("todo") }

// BJTState is the intrinsic bjt evaluated at one bias: the currents into
// collector and base (emitter current is −Ic−Ib) and their exact partial
// derivatives with respect to the real terminal voltages Vbe and Vbc.
type BJTState struct {
	Ic, Ib                             float64
	DIcDVbe, DIcDVbc, DIbDVbe, DIbDVbc float64
}

// Eval evaluates the Ebers-Moll transport equations of DESIGN.md at the
// real (not mirrored) junction voltages vbe and vbc.
func (q *BJT) Eval(vbe, vbc float64) BJTState { panic("todo") }

// Capacitances returns Cπ-side and Cμ-side junction capacitances at the bias:
// cbe = Cje(Vbe) + τF·gm-part and cbc = Cjc(Vbc) + τR·(reverse diffusion);
// exact definitions documented on the implementation.
func (q *BJT) Capacitances(vbe, vbc float64, s BJTState) (cbe, cbc float64) { panic("todo") }

// Region classifies the bias (forward_active, saturation, cutoff, reverse_active).
func (q *BJT) Region(vbe, vbc float64) string { panic("todo") }

// LimitStep limits Newton updates of vbe and vbc like Diode.LimitStep.
func (q *BJT) LimitStep(vbe, vbeOld, vbc, vbcOld float64) (float64, float64, bool) { panic("todo") }

// MOSFET is a square-law MOSFET model scaled to one temperature and geometry.
type MOSFET struct {
	Polarity                float64 // +1 nmos, −1 pmos
	ThresholdVoltage        float64 // Vt0(T), signed as in the file
	Beta                    float64 // k′(T)·W/L·multiplier, A/V²
	Width, Length           float64
	Multiplier              float64
	ChannelLengthModulation float64
	BodyEffect              float64
	SurfacePotential        float64 // 2φF
	OxideCapacitance        float64
	OverlapCapacitance      float64
	MaxPower                float64
}

// NewMOSFET builds a mosfet from model keys (device "nmos" or "pmos"), the
// part's width, length (0: take the model's) and multiplier, and the
// temperature in kelvin.
func NewMOSFET(device string, params map[string]float64, width, length, multiplier, temperature float64) MOSFET {
	panic("todo")
}

// MOSState is the mosfet evaluated at one bias: the drain current Id (into
// the drain; the source current is −Id, gate and body currents are zero) and
// its exact partial derivatives with respect to the real Vgs, Vds, Vbs.
type MOSState struct {
	Id           float64
	Gm, Gds, Gmb float64 // ∂Id/∂Vgs, ∂Id/∂Vds, ∂Id/∂Vbs
	Region       string
	Reversed     bool // source and drain swapped (Vds < 0 in the device's own sense)
}

// Eval evaluates the square law of DESIGN.md at the real terminal voltages.
func (m *MOSFET) Eval(vgs, vds, vbs float64) MOSState { panic("todo") }

// Capacitances returns the Meyer gate capacitances at the bias (including
// overlap), times the multiplier.
func (m *MOSFET) Capacitances(vgs, vds, vbs float64) (cgs, cgd, cgb float64) { panic("todo") }

// LimitStep limits Newton updates of vgs and vds.
func (m *MOSFET) LimitStep(vgs, vgsOld, vds, vdsOld float64) (float64, float64, bool) {
	panic("todo")
}
