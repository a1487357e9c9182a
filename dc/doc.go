// Package dc finds the DC operating point (bias point) of a circuit.
//
// # Equations
//
// The unknowns are those of package mna: node voltages (V), then the
// branch currents (A) of voltage sources, inductors and the like. Device
// terminal resistances are first made resistor parts by Expand, so that
// the device equations (package devices) see only their intrinsic
// junctions; mna.Build then stamps every linear part, those resistors
// included. The equations
//
//	F(x) = G·x − b + i(x) = 0
//
// are Kirchhoff's current law at every node (currents leaving the node
// through the parts; i(x) the currents into the devices) and the branch
// equations. The devices' Newton companions (their exact Jacobian and
// the matching right-hand side) are written by this package straight into
// precomputed matrix slots: that is the only place device currents are
// stamped, and it allocates nothing.
//
// # Newton-Raphson
//
// At each iterate every device is evaluated, its junction step limited by
// the device's own rule (devices.*.LimitStep), the sparse matrix refactored
// (package internal/sparse: the pivot order is chosen once and reused) and
// solved. An iterate is accepted when it was reached by an unlimited step
// and, for every unknown,
//
//	|Δx_i| ≤ relative_tolerance·|x_i| + voltage_tolerance   (current_tolerance for branch currents)
//
// and, for every node,
//
//	|F_i| ≤ relative_tolerance·(largest current through the node) + current_tolerance.
//
// The tolerances come from the case file's [solver] table; the defaults
// (1e-9 relative, 1 nV, 1 pA, 100 iterations; cases.DefaultSolverOptions)
// are tighter than the 1e-3 relative common in circuit simulation because
// the bias point feeds a linearization we want to many digits, which
// Newton's quadratic convergence delivers in one or two extra iterations
// (common practice).
//
// # Fallbacks
//
// When plain Newton from zero (or from a guess) fails, Solve tries two
// artificial-parameter homotopies in turn: a helper conductance from
// every node to ground, stepped down to zero, then all independent
// sources ramped up from zero. The helper is removed before the answer is
// reported, or, where a node has nothing else to tie it down, left at
// 1e-12 S and reported in OperatingPoint.HelperConductance. If every
// method fails, the *NoConvergenceError names what was tried and which
// nodes and devices did not settle.
//
// # Set-up and sweeps
//
// Solve is Prepare followed by Prepared.Solve. Prepare does everything
// that does not depend on the solution: devices, expansion, equations,
// the Newton matrix's pattern, its pivot order (analysed at the start
// point from zero) and the layout of the result tables. A Prepared can be
// solved again and again; each Solve starts from the same prepared
// state, so its numbers never depend on what was solved before.
// SweepSource uses one to solve a circuit along the DC values of one
// independent source, each point from the last one's answer: a transfer
// characteristic or an I-V curve, and on a circuit with several
// solutions the branch it is on (a sweep up and a sweep down through a
// hysteresis band differ, as the circuit does).
//
// # Results
//
// Every part, terminal-resistance resistors included, reports its current
// and absorbed power; the powers sum to zero. Device voltages are those at
// the intrinsic device (its internal nodes). Warnings lists devices in the
// wrong region in a signal path (see SignalPath), devices over their
// model's max_power, and voltages above the extra-low-voltage limits of
// IEC 61140.
//
// The same circuit always gives the same answer, bit for bit: every loop
// runs in a fixed order and no map order reaches the numbers.
package dc
