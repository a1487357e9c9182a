// Package devices holds the large-signal equations of the semiconductor
// devices tangent models: currents as functions of terminal voltages, their
// exact partial derivatives, junction and gate capacitances, and the
// temperature scaling of model parameters. It knows nothing of matrices,
// files or circuits, and imports nothing of tangent's own.
//
// Conventions: SI units; every current is the current flowing into the named
// terminal; voltages are named as differences (Vbe = V(base) − V(emitter)).
// pnp and pmos devices take their real terminal voltages and return real
// terminal currents: the mirroring is done inside.
//
// Evaluating a device allocates nothing.
package devices
