package report

import (
	"bytes"
	"fmt"
	"html/template"
	"regexp"
)

// Patterns of InlineSVG: the root element's size attributes and every id
// definition and reference.
var (
	rootSize = regexp.MustCompile(`\s(width|height)="[^"]*"`)
	idAttr   = regexp.MustCompile(`\sid="([^"]+)"`)
	urlRef   = regexp.MustCompile(`url\(#([^)\s]+)\)`)
	hrefRef  = regexp.MustCompile(`((?:xlink:)?href)="#([^"]+)"`)
)

// active reports whether an SVG holds a script, foreign (HTML) content or
// an event handler attribute (on…=).
func active(svg []byte) bool {
	low := bytes.ToLower(svg)
	if bytes.Contains(low, []byte("<script")) || bytes.Contains(low, []byte("<foreignobject")) {
		return true
	}
	for i := 0; ; {
		k := bytes.Index(low[i:], []byte("on"))
		if k < 0 {
			return false
		}
		k += i
		i = k + 2
		if k == 0 || !isSpace(low[k-1]) {
			continue
		}
		j := k + 2
		for j < len(low) && low[j] >= 'a' && low[j] <= 'z' {
			j++
		}
		for j < len(low) && isSpace(low[j]) {
			j++
		}
		if j > k+2 && j < len(low) && low[j] == '=' {
			return true
		}
	}
}

func isSpace(c byte) bool { return c == ' ' || c == '\t' || c == '\n' || c == '\r' }

// InlineSVG turns a standalone SVG document, as package plot writes it,
// into markup to place inside an HTML page:
//
//   - everything before the <svg element (the XML declaration, comments,
//     a doctype) is dropped;
//   - the root's width and height attributes are removed, so that the
//     figure takes the width its container gives it and keeps the aspect
//     ratio of its viewBox (which it must have);
//   - every id is prefixed with prefix + "-", and so is every reference to
//     one (url(#id), href="#id"), so that several figures on one page
//     never share an id.
//
// It returns an error when there is no <svg element or no viewBox, or when
// the document holds a script or an event handler: the page is to work with
// scripts off and holds none.
func InlineSVG(doc []byte, prefix string) (template.HTML, error) {
	i := bytes.Index(doc, []byte("<svg"))
	if i < 0 {
		return "", fmt.Errorf("report: figure %s: no <svg element", prefix)
	}
	svg := doc[i:]
	end := bytes.IndexByte(svg, '>')
	if end < 0 {
		return "", fmt.Errorf("report: figure %s: unterminated <svg tag", prefix)
	}
	root := svg[:end]
	if !bytes.Contains(root, []byte("viewBox=")) {
		return "", fmt.Errorf("report: figure %s: the <svg element has no viewBox, so it cannot scale", prefix)
	}
	if active(svg) {
		return "", fmt.Errorf("report: figure %s holds a script or an event handler", prefix)
	}
	var b bytes.Buffer
	b.Write(rootSize.ReplaceAll(root, nil))
	b.Write(svg[end:])
	out := b.Bytes()
	p := []byte(prefix + "-")
	if !bytes.Contains(out, []byte(`id="`)) && !bytes.Contains(out, []byte("url(#")) && !bytes.Contains(out, []byte(`href="#`)) {
		return template.HTML(bytes.TrimSpace(out)), nil // nothing to rename
	}
	out = idAttr.ReplaceAllFunc(out, func(m []byte) []byte {
		return append(append([]byte(` id="`), p...), m[len(` id="`):]...)
	})
	out = urlRef.ReplaceAllFunc(out, func(m []byte) []byte {
		return append(append([]byte("url(#"), p...), m[len("url(#"):]...)
	})
	out = hrefRef.ReplaceAllFunc(out, func(m []byte) []byte {
		k := bytes.IndexByte(m, '#')
		return append(append(append([]byte{}, m[:k+1]...), p...), m[k+1:]...)
	})
	return template.HTML(bytes.TrimSpace(out)), nil
}
