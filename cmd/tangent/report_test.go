package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"image/png"
	"io"
	"math"
	"math/cmplx"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"
	"unicode"

	"golang.org/x/net/html"

	"tangent/ac"
	"tangent/cases"
	"tangent/cmd/tangent/internal/report"
)

// The report's promise, checked from outside: every number on the page
// is a number of the JSON the other subcommands print, shown to the
// precision its text claims; every formula is the one "tangent transfer"
// and "tangent explain" write from that JSON; every sentence quoted from
// JSON is quoted whole; and no digit appears on the page outside those
// (or the plots, the column heads, names and marked fixed wording).

// reportDocs runs the subcommands with --json on an example and returns
// their documents, and the case's input values as package cases reads
// them (the "case" document). compareFlags go to compare alone (the
// report's --variant, --temperature and --threshold).
func reportDocs(t testing.TB, example string, compareFlags ...string) map[string]any {
	t.Helper()
	c, err := cases.Example(example)
	if err != nil {
		t.Fatal(err)
	}
	return reportDocsOf(t, "example:"+example, c, compareFlags...)
}

// reportDocsOf is reportDocs for the case file (or example:NAME) file,
// which reads as c.
func reportDocsOf(t testing.TB, file string, c *cases.Circuit, compareFlags ...string) map[string]any {
	t.Helper()
	docs := map[string]any{}
	for _, sub := range []string{"bias", "linearize", "transfer", "explain", "compare", "check"} {
		args := []string{sub, "--json", file}
		if sub == "compare" {
			args = append(args, compareFlags...)
		}
		code, out, errs := runArgs(args...)
		if code != exitOK {
			t.Fatalf("%v: exit %d: %s", args, code, errs)
		}
		var v any
		if err := json.Unmarshal([]byte(out), &v); err != nil {
			t.Fatalf("%s --json: %v", sub, err)
		}
		docs[sub] = v
	}
	jsonNum := func(v float64) any {
		if math.IsInf(v, 0) {
			return nil // JSON has no infinity
		}
		return v
	}
	parts, models := map[string]any{}, map[string]any{}
	for _, p := range c.Parts {
		parts[p.Name] = map[string]any{"value": jsonNum(p.Value), "tolerance": jsonNum(p.Tolerance), "dc": jsonNum(p.DC),
			"ac": jsonNum(p.AC), "area": jsonNum(p.Area), "width": jsonNum(p.Width), "length": jsonNum(p.Length),
			"multiplier": jsonNum(p.Multiplier)}
	}
	for name, m := range c.Models {
		ps := map[string]any{}
		for k, v := range m.Params {
			ps[k] = jsonNum(v)
		}
		models[name] = ps
	}
	docs["case"] = map[string]any{"parts": parts, "models": models}
	return docs
}

// resolve follows a data-src ("bias#/parts/Q1/power") into docs.
func resolve(docs map[string]any, src string) (any, error) {
	name, ptr, ok := strings.Cut(src, "#")
	if !ok {
		return nil, fmt.Errorf("data-src %q has no #", src)
	}
	v, ok := docs[name]
	if !ok {
		return nil, fmt.Errorf("data-src %q: no document %q", src, name)
	}
	if ptr == "" {
		return v, nil
	}
	if !strings.HasPrefix(ptr, "/") {
		return nil, fmt.Errorf("data-src %q: pointer must start with /", src)
	}
	for _, tok := range strings.Split(ptr[1:], "/") {
		tok = strings.ReplaceAll(strings.ReplaceAll(tok, "~1", "/"), "~0", "~") // RFC 6901, 4
		switch x := v.(type) {
		case map[string]any:
			if v, ok = x[tok]; !ok {
				return nil, fmt.Errorf("data-src %q: no key %q", src, tok)
			}
		case []any:
			i, err := strconv.Atoi(tok)
			if err != nil || i < 0 || i >= len(x) {
				return nil, fmt.Errorf("data-src %q: no element %q", src, tok)
			}
			v = x[i]
		default:
			return nil, fmt.Errorf("data-src %q: %q goes into a scalar", src, tok)
		}
	}
	return v, nil
}

// expectedValue applies a data-fn to a JSON value; ok is false for null.
func expectedValue(fn string, v any) (x float64, ok bool, err error) {
	if v == nil {
		return 0, false, nil
	}
	root := func() (complex128, error) {
		m, _ := v.(map[string]any)
		re, ok1 := m["re"].(float64)
		im, ok2 := m["im"].(float64)
		if !ok1 || !ok2 {
			return 0, fmt.Errorf("%s of %v: not a root", fn, v)
		}
		return complex(re, im), nil
	}
	switch fn {
	case "len":
		a, isArray := v.([]any)
		if !isArray {
			return 0, false, fmt.Errorf("len of %v", v)
		}
		return float64(len(a)), true, nil
	case "hz", "w0", "q":
		s, err := root()
		if err != nil {
			return 0, false, err
		}
		switch fn {
		case "hz":
			return cmplx.Abs(s) / (2 * math.Pi), true, nil
		case "w0":
			return cmplx.Abs(s), true, nil
		}
		return cmplx.Abs(s) / (-2 * real(s)), true, nil
	}
	f, isNum := v.(float64)
	if !isNum {
		return 0, false, fmt.Errorf("%v is not a number", v)
	}
	switch fn {
	case "":
		return f, true, nil
	case "abs":
		return math.Abs(f), true, nil
	case "db":
		return 20 * math.Log10(math.Abs(f)), true, nil // the decibel of a field quantity, IEC 60027-3 (from memory)
	case "pct":
		return 100 * f, true, nil
	case "celsius":
		return f - 273.15, true, nil // SI Brochure 9th ed., 2.3.1: t/°C = T/K − 273.15
	}
	return 0, false, fmt.Errorf("unknown data-fn %q", fn)
}

// siPrefixes are the SI prefixes (SI Brochure 9th ed., table 7) a shown
// value may carry.
var siPrefixes = map[string]float64{"y": 1e-24, "z": 1e-21, "a": 1e-18, "f": 1e-15, "p": 1e-12, "n": 1e-9,
	"µ": 1e-6, "m": 1e-3, "k": 1e3, "M": 1e6, "G": 1e9, "T": 1e12}

var shownRe = regexp.MustCompile(`^([+-]?\d+)(?:\.(\d*))?(?:e([+-]?\d+))?\s*(.*)$`)

// agrees reports whether text ("917.9 µA", "−0.0017379", "6.09e-05",
// "+16.9 %") shows want to the precision of its own digits: within half a
// unit of its last digit, under one of the readings of its unit (a
// leading prefix letter or none: "m" may be milli or metre).
func agrees(text string, want float64) error {
	s := strings.ReplaceAll(strings.TrimSpace(text), "−", "-")
	m := shownRe.FindStringSubmatch(s)
	if m == nil {
		return fmt.Errorf("%q is not a number", text)
	}
	mant, _ := strconv.ParseFloat(m[1]+"."+m[2]+"0", 64)
	exp := 0
	if m[3] != "" {
		exp, _ = strconv.Atoi(m[3])
	}
	mant *= math.Pow(10, float64(exp))
	half := 0.5 * math.Pow(10, float64(exp-len(m[2])))
	if m[1] == "0" && m[2] == "" && m[3] == "" {
		if want != 0 {
			return fmt.Errorf("%q shows zero for %g", text, want)
		}
		return nil
	}
	scales := []float64{1}
	for p, sc := range siPrefixes {
		if strings.HasPrefix(m[4], p) {
			scales = append(scales, sc)
		}
	}
	for _, sc := range scales {
		if math.Abs(mant*sc-want) <= half*sc*(1+1e-9)+1e-12*math.Abs(want) {
			return nil
		}
	}
	return fmt.Errorf("%q does not show %g", text, want)
}

// nullTexts are what the page shows for a JSON null.
func nullText(text string) bool {
	for _, s := range []string{"none", "open", "no limit", "—", "∞"} {
		if strings.HasPrefix(strings.TrimSpace(text), s) {
			return true
		}
	}
	return false
}

// attr returns an attribute of n.
func attr(n *html.Node, key string) (string, bool) {
	for _, a := range n.Attr {
		if a.Key == key {
			return a.Val, true
		}
	}
	return "", false
}

// textOf is the text of n's subtree; a <sup> is written ^text, as the
// formulas of "tangent transfer" write an exponent.
func textOf(n *html.Node) string {
	var b strings.Builder
	var walk func(*html.Node)
	walk = func(n *html.Node) {
		if n.Type == html.TextNode {
			b.WriteString(n.Data)
		}
		if n.Type == html.ElementNode && n.Data == "sup" {
			b.WriteString("^")
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(n)
	return b.String()
}

func findAll(n *html.Node, keep func(*html.Node) bool) []*html.Node {
	var out []*html.Node
	var walk func(*html.Node)
	walk = func(n *html.Node) {
		if keep(n) {
			out = append(out, n)
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(n)
	return out
}

func hasClass(n *html.Node, class string) bool {
	c, _ := attr(n, "class")
	for _, f := range strings.Fields(c) {
		if f == class {
			return true
		}
	}
	return false
}

// rationalOf reads a rational function from its JSON object (the keys of
// "transfer --json": k0, poles, zeros).
func rationalOf(v any) (*ac.Rational, error) {
	m, ok := v.(map[string]any)
	if !ok {
		return nil, fmt.Errorf("not an object")
	}
	roots := func(key string) ([]complex128, error) {
		a, ok := m[key].([]any)
		if !ok {
			return nil, fmt.Errorf("no %s", key)
		}
		var out []complex128
		for _, r := range a {
			rm, _ := r.(map[string]any)
			re, ok1 := rm["re"].(float64)
			im, ok2 := rm["im"].(float64)
			if !ok1 || !ok2 {
				return nil, fmt.Errorf("%s: %v is not a root", key, r)
			}
			out = append(out, complex(re, im))
		}
		return out, nil
	}
	k0, ok := m["k0"].(float64)
	if !ok {
		return nil, fmt.Errorf("no k0")
	}
	zs, err := roots("zeros")
	if err != nil {
		return nil, err
	}
	ps, err := roots("poles")
	if err != nil {
		return nil, err
	}
	return &ac.Rational{K0: k0, Zeros: zs, Poles: ps}, nil
}

func floats(v any) ([]float64, error) {
	a, ok := v.([]any)
	if !ok {
		return nil, fmt.Errorf("not an array")
	}
	out := make([]float64, len(a))
	for i, x := range a {
		if out[i], ok = x.(float64); !ok {
			return nil, fmt.Errorf("element %d is not a number", i)
		}
	}
	return out, nil
}

func noSpace(s string) string {
	return strings.Map(func(r rune) rune {
		if unicode.IsSpace(r) {
			return -1
		}
		return r
	}, s)
}

// fixedNotation removes the fixed notation of the trade that holds
// digits: "−3 dB" (the half-power band edge), "|s|/2π", "ω0", "|H| = 1".
var fixedNotation = strings.NewReplacer("−3 dB", "", "2π", "", "ω0", "", "|H| = 1", "")

// checkPage checks a report page against the JSON documents and returns
// every disagreement, and the count of numbers, quotes and formulas it
// checked.
func checkPage(page []byte, docs map[string]any) (errs []error, checked int) {
	doc, err := html.Parse(bytes.NewReader(page))
	if err != nil {
		return []error{err}, 0
	}
	add := func(format string, args ...any) { errs = append(errs, fmt.Errorf(format, args...)) }

	// Numbers.
	for _, n := range findAll(doc, func(n *html.Node) bool { _, ok := attr(n, "data-value"); return ok }) {
		src, _ := attr(n, "data-src")
		fn, _ := attr(n, "data-fn")
		dv, _ := attr(n, "data-value")
		text := textOf(n)
		v, err := resolve(docs, src)
		if err != nil {
			add("%q: %v", text, err)
			continue
		}
		want, ok, err := expectedValue(fn, v)
		if err != nil {
			add("%q (%s): %v", text, src, err)
			continue
		}
		checked++
		if !ok {
			if dv != "null" || !nullText(text) {
				add("%q (%s): JSON has null, page has data-value %s", text, src, dv)
			}
			continue
		}
		got, err := strconv.ParseFloat(dv, 64)
		if err != nil || math.Abs(got-want) > 1e-12*math.Abs(want) {
			add("%q (%s %s): data-value %s, JSON gives %v", text, src, fn, dv, want)
			continue
		}
		if err := agrees(text, want); err != nil {
			add("%s %s: %v", src, fn, err)
		}
	}
	// Quoted strings.
	for _, n := range findAll(doc, func(n *html.Node) bool { _, ok := attr(n, "data-text-src"); return ok }) {
		src, _ := attr(n, "data-text-src")
		v, err := resolve(docs, src)
		if err != nil {
			add("%v", err)
			continue
		}
		checked++
		if s, _ := v.(string); s != textOf(n) {
			add("%s: page quotes %q, JSON has %q", src, textOf(n), v)
		}
	}
	// Formulas.
	for _, n := range findAll(doc, func(n *html.Node) bool { _, ok := attr(n, "data-form"); return ok }) {
		src, _ := attr(n, "data-src")
		form, _ := attr(n, "data-form")
		v, err := resolve(docs, src)
		if err != nil {
			add("%v", err)
			continue
		}
		var want string
		switch form {
		case "dc_gain", "pole_zero":
			r, err := rationalOf(v)
			if err != nil {
				add("%s: %v", src, err)
				continue
			}
			want = map[bool]string{true: dcGainForm(r), false: poleZeroForm(r)}[form == "dc_gain"]
		case "numerator", "denominator":
			c, err := floats(v.(map[string]any)[form])
			if err != nil {
				add("%s: %s: %v", src, form, err)
				continue
			}
			want = polyText(c)
		default:
			add("%s: unknown data-form %q", src, form)
			continue
		}
		var got string
		if nu := findAll(n, func(m *html.Node) bool { return hasClass(m, "fnum") }); len(nu) == 1 {
			got = textOf(nu[0]) + " / " + textOf(findAll(n, func(m *html.Node) bool { return hasClass(m, "fden") })[0])
		} else {
			got = textOf(n)
		}
		checked++
		if noSpace(got) != noSpace(want) {
			add("%s %s: page has\n\t%s\nJSON gives\n\t%s", src, form, got, want)
		}
	}
	// Digits anywhere else.
	var scan func(n *html.Node, exempt bool)
	scan = func(n *html.Node, exempt bool) {
		if n.Type == html.ElementNode {
			switch n.Data {
			case "svg", "thead", "style", "head", "title":
				exempt = true
			}
			for _, k := range []string{"data-value", "data-text-src", "data-form", "data-static"} {
				if _, ok := attr(n, k); ok {
					exempt = true
				}
			}
			if n.Data == "code" && hasClass(n, "nm") {
				exempt = true
			}
		}
		if n.Type == html.TextNode && !exempt && strings.ContainsAny(fixedNotation.Replace(n.Data), "0123456789") {
			add("unchecked digits on the page: %q (in <%s>)", strings.TrimSpace(n.Data), n.Parent.Data)
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			scan(c, exempt)
		}
	}
	scan(doc, false)
	return errs, checked
}

// checkStructure checks that the page has every section of a case with
// this many transfers and variants, that ids are unique and that nothing
// is loaded from elsewhere and nothing runs.
func checkStructure(t *testing.T, page []byte, transfers int, variants bool, devices bool) {
	t.Helper()
	doc, err := html.Parse(bytes.NewReader(page))
	if err != nil {
		t.Fatal(err)
	}
	ids := map[string]*html.Node{}
	for _, n := range findAll(doc, func(n *html.Node) bool { _, ok := attr(n, "id"); return ok && n.Type == html.ElementNode }) {
		id, _ := attr(n, "id")
		if ids[id] != nil {
			t.Errorf("id %q appears twice", id)
		}
		ids[id] = n
		for _, a := range n.Attr {
			if strings.HasPrefix(a.Key, "on") {
				t.Errorf("<%s %s>: an event handler", n.Data, a.Key)
			}
		}
	}
	for _, n := range findAll(doc, func(n *html.Node) bool { return n.Type == html.ElementNode }) {
		switch n.Data {
		case "script", "iframe", "object", "embed", "link", "img":
			t.Errorf("the page has a <%s>", n.Data)
		}
		for _, k := range []string{"src", "href", "xlink:href"} {
			if v, ok := attr(n, k); ok && !strings.HasPrefix(v, "#") {
				t.Errorf("<%s %s=%q> points outside the page", n.Data, k, v)
			}
		}
	}
	if bytes.Contains(page, []byte("@import")) || regexp.MustCompile(`url\((["']?)[^#)]`).Match(page) {
		t.Error("the style sheet or a figure loads something")
	}
	want := []string{"caution", "circuit", "parts", "bias", "nodes", "part-currents", "small-signal"}
	if devices {
		want = append(want, "devices", "models")
	}
	if transfers > 0 {
		want = append(want, "transfers")
	}
	for i := 1; i <= transfers; i++ {
		want = append(want, fmt.Sprintf("transfer-%d", i), fmt.Sprintf("t%d-poles", i), fmt.Sprintf("t%d-zeros", i),
			fmt.Sprintf("t%d-bode", i), fmt.Sprintf("t%d-map", i))
	}
	if variants {
		want = append(want, "variants", "variant-columns", "variant-changes")
	}
	for _, id := range want {
		if ids[id] == nil {
			t.Errorf("no element with id %q", id)
		}
	}
	for i := 1; i <= transfers; i++ {
		art := ids[fmt.Sprintf("transfer-%d", i)]
		if art == nil {
			continue
		}
		forms := map[string]bool{}
		for _, n := range findAll(art, func(n *html.Node) bool { _, ok := attr(n, "data-form"); return ok }) {
			f, _ := attr(n, "data-form")
			forms[f] = true
		}
		for _, f := range []string{"dc_gain", "pole_zero", "numerator", "denominator"} {
			if !forms[f] {
				t.Errorf("transfer %d: no %s formula", i, f)
			}
		}
		for _, fig := range []string{"bode", "map"} {
			f := ids[fmt.Sprintf("t%d-%s", i, fig)]
			if f == nil || len(findAll(f, func(n *html.Node) bool { return n.Data == "svg" })) != 1 {
				t.Errorf("transfer %d: the %s figure holds no inline svg", i, fig)
			}
		}
		// The explanation: its summary and what sets each root.
		explained := 0
		for _, n := range findAll(art, func(n *html.Node) bool { return true }) {
			if s, ok := attr(n, "data-text-src"); ok && strings.Contains(s, "/summary/text/") {
				explained++
			}
		}
		if explained == 0 {
			t.Errorf("transfer %d: no mid-band summary from explain", i)
		}
		if !strings.Contains(textOf(ids[fmt.Sprintf("t%d-poles", i)]), "set by") {
			t.Errorf("transfer %d: the pole table says nothing of what sets each pole", i)
		}
	}
}

func TestReportExamples(t *testing.T) {
	dir := t.TempDir()
	for _, ex := range cases.Examples() {
		t.Run(ex, func(t *testing.T) {
			out := filepath.Join(dir, ex+".html")
			code, stdout, errs := runArgs("report", "example:"+ex, "-o", out)
			if code != exitOK {
				t.Fatalf("exit %d: %s", code, errs)
			}
			if !strings.Contains(stdout, out) {
				t.Errorf("stdout %q does not name the file", stdout)
			}
			page, err := os.ReadFile(out)
			if err != nil {
				t.Fatal(err)
			}
			c, err := cases.Example(ex)
			if err != nil {
				t.Fatal(err)
			}
			devices := false
			for _, p := range c.Parts {
				devices = devices || cases.IsDevice(p.Kind)
			}
			checkStructure(t, page, len(c.Transfers), len(c.Variants) > 0, devices)
			errs2, checked := checkPage(page, reportDocs(t, ex))
			for _, e := range errs2 {
				t.Error(e)
			}
			t.Logf("%d numbers, quotes and formulas agree with the JSON", checked)
			if checked < 100 {
				t.Errorf("only %d numbers, quotes and formulas checked", checked)
			}
		})
	}
}

// The check must be able to fail: a page with one number, one quote or
// one formula changed, or a bare digit added, does not pass.
func TestReportCheckFails(t *testing.T) {
	code, page, errs := runArgs("report", "example:sallen_key", "-o", "-")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	docs := reportDocs(t, "sallen_key")
	if e, _ := checkPage([]byte(page), docs); len(e) != 0 {
		t.Fatalf("the page itself fails: %v", e)
	}
	firstNum := regexp.MustCompile(`data-value="[^"]+">[^<]+<`)
	loc := firstNum.FindStringIndex(page)
	shown := loc[0] + strings.Index(page[loc[0]:], `">`) + 2
	digit := shown + strings.IndexAny(page[shown:], "123456789") // the first digit shown of the first number
	q := regexp.MustCompile(`data-text-src="[^"]+">[^<]`).FindStringIndex(page)
	f := regexp.MustCompile(`s/[0-9]`).FindStringIndex(page[strings.Index(page, "data-form"):])
	formAt := strings.Index(page, "data-form") + f[1] - 1
	for name, bad := range map[string]string{
		"shown number": page[:digit] + string('1'+(page[digit]-'0')%9) + page[digit+1:],
		"data-value":   firstNum.ReplaceAllStringFunc(page[:loc[1]], func(string) string { return `data-value="12345">12345<` }) + page[loc[1]:],
		"quote":        page[:q[1]-1] + "X" + page[q[1]:],
		"formula":      page[:formAt] + "7" + page[formAt+1:],
		"bare digit":   strings.Replace(page, "<h2 id=\"circuit-title\">Circuit", "<h2 id=\"circuit-title\">Circuit 7", 1),
	} {
		if e, _ := checkPage([]byte(bad), docs); len(e) == 0 {
			t.Errorf("a page with a changed %s passes the check", name)
		}
	}
	// The parser of shown numbers against hand-made cases.
	for _, c := range []struct {
		text string
		v    float64
		ok   bool
	}{
		{"917.9 µA", 9.179e-4, true}, {"917.9 µA", 9.1795e-4, true}, {"917.9 µA", 9.1796e-4, false},
		{"−0.0017379", -0.00173794, true}, {"6.09e-05", 6.0949e-5, true}, {"6.09e-05", 6.1e-5, false},
		{"+16.9 %", 16.93, true}, {"0 V", 0, true}, {"0 V", 1e-3, false}, {"1.000 mF/m²", 1e-3, true},
		{"10.00 kΩ", 1e4, true}, {"10.00 kΩ", 1e3, false}, {"9", 9.4, true}, {"9", 9.6, false},
	} {
		if err := agrees(c.text, c.v); (err == nil) != c.ok {
			t.Errorf("agrees(%q, %g) = %v, want ok %v", c.text, c.v, err, c.ok)
		}
	}
}

// A failed run leaves an existing report as it was and no temporary file.
func TestReportAtomic(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "r.html")
	if err := os.WriteFile(out, []byte("previous report"), 0o644); err != nil {
		t.Fatal(err)
	}
	bad := filepath.Join(dir, "bad.toml")
	os.WriteFile(bad, []byte("title = 3\n"), 0o644)
	for _, args := range [][]string{
		{"report", bad, "-o", out},
		{"report", "--set", "parts.RB1.value=-5", "-o", out},
		{"report", "--no-such-flag", "-o", out},
	} {
		if code, _, _ := runArgs(args...); code != exitUsage {
			t.Errorf("%v: exit %d, want %d", args, code, exitUsage)
		}
	}
	// A bias point that cannot be found (the solver starved of
	// iterations): the analysis fails, exit 1.
	starved := filepath.Join("..", "..", "testdata", "dc", "starved_solver.toml")
	if code, _, errs := runArgs("report", starved, "-o", out); code != exitAnalysis {
		t.Errorf("a case without a bias point: exit %d, want %d (%s)", code, exitAnalysis, errs)
	}
	if data, _ := os.ReadFile(out); string(data) != "previous report" {
		t.Errorf("a failed run changed the report: %.60q", data)
	}
	if code, _, _ := runArgs("report", "-o", filepath.Join(dir, "no", "such", "dir", "r.html")); code != exitUsage {
		t.Errorf("unwritable output: exit %d, want %d", code, exitUsage)
	}
	if code, _, errs := runArgs("report", "example:sallen_key", "-o", out); code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), ".tangent-") {
			t.Errorf("temporary file %s left behind", e.Name())
		}
	}
	if data, _ := os.ReadFile(out); !bytes.HasPrefix(data, []byte("<!DOCTYPE html>")) {
		t.Errorf("the report was not replaced: %.60q", data)
	}
}

func TestReportDefaultPath(t *testing.T) {
	for file, want := range map[string]string{
		"":                         "ce_amplifier_report.html",
		"example:sallen_key":       "sallen_key_report.html",
		"cases/probe.toml":         "probe_report.html",
		"/tmp/x/gauge.stage2.toml": "gauge.stage2_report.html",
	} {
		if got := defaultReportPath(file); got != want {
			t.Errorf("defaultReportPath(%q) = %q, want %q", file, got, want)
		}
	}
}

// The page in a real browser: TANGENT_BROWSER_TEST=1 renders each
// example's report headless with chromium to a PNG and fails when the
// browser fails, reports an error about the page, or draws a (nearly)
// blank page. TANGENT_SCREENSHOTS=DIR keeps the PNGs.
func TestReportBrowser(t *testing.T) {
	if os.Getenv("TANGENT_BROWSER_TEST") == "" {
		t.Skip("set TANGENT_BROWSER_TEST=1 to render the reports in chromium (bash .ci/run does)")
	}
	chromium, err := exec.LookPath("chromium")
	if err != nil {
		t.Skip("chromium is not on PATH: apt-get install -y chromium")
	}
	dir := t.TempDir()
	shots := os.Getenv("TANGENT_SCREENSHOTS")
	if shots == "" {
		shots = dir
	}
	for _, ex := range cases.Examples() {
		t.Run(ex, func(t *testing.T) {
			page := filepath.Join(dir, ex+".html")
			if code, _, errs := runArgs("report", "example:"+ex, "-o", page); code != exitOK {
				t.Fatalf("exit %d: %s", code, errs)
			}
			shot := filepath.Join(shots, ex+".png")
			os.Remove(shot)
			cmd := exec.Command(chromium, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
				"--disable-background-networking", "--disable-component-update", "--disable-sync",
				"--user-data-dir="+filepath.Join(dir, "profile-"+ex), "--enable-logging=stderr", "--v=0",
				"--screenshot="+shot, "--window-size=1200,3000", "file://"+page)
			var stderr bytes.Buffer
			cmd.Stdout, cmd.Stderr = io.Discard, &stderr
			if err := cmd.Run(); err != nil {
				t.Fatalf("chromium: %v\n%s", err, stderr.String())
			}
			// Page errors: console messages and failed loads. The browser's
			// own complaints about its surroundings (no D-Bus, no GPU) are
			// not about the page.
			for _, line := range strings.Split(stderr.String(), "\n") {
				if strings.Contains(line, "CONSOLE") || strings.Contains(line, "net::ERR") || strings.Contains(line, "Failed to load") ||
					strings.Contains(line, "Uncaught") {
					t.Errorf("browser: %s", line)
				}
			}
			f, err := os.Open(shot)
			if err != nil {
				t.Fatalf("no screenshot: %v\n%s", err, stderr.String())
			}
			defer f.Close()
			img, err := png.Decode(f)
			if err != nil {
				t.Fatalf("screenshot: %v", err)
			}
			b := img.Bounds()
			if b.Dx() != 1200 || b.Dy() != 3000 {
				t.Errorf("screenshot is %v, want 1200×3000", b)
			}
			// Ink: pixels clearly darker than the page's paper and grey
			// margin (text, rules, badges); blank would be none.
			ink, total := 0, 0
			for y := b.Min.Y; y < b.Max.Y; y += 2 {
				for x := b.Min.X; x < b.Max.X; x += 2 {
					r, g, bl, _ := img.At(x, y).RGBA()
					if (299*r+587*g+114*bl)/1000 < 0x9000 { // luma below 56 %, ITU-R BT.601 weights
						ink++
					}
					total++
				}
			}
			if frac := float64(ink) / float64(total); frac < 0.01 {
				t.Errorf("the page looks blank: %.2f %% ink", 100*frac)
			} else {
				t.Logf("%s: %.1f %% ink, %s", ex, 100*frac, shot)
			}
		})
	}
}

// BenchmarkReport measures one report per example, from the case to the
// HTML in memory (no file).
func BenchmarkReport(b *testing.B) {
	for _, ex := range cases.Examples() {
		b.Run(ex, func(b *testing.B) {
			c, err := cases.Example(ex)
			if err != nil {
				b.Fatal(err)
			}
			for b.Loop() {
				page, code := buildReport("example:"+ex, c, reportOptions{threshold: 5}, io.Discard)
				if page == nil {
					b.Fatalf("exit %d", code)
				}
				var out bytes.Buffer
				if err := report.Write(&out, page); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// --set changes the case the report shows, and the page says so.
func TestReportSet(t *testing.T) {
	code, page, errs := runArgs("report", "--set", "parts.RC.value=4k7", "-o", "-")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(page, `--set parts.RC.value=4k7`) {
		t.Error("the page does not say the case was changed on the command line")
	}
	// IEC 60062: 4k7 is 4.7 kΩ.
	if !regexp.MustCompile(`data-src="case#/parts/RC/value" data-value="4700">4.700 kΩ<`).MatchString(page) {
		t.Error("the parts table does not show RC = 4.7 kΩ")
	}
}

// tableByID is the element with that id in page (nil when there is none).
func tableByID(t *testing.T, page []byte, id string) *html.Node {
	t.Helper()
	doc, err := html.Parse(bytes.NewReader(page))
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range findAll(doc, func(n *html.Node) bool { v, ok := attr(n, "id"); return ok && v == id }) {
		return n
	}
	return nil
}

// bodyRows are the rows of a table's body that are not group headings,
// each as the texts of its cells.
func bodyRows(table *html.Node) [][]string {
	var out [][]string
	for _, tr := range findAll(table, func(n *html.Node) bool { return n.Type == html.ElementNode && n.Data == "tr" }) {
		if tr.Parent == nil || tr.Parent.Data != "tbody" || hasClass(tr, "group") {
			continue
		}
		var cells []string
		for c := tr.FirstChild; c != nil; c = c.NextSibling {
			if c.Type == html.ElementNode && (c.Data == "td" || c.Data == "th") {
				cells = append(cells, strings.TrimSpace(textOf(c)))
			}
		}
		out = append(out, cells)
	}
	return out
}

// markedRows counts the rows of the side-by-side table marked * or ≠.
func markedRows(t *testing.T, page []byte) int {
	t.Helper()
	table := tableByID(t, page, "variant-changes")
	if table == nil {
		t.Fatal("no side-by-side table")
	}
	n := 0
	for _, r := range bodyRows(table) {
		if len(r) > 0 && (r[0] == "*" || r[0] == "≠") {
			n++
		}
	}
	return n
}

// The side-by-side flags, as "tangent compare" takes them: the page has
// the columns asked for, and every number on it is one of the other
// subcommands' JSON, compare's with the same flags (consistency with
// tangent compare --json).
func TestReportCompareFlags(t *testing.T) {
	// A case without variants: sallen_key with its [variants.*] left out.
	dir := t.TempDir()
	src, err := cases.ExampleSource("sallen_key")
	if err != nil {
		t.Fatal(err)
	}
	plain := filepath.Join(dir, "plain.toml")
	before, _, _ := strings.Cut(string(src), "[variants.")
	if err := os.WriteFile(plain, []byte(before), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name    string
		file    string
		flags   []string
		columns []string
		temps   []string // the temperature column as shown, SI Brochure 9th ed., 2.3.1: t/°C = T/K − 273.15
		heading string
	}{
		{"temperatures", "", []string{"--temperature", "-40,85"},
			[]string{"base", "T=-40 °C", "T=85 °C"}, []string{"27.00 °C", "−40.00 °C", "85.00 °C"}, "Temperatures side by side"},
		{"variant, kelvin and threshold", "example:ce_amplifier", []string{"--variant", "hot_enclosure", "--temperature", "233.15 K", "--threshold", "2.5 %"},
			[]string{"base", "hot_enclosure", "T=233.15 K"}, nil, "Variants and temperatures side by side"},
		{"variants named", "example:cs_mirror", []string{"--variant", "long_channel", "--variant", "double_reference"},
			[]string{"base", "long_channel", "double_reference"}, nil, "Variants side by side"},
		{"a case without variants", plain, []string{"--temperature", "0,50"},
			[]string{"base", "T=0 °C", "T=50 °C"}, nil, "Temperatures side by side"},
	} {
		t.Run(c.name, func(t *testing.T) {
			args := append([]string{"report"}, c.flags...)
			if c.file != "" {
				args = append(args, c.file)
			}
			code, out, errs := runArgs(append(args, "-o", "-")...)
			if code != exitOK {
				t.Fatalf("%v: exit %d: %s", args, code, errs)
			}
			page := []byte(out)
			if h := `<h2 id="variants-title">` + c.heading + `</h2>`; !strings.Contains(out, h) {
				t.Errorf("no %s in the page", h)
			}
			var circuit *cases.Circuit
			file := c.file
			if file == "" {
				file = cases.ExampleFile(cases.DefaultExample)
			}
			if name, ok := strings.CutPrefix(file, "example:"); ok {
				circuit, err = cases.Example(name)
			} else {
				circuit, err = cases.Load(file)
			}
			if err != nil {
				t.Fatal(err)
			}
			devices := false
			for _, p := range circuit.Parts {
				devices = devices || cases.IsDevice(p.Kind)
			}
			checkStructure(t, page, len(circuit.Transfers), true, devices)
			errs2, checked := checkPage(page, reportDocsOf(t, file, circuit, c.flags...))
			for _, e := range errs2 {
				t.Error(e)
			}
			if checked < 100 {
				t.Errorf("only %d numbers, quotes and formulas checked", checked)
			}
			var names, temps []string
			for _, r := range bodyRows(tableByID(t, page, "variant-columns")) {
				names = append(names, r[0])
				temps = append(temps, r[1])
			}
			if !slices.Equal(names, c.columns) {
				t.Errorf("columns %q, want %q", names, c.columns)
			}
			if c.temps != nil && !slices.Equal(temps, c.temps) {
				t.Errorf("column temperatures %q, want %q", temps, c.temps)
			}
			var heads []string
			for _, th := range findAll(tableByID(t, page, "variant-changes"), func(n *html.Node) bool { return n.Data == "th" && n.Parent.Parent.Data == "thead" }) {
				if h := textOf(th); h != "change" && h != "" && h != "quantity" {
					heads = append(heads, h)
				}
			}
			if !slices.Equal(heads, c.columns) {
				t.Errorf("side-by-side heads %q, want %q", heads, c.columns)
			}
		})
	}
}

// --threshold moves the marks as in compare: a lower threshold marks at
// least as many rows, a higher one no more, and the rows marked are as
// many as compare --json marks with the same threshold (consistency with
// tangent compare --json); "5 %" is the default, byte for byte.
func TestReportThreshold(t *testing.T) {
	marks := map[string]int{}
	pages := map[string]string{}
	for _, th := range []string{"", "1", "5 %", "50"} {
		args, flags := []string{"report", "-o", "-"}, []string(nil)
		if th != "" {
			flags = []string{"--threshold", th}
		}
		code, page, errs := runArgs(append(args, flags...)...)
		if code != exitOK {
			t.Fatalf("--threshold %q: exit %d: %s", th, code, errs)
		}
		pages[th] = page
		marks[th] = markedRows(t, []byte(page))
		docs := reportDocs(t, cases.DefaultExample, flags...)
		if e, _ := checkPage([]byte(page), docs); len(e) != 0 {
			t.Errorf("--threshold %q: %v", th, e)
		}
		want := 0
		for _, r := range docs["compare"].(map[string]any)["rows"].([]any) {
			if r.(map[string]any)["marked"] == true {
				want++
			}
		}
		if marks[th] != want {
			t.Errorf("--threshold %q: %d rows marked, compare --json marks %d", th, marks[th], want)
		}
	}
	t.Logf("rows marked: %v", marks)
	if marks["1"] < marks[""] || marks["50"] > marks[""] {
		t.Errorf("rows marked at 1 %%, 5 %%, 50 %%: %d, %d, %d; want them not increasing", marks["1"], marks[""], marks["50"])
	}
	if marks["1"] == marks["50"] {
		t.Error("1 % and 50 % mark the same rows: the test shows nothing")
	}
	if pages["5 %"] != pages[""] {
		t.Error("--threshold \"5 %\" does not give the default page")
	}
}

// Bad side-by-side flags are bad input, as in compare: exit 2, a message
// naming the flag, and no report written.
func TestReportCompareFlagErrors(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--variant", "nope"}, "--variant nope"},
		{[]string{"example:sallen_key", "--variant", "no_early"}, "--variant no_early"},
		{[]string{"--variant", "base"}, "--variant base"},
		{[]string{"--variant", "no_early", "--variant", "no_early"}, "--variant no_early"},
		{[]string{"--threshold", "x"}, "--threshold"},
		{[]string{"--threshold", "-1"}, "--threshold"},
		{[]string{"--temperature", "-40,,85"}, "--temperature"},
		{[]string{"--temperature", "-300"}, "--temperature"},
		{[]string{"--temperature", "warm"}, "--temperature"},
		{[]string{"--temperature", "27,27"}, "--temperature"},
	} {
		out := filepath.Join(dir, "r.html")
		code, _, errs := runArgs(append(append([]string{"report"}, c.args...), "-o", out)...)
		if code != exitUsage {
			t.Errorf("%q: exit %d, want %d (%s)", c.args, code, exitUsage, errs)
		}
		if !strings.HasPrefix(errs, "tangent report: ") || !strings.Contains(errs, c.want) {
			t.Errorf("%q: message %q does not name %s", c.args, errs, c.want)
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%q: a report was written", c.args)
		}
	}
}

// A physical check of the temperature columns: the diode thermometer's
// sensing voltage falls with temperature by about 2 mV/K (a silicon
// junction at constant current, common practice; the example's own
// comment says so too).
func TestReportTemperatureDiode(t *testing.T) {
	flags := []string{"--temperature", "-40,85"}
	code, out, errs := runArgs(append([]string{"report", "example:diode_thermometer", "-o", "-"}, flags...)...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	page := []byte(out)
	if e, _ := checkPage(page, reportDocs(t, "diode_thermometer", flags...)); len(e) != 0 {
		t.Fatalf("the page does not trace to the JSON: %v", e)
	}
	// The values of the V(sense) row, as the page carries them.
	doc, _ := html.Parse(bytes.NewReader(page))
	v := map[string]float64{}
	for _, n := range findAll(doc, func(n *html.Node) bool { s, _ := attr(n, "data-src"); return strings.Contains(s, "/values/") }) {
		tr := n.Parent.Parent
		if !strings.Contains(textOf(tr), "V(sense)") {
			continue
		}
		src, _ := attr(n, "data-src")
		dv, _ := attr(n, "data-value")
		v[src[strings.LastIndex(src, "/")+1:]], _ = strconv.ParseFloat(dv, 64)
	}
	if len(v) != 3 {
		t.Fatalf("V(sense) row: %v", v)
	}
	slope := (v["2"] - v["1"]) / 125 // V/K, from −40 °C to 85 °C
	if slope > -1.5e-3 || slope < -2.5e-3 {
		t.Errorf("V(sense) falls by %.2f mV/K over −40…85 °C, want about −2 mV/K", 1e3*slope)
	}
}
