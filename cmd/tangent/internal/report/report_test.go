package report

import (
	"bytes"
	"strings"
	"testing"

	"golang.org/x/net/html"
)

func TestInlineSVG(t *testing.T) {
	for _, c := range []struct {
		name, in, want, err string
	}{
		{"prolog and size dropped", `<?xml version="1.0"?><!-- c --><svg width="1pt" height="2pt" viewBox="0 0 1 2"><path d="M0,0" style="stroke-width:1"/></svg>`,
			`<svg viewBox="0 0 1 2"><path d="M0,0" style="stroke-width:1"/></svg>`, ""},
		{"ids and references prefixed", `<svg viewBox="0 0 1 1"><defs><linearGradient id="g"/></defs><use xlink:href="#g" href="#g"/><rect fill="url(#g)"/></svg>`,
			`<svg viewBox="0 0 1 1"><defs><linearGradient id="p-g"/></defs><use xlink:href="#p-g" href="#p-g"/><rect fill="url(#p-g)"/></svg>`, ""},
		{"no svg", `<?xml version="1.0"?><html/>`, "", "no <svg"},
		{"no viewBox", `<svg width="1" height="1"></svg>`, "", "no viewBox"},
		{"script", `<svg viewBox="0 0 1 1"><script>alert(1)</script></svg>`, "", "script"},
		{"handler", `<svg viewBox="0 0 1 1"><rect onclick="x()"/></svg>`, "", "script"},
	} {
		got, err := InlineSVG([]byte(c.in), "p")
		if c.err != "" {
			if err == nil || !strings.Contains(err.Error(), c.err) {
				t.Errorf("%s: error %v, want one saying %q", c.name, err, c.err)
			}
			continue
		}
		if err != nil || string(got) != c.want {
			t.Errorf("%s:\n got %s (%v)\nwant %s", c.name, got, err, c.want)
		}
	}
}

func TestParseMath(t *testing.T) {
	for in, want := range map[string]Math{
		"−0.0017·s^2·":     {{Text: "−0.0017·s", Sup: "2"}, {Text: "·"}},
		"1e+06·s^-1·":      {{Text: "1e+06·s", Sup: "-1"}, {Text: "·"}},
		"(1 + s/19.002)":   {{Text: "(1 + s/19.002)"}},
		"a·s^3 + b·s^12":   {{Text: "a·s", Sup: "3"}, {Text: " + b·s", Sup: "12"}},
		"(1 + 2·s + s²/4)": {{Text: "(1 + 2·s + s²/4)"}},
	} {
		got := ParseMath(in)
		if len(got) != len(want) {
			t.Errorf("ParseMath(%q) = %q, want %q", in, got, want)
			continue
		}
		for i := range got {
			if got[i] != want[i] {
				t.Errorf("ParseMath(%q) = %q, want %q", in, got, want)
			}
		}
	}
}

// Every string is escaped: a name or a quoted message cannot add markup.
func TestWriteEscapes(t *testing.T) {
	v := 1.0
	r := &Report{Title: `<b>x</b>`, File: "a&b.toml", Generator: "tangent report",
		Alerts: []Alert{{Kind: "region", Part: `Q"1`, Text: Quote(`<script>alert(1)</script>`, "bias#/warnings/0/message"), Tone: "warn"}},
		Meta:   []Line{L(Name("<i>"), N(Num{Text: "<1>", Value: &v, Src: `bias#/x"y`}))}}
	var b bytes.Buffer
	if err := Write(&b, r); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for _, bad := range []string{"<b>x</b>", "<script>", "<i>", `"y"`} {
		if strings.Contains(out, bad) {
			t.Errorf("page holds %q unescaped", bad)
		}
	}
	doc, err := html.Parse(&b)
	if err != nil {
		t.Fatal(err)
	}
	var scripts int
	var walk func(*html.Node)
	walk = func(n *html.Node) {
		if n.Type == html.ElementNode && n.Data == "script" {
			scripts++
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(doc)
	if scripts != 0 {
		t.Errorf("%d <script> elements", scripts)
	}
}

// The style sheet carries the print rules the report promises.
func TestPrintRules(t *testing.T) {
	for _, want := range []string{"@page", "size: auto", "@media print", "break-inside: avoid", "print-color-adjust: exact"} {
		if !strings.Contains(styleSheet, want) {
			t.Errorf("the style sheet has no %q", want)
		}
	}
}
