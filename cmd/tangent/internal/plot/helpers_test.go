package plot

import (
	"bytes"
	"encoding/xml"
	"errors"
	"io"
	"strings"
	"testing"
)

// svgTexts parses b as XML (failing the test if it is not well formed) and
// returns the character data of every <text> element, in order.
func svgTexts(t *testing.T, b []byte) []string {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(b))
	var out []string
	depth := 0 // inside <text>
	var cur strings.Builder
	root := ""
	for {
		tok, err := d.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatalf("SVG is not well-formed XML: %v", err)
		}
		switch tk := tok.(type) {
		case xml.StartElement:
			if root == "" {
				root = tk.Name.Local
			}
			if tk.Name.Local == "text" {
				depth++
				cur.Reset()
			}
		case xml.CharData:
			if depth > 0 {
				cur.Write(tk)
			}
		case xml.EndElement:
			if tk.Name.Local == "text" {
				depth--
				out = append(out, cur.String())
			}
		}
	}
	if root != "svg" {
		t.Fatalf("root element is %q, want svg", root)
	}
	return out
}

// wantTexts fails the test for each of want that is not among got.
func wantTexts(t *testing.T, got []string, want ...string) {
	t.Helper()
	have := map[string]bool{}
	for _, s := range got {
		have[s] = true
	}
	for _, w := range want {
		if !have[w] {
			t.Errorf("SVG has no text %q; texts: %q", w, got)
		}
	}
}
