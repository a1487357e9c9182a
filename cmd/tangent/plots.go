package main

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"tangent/ac"
	"tangent/cases"
	"tangent/cmd/tangent/internal/plot"
)

// defaultPlotSweep is the sweep of a transfer that --plots draws when the
// file asks for none: 1 Hz to 1 GHz at 20 points per decade, the range of
// the sensor front ends tangent is made for.
var defaultPlotSweep = cases.Sweep{Start: 1, Stop: 1e9, PointsPerDecade: 20}

// magnitudeLabel is the Bode magnitude axis label for a transfer kind.
func magnitudeLabel(k cases.TransferKind) string {
	switch ac.Unit(k) {
	case "Ω":
		return "|Z| (dBΩ)"
	case "S":
		return "|Y| (dBS)"
	}
	return "|H| (dB)"
}

// transferTitle names a transfer for a figure, after the case's title.
func transferTitle(c *cases.Circuit, t *cases.Transfer) string {
	title := fmt.Sprintf("%s → %s, %s", t.From, t.To, kindWords(t.Kind))
	if c.Title != "" {
		title = c.Title + ": " + title
	}
	return title
}

// writePlots writes, for the i-th result, DIR/NN_FROM-TO_KIND_bode.svg
// (magnitude and phase, −3 dB points marked) and ..._poles.svg (the
// pole-zero map). The folder is created if needed.
func writePlots(dir string, c *cases.Circuit, results []*ac.Result) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	for i, r := range results {
		t := r.Transfer
		base := filepath.Join(dir, fmt.Sprintf("%02d_%s-%s_%s", i+1, t.From, t.To, t.Kind))
		title := transferTitle(c, t)
		if len(r.FHz) > 0 {
			var markers []plot.Marker
			for _, e := range []*float64{r.Bandwidth.LowHz, r.Bandwidth.HighHz} {
				if e != nil && *e >= r.FHz[0] && *e <= r.FHz[len(r.FHz)-1] {
					markers = append(markers, plot.Marker{F: *e, Label: "−3 dB"})
				}
			}
			curve := plot.Curve{Label: fmt.Sprintf("%s → %s", t.From, t.To), F: r.FHz, H: r.Response}
			if err := writeFigure(base+"_bode.svg", func(w io.Writer) error {
				return plot.Bode(w, title, []plot.Curve{curve}, plot.BodeOptions{MagnitudeLabel: magnitudeLabel(t.Kind), Markers: markers})
			}); err != nil {
				return fmt.Errorf("%s: %w", base+"_bode.svg", err)
			}
		}
		if err := writeFigure(base+"_poles.svg", func(w io.Writer) error {
			// The map is narrower than the Bode plot: the transfer alone.
			short := fmt.Sprintf("%s → %s, %s", t.From, t.To, kindWords(t.Kind))
			return plot.PoleZero(w, short, r.Rational.Poles, r.Rational.Zeros, plot.PoleZeroOptions{})
		}); err != nil {
			return fmt.Errorf("%s: %w", base+"_poles.svg", err)
		}
	}
	return nil
}

// writeFigure renders into memory first, so a figure that fails to draw
// leaves no file, then writes it atomically.
func writeFigure(path string, draw func(io.Writer) error) error {
	var buf bytes.Buffer
	if err := draw(&buf); err != nil {
		return err
	}
	return writeAtomically(path, func(w io.Writer) error {
		_, err := w.Write(buf.Bytes())
		return err
	})
}
