// Package plot draws the figures of tangent's reports as SVG: Bode plots of
// s-domain transfers and pole-zero maps of the s-plane.
//
// The figures share one look of the project's own: a white page, a thin
// frame around each data area, light grid lines, a small palette of muted
// colours and Liberation Sans text (the SVG asks for Arial, Helvetica or any
// sans-serif face where Liberation Sans is missing; they have the same
// metrics). Curves that must be told apart differ in colour, dash pattern
// and point glyph, so a figure stays readable in grey print and for readers
// who do not see every colour.
//
// Units: frequencies in Hz, angular frequencies (roots) in rad/s, magnitudes
// in dB (20·log10|H|), phases in degrees. Numbers are printed with SI
// prefixes only on the page (tick labels, annotations).
//
// Output is deterministic: the same input gives byte-identical SVG.
package plot
