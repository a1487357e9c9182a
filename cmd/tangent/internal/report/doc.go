// Package report renders tangent's one-file design-review report: a
// self-contained HTML document (inline CSS and SVG, no scripts, no
// network access) that shows a case's bias point, its small-signal models
// and the frequency behaviour of its transfers at a glance, in a layout of
// the project's own that prints on A4 and Letter alike.
//
// The package only renders. The caller (cmd/tangent's report subcommand)
// runs the analyses and fills a Report with text already formatted for
// people; this package lays it out with html/template, which escapes
// every string, and adds the embedded style sheet.
//
// # Numbers carry their source
//
// Every number on the page is a Num: the text shown ("917.9 µA"), the
// exact value it was formatted from, and where that value lives in the
// JSON output of the other subcommands. It is written as
//
//	<span class="n" data-src="bias#/parts/Q1/power" data-value="0.0052834…">5.283 mW</span>
//
// where data-src names the subcommand's JSON document ("bias", "linearize",
// "transfer", "explain", "compare", or "case" for an input value of the
// case file) and, after "#", a JSON Pointer (RFC 6901) into it, and
// data-value is the exact value in Go's shortest round-trip form ("null"
// for a JSON null). When the value shown is derived from the one at the
// pointer, data-fn names the derivation:
//
//	hz       |s|/2π of a root {"re", "im"} (Hz)
//	w0       |s| of a root (rad/s)
//	q        |s|/(−2·Re s) of a root
//	abs      |x|
//	db       20·log10|x|
//	pct      100·x
//	celsius  x − 273.15 (x in K)
//	len      the length of an array
//
// Text that quotes a string of a JSON document whole (a warning, a line
// of a summary) carries data-text-src instead, and a formula rendered from
// a rational function carries data-form ("dc_gain", "pole_zero",
// "numerator", "denominator") and data-src pointing at the object with
// its k0, poles, zeros, numerator and denominator. A check can thus
// recompute every number and formula from the JSON and compare.
package report
