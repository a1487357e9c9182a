// Package cases reads tangent case files: TOML documents that describe one
// circuit (its parts, device models, ports and the transfers to analyse) and
// its variants. Decoding validates everything before any analysis runs;
// every problem in a file is reported at once, each naming the file, the
// line, the key and the expected form. The format is set out in DESIGN.md;
// the choices made beyond it are these.
//
// Values. See ParseValue. TOML numbers are plain SI values. A temperature
// (the top-level temperature, a model's nominal_temperature) must be a
// string with its unit, "27 °C" or "300.15 K": a bare number would be a
// guess. "10m" is ten milli-units ("10m" for a length is 10 mm); "10 m" for
// a length is ten metres. IEC 60062 codes are read for resistance (R k K M
// G T), capacitance (p n µ u m F) and inductance (p n µ u m); R is not a
// decimal marker for capacitance or inductance. A tolerance is "5 %" or
// 0.05. ac_phase is in degrees ("-90 °", "-90 deg" or -90) and is held in
// radians. A vcvs or cccs gain may be written in dB ("40 dB" is 100) or as
// a plain, possibly negative, ratio. TOML's inf is "inf"; nan is never
// accepted.
//
// Parts. dc is required on independent sources (write dc = 0 for an
// AC-only source); ac defaults to 0, ac_phase to 0. A mosfet's body
// defaults to its source; its width and length come from the part, else
// the model, and one of them must give each. cccs and ccvs are controlled
// by the current of a resistor, capacitor, inductor, voltage_source,
// current_source or diode (the current into its first terminal). Node
// names are case-sensitive, non-empty and without surrounding spaces.
//
// Ports and transfers. A port names either plus (and minus, default gnd)
// or source, not both. from and to must differ except for an
// input_impedance, where one port may serve as both. A sweep needs start,
// stop (Hz, 0 < start < stop) and points_per_decade (an integer from 1 to
// 1000); at most 100 000 points.
//
// Variants. Every leaf of [variants.NAME] except note and the switches
// below is an override; its path is temperature, solver.KEY,
// models.NAME.KEY or parts.NAME.KEY, where KEY is any key that table may
// have, set in the base file or not; a part's kind and a model's device
// cannot be overridden. Parse applies every variant to the base case and
// reports what the variant breaks, at the variant's line.
//
// Switches. Five keys of a variant table turn one effect off in the models
// without naming their keys:
//
//	early_effect               npn, pnp: forward_ and reverse_early_voltage = inf
//	terminal_resistances       diode: series_resistance = 0;
//	                           npn, pnp: base_, collector_, emitter_resistance = 0
//	channel_length_modulation  nmos, pmos: channel_length_modulation = 0
//	body_effect                nmos, pmos: body_effect = 0
//	capacitances               diode: junction_capacitance, transit_time = 0;
//	                           npn, pnp: be_ and bc_capacitance,
//	                           forward_ and reverse_transit_time = 0;
//	                           nmos, pmos: oxide_ and overlap_capacitance = 0
//
// A switch is written early_effect = false (every model that has the
// effect), early_effect = { value = false, models = ["bw_npn"] } (the models
// listed, each of which must have the effect) or early_effect = true (the
// models as they are: nothing changes). A switch set to false where no model
// has the effect is a warning. A variant may not also override a key its
// switch sets (that is a conflict, reported at the override's line). The
// same switches are accepted by Circuit.WithOverrides as one-element paths,
// so the command line's --set early_effect=false works too.
//
// Topology. See the comment in topology.go: no gnd, loops of voltage
// sources and inductors, node sets without a DC path to gnd (named a
// cut-set of current sources and capacitors when current sources are
// among the parts cutting them off) are errors; a node with a single
// connection is a warning.
//
// Diagnostics. Keys are dotted TOML paths; the entries of [[transfer]] are
// numbered from 1: transfer[2].kind. Key lines are found by a small scan of
// the source text, since the TOML decoder does not export them.
//
// All values are held in SI units (ohm, farad, henry, volt, ampere, siemens,
// kelvin, metre, second). Engineering prefixes exist only in the file.
package cases
