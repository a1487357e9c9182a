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
// Numerical safety: every exponential is exact up to exp(80) and continues
// along its tangent line beyond (boundedExp), and the body-effect square
// root continues along its tangent for strong forward body bias, so any
// finite bias a Newton iteration tries (tested to ±1 kV) gives finite
// currents and derivatives, and every derivative is exact for the function
// actually evaluated. Evaluating a device allocates nothing.
package devices
