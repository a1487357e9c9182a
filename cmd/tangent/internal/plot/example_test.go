package plot_test

import (
	"bytes"
	"fmt"
	"math"
	"strings"

	"tangent/cmd/tangent/internal/plot"
)

// A Bode plot of the soil-probe preamp's first-order roll-off,
// H = 1/(1 + s/ωc) with fc = 12.4 kHz, with its −3 dB point marked.
func ExampleBode() {
	const fc = 12.4e3
	var c plot.Curve
	for i := 0; i <= 140; i++ { // 10 Hz … 100 MHz, 20 points a decade
		f := 10 * math.Pow(10, float64(i)/20)
		c.F = append(c.F, f)
		c.H = append(c.H, 1/complex(1, f/fc))
	}
	var svg bytes.Buffer
	err := plot.Bode(&svg, "Soil-probe preamp", []plot.Curve{c}, plot.BodeOptions{
		Markers: []plot.Marker{{F: fc, Label: "−3 dB"}},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(strings.HasPrefix(svg.String(), "<?xml"))
	fmt.Println(strings.Contains(svg.String(), "−3 dB 12.4 kHz"))
	// Output:
	// true
	// true
}

// A pole-zero map with roots twelve decades apart: each stays visible on
// the signed logarithmic axes.
func ExamplePoleZero() {
	poles := []complex128{-10, -1e9, complex(-1e3, 1e6), complex(-1e3, -1e6)}
	zeros := []complex128{2.1e9} // right half plane
	var svg bytes.Buffer
	if err := plot.PoleZero(&svg, "River-level gauge", poles, zeros, plot.PoleZeroOptions{}); err != nil {
		fmt.Println(err)
		return
	}
	for _, label := range []string{"−1 G", "1.59 Hz", "334 MHz"} {
		fmt.Println(label, strings.Contains(svg.String(), ">"+label+"<"))
	}
	// Output:
	// −1 G true
	// 1.59 Hz true
	// 334 MHz true
}

// UnwrapPhaseDeg keeps the phase of four coincident poles continuous
// down to −360° (closed form −4·atan(f/fc)).
func ExampleUnwrapPhaseDeg() {
	var h []complex128
	for _, x := range []float64{0.1, 1, 2, 10, 100} { // f/fc
		p := complex(1, x)
		h = append(h, 1/(p*p*p*p))
	}
	for _, ph := range plot.UnwrapPhaseDeg(h) {
		fmt.Printf("%.1f ", ph)
	}
	fmt.Println()
	// Output:
	// -22.8 -180.0 -253.7 -337.2 -357.7
}
