package main

import (
	"errors"
	"fmt"
	"io"

	"tangent/cases"
	"tangent/dc"
	"tangent/smallsignal"
)

// solveBias finds the operating point of c for subcommand name. On
// failure it prints the diagnosis and returns a nil point and the exit
// status: exitAnalysis when the solver found no answer (no convergence, a
// singular circuit), exitUsage when the case itself is wrong.
func solveBias(name string, c *cases.Circuit, stderr io.Writer) (*dc.OperatingPoint, int) {
	op, err := dc.Solve(c)
	if err != nil {
		fmt.Fprintf(stderr, "tangent %s: %v\n", name, err)
		return nil, analysisExit(err)
	}
	return op, exitOK
}

// analysisExit maps a solver error to an exit status.
func analysisExit(err error) int {
	var se *dc.SingularError
	var ne *dc.NoConvergenceError
	if errors.As(err, &se) || errors.As(err, &ne) {
		return exitAnalysis
	}
	return exitUsage
}

// linearizeCase solves the bias point of c and linearizes it.
func linearizeCase(name string, c *cases.Circuit, stderr io.Writer) (*smallsignal.Equivalent, int) {
	op, code := solveBias(name, c, stderr)
	if op == nil {
		return nil, code
	}
	eq, err := smallsignal.Linearize(op)
	if err != nil {
		fmt.Fprintf(stderr, "tangent %s: %v\n", name, err)
		return nil, exitAnalysis
	}
	return eq, exitOK
}
