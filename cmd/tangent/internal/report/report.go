package report

import (
	"bytes"
	_ "embed"
	"fmt"
	"html/template"
	"io"
	"math"
	"strconv"
	"strings"
)

// Report is everything the page shows, already formatted. Empty parts are
// left out of the page; the caution is always there.
type Report struct {
	Title     string // the case's title, or its file name
	TitleSrc  string // data-text-src of the title, "" when it is the file name
	File      string // the file, or example:NAME
	Generator string // e.g. "tangent report"
	Meta      []Line // lines under the title: temperature, how the bias was found
	Caution   Caution
	Alerts    []Alert // the bias point's warnings
	Glance    []Card  // key figures, one card each
	Circuit   Circuit
	Bias      Bias
	Models    []*Table // small-signal models: tables by device kind
	Transfers []Transfer
	Variants  *Variants // nil when the case has none
}

// Caution is the standing notice at the top of the page. Strong makes it
// an alarm (the circuit works above extra-low voltage or a device is over
// its rating).
type Caution struct {
	Paragraphs []Line
	Strong     bool
}

// Alert is one warning of the bias point.
type Alert struct {
	Kind string // a short label: "region", "power", "voltage"
	Part string // the part concerned, "" for the circuit
	Text Seg    // the message, quoted from the JSON (TextSrc set)
	Tone string // "warn" or "bad"
}

// Card is a box of key figures.
type Card struct {
	Title string
	Lines []Line
	Tone  string // "", "ok", "warn", "bad"
	Href  string // the section it summarises, "#bias"
}

// Circuit is the case at a glance.
type Circuit struct {
	Facts  []Fact
	Parts  *Table
	Models *Table
}

// Bias is the DC operating point.
type Bias struct {
	Facts   []Fact
	Nodes   *Table
	Parts   *Table
	Devices *Table
	Balance *Table
}

// Transfer is one analysed transfer.
type Transfer struct {
	ID      string
	Title   Line // "in → out, voltage gain (V/V)"
	Facts   []Fact
	Summary []Line // explain's mid-band summary
	Figures []Figure
	Forms   []Formula
	Poles   *Table
	Zeros   *Table
	Notes   []Line // below the root tables

	Estimates []Estimate
	Ports     []PortEquivalent
	Explain   []Line // explain's notes, or why there is no explanation
}

// Estimate is a time-constant estimate of a band edge.
type Estimate struct {
	Title  string
	Table  *Table
	Result Line
	Caveat Line
}

// PortEquivalent is what a port looks like from outside.
type PortEquivalent struct {
	Title Line
	Forms []Formula
	Notes []Line
}

// Variants is the side-by-side comparison of the base case and its
// variants.
type Variants struct {
	Title   string // the section's heading, e.g. "Variants side by side"
	Columns *Table
	Changes *Table
	Figures []Figure
	Notes   []Line
}

// Fact is a term and its description, for a definition list.
type Fact struct {
	Term string
	Desc Line
}

// Table is a table of Lines.
type Table struct {
	ID      string
	Caption string
	Cols    []Col
	Rows    []Row
	Keep    bool // keep on one printed page
	Class   string
}

// Col is a column head; Num columns are set right-aligned in tabular
// figures.
type Col struct {
	Head string
	Num  bool
}

// Row is a table row. A Heading row spans the table with its first cell.
type Row struct {
	Cells   []Line
	Tones   []string // per cell: "", "warn", "bad", "mark", "strong"
	Tone    string   // the row's: "", "warn", "bad", "mark"
	Heading bool
	ID      string
}

// Figure is an inline SVG figure (see InlineSVG).
type Figure struct {
	ID      string
	Caption string
	SVG     template.HTML
	Kind    string // "bode" or "map": sets the figure's width
}

// Formula is a rational function, a polynomial or another expression,
// written as a fraction when it has a denominator. Factors are rendered
// one after the other with a line-break opportunity between them.
type Formula struct {
	Label string // "H(s)", "N(s)", "Zth"
	Unit  string // shown after the formula, e.g. "V/V"
	Src   string // data-src of the object the formula is written from
	Form  string // data-form: dc_gain, pole_zero, numerator, denominator
	Num   []Math // numerator factors (a lead constant first)
	Den   []Math // denominator factors; none for a polynomial
	Text  Line   // a text in place of the formula ("none: …")
}

// Math is a piece of a formula: text with ^k exponents set as
// superscripts.
type Math []MathPart

// MathPart is text followed by an optional superscript.
type MathPart struct {
	Text, Sup string
}

// ParseMath splits a formula written with ^ exponents ("−0.0017·s^2·")
// into text and superscripts. An exponent is the run of characters after ^
// up to the next character that is not a digit or a leading minus.
func ParseMath(s string) Math {
	var m Math
	for {
		i := strings.IndexByte(s, '^')
		if i < 0 {
			if s != "" {
				m = append(m, MathPart{Text: s})
			}
			return m
		}
		j := i + 1
		if j < len(s) && s[j] == '-' {
			j++
		}
		for j < len(s) && s[j] >= '0' && s[j] <= '9' {
			j++
		}
		m = append(m, MathPart{Text: s[:i], Sup: s[i+1 : j]})
		s = s[j:]
	}
}

// Line is a run of text, names, numbers and badges.
type Line []Seg

// Seg is one piece of a Line: exactly one of its fields is used.
type Seg struct {
	Text    string // plain text; with TextSrc, a string quoted from JSON
	TextSrc string // data-text-src of Text
	Name    string // a part, node, port or model name, set as code
	Label   string // a quiet label before a value, e.g. a terminal's name
	Num     *Num
	Badge   *Badge
	Static  string // fixed text of the page that holds digits (a standard's number)
	Break   bool   // a line break
}

// Num is a number on the page; see the package comment.
type Num struct {
	Text  string   // as shown, e.g. "917.9 µA"
	Value *float64 // the exact value; nil for a JSON null
	Src   string   // "bias#/parts/Q1/power"
	Fn    string   // the derivation from the value at Src, "" for none
}

// DataValue is the exact value as data-value writes it.
func (n Num) DataValue() string {
	if n.Value == nil {
		return "null"
	}
	return strconv.FormatFloat(*n.Value, 'g', -1, 64)
}

// Badge is a coloured label that also says what it means in words (and
// with a symbol), so that colour is never the only cue.
type Badge struct {
	Text   string
	Tone   string // "ok", "warn", "bad", "off"
	Symbol string
}

// T is a Seg of plain text.
func T(s string) Seg { return Seg{Text: s} }

// N is a Seg holding a number.
func N(n Num) Seg { return Seg{Num: &n} }

// Name is a Seg holding a name.
func Name(s string) Seg { return Seg{Name: s} }

// Label is a Seg holding a quiet label.
func Label(s string) Seg { return Seg{Label: s} }

// Quote is a Seg holding a string quoted whole from a JSON document.
func Quote(s, src string) Seg { return Seg{Text: s, TextSrc: src} }

// Static is a Seg of fixed wording that holds digits.
func Static(s string) Seg { return Seg{Static: s} }

// B is a Seg holding a badge.
func B(b Badge) Seg { return Seg{Badge: &b} }

// Br is a Seg that breaks the line.
func Br() Seg { return Seg{Break: true} }

// L makes a Line.
func L(segs ...Seg) Line { return segs }

// Plain makes a Line of plain text.
func Plain(s string) Line { return Line{T(s)} }

//go:embed report.css
var styleSheet string

//go:embed report.html.tmpl
var pageTemplate string

var page = template.Must(template.New("page").Funcs(template.FuncMap{
	"css":       func() template.CSS { return template.CSS(styleSheet) },
	"cellclass": cellClass,
}).Parse(pageTemplate))

// cellClass is the class of cell i: "num" for a number column, then the
// cell's tone.
func cellClass(cols []Col, tones []string, i int) string {
	var cls []string
	if i < len(cols) && cols[i].Num {
		cls = append(cls, "num")
	}
	if i < len(tones) && tones[i] != "" {
		cls = append(cls, tones[i])
	}
	return strings.Join(cls, " ")
}

// Write renders r as one HTML document to w. The page is rendered into
// memory first: nothing is written when rendering fails.
func Write(w io.Writer, r *Report) error {
	var b bytes.Buffer
	if err := page.Execute(&b, r); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	_, err := w.Write(b.Bytes())
	return err
}

// Value returns a pointer to v for Num.Value, nil when v is not finite
// (JSON has no infinity; such values are null there).
func Value(v float64) *float64 {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return nil
	}
	return &v
}
