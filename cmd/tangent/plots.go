package main

import (
	"fmt"

	"tangent/ac"
)

// writePlots writes a Bode plot and a pole-zero map of each result into dir.
func writePlots(dir string, results []*ac.Result) error {
	return fmt.Errorf("plots are not available yet")
}
