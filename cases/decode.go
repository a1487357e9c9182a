package cases

import (
	"bytes"
	"cmp"
	"errors"
	"fmt"
	"math"
	"os"
	"slices"
	"strings"

	"github.com/BurntSushi/toml"

	"tangent/devices"
)

// Parse decodes and validates a case file. file names the source in
// messages. When the case is invalid, Parse returns a nil circuit and an
// Errors value holding every problem found, each with its line and key;
// warnings of a valid case are in Circuit.Warnings. Every variant is checked
// too: its override paths must name keys of the case, and the case with the
// variant applied must be valid.
func Parse(file string, data []byte) (*Circuit, error) {
	raw, d := decodeRaw(file, data)
	if d != nil {
		return nil, Errors{*d}
	}
	return build(file, raw, true)
}

// Load reads the case file at path and parses it.
func Load(path string) (*Circuit, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("cases: %w", err)
	}
	return Parse(path, data)
}

// rawCase is the decoded TOML tree of a case with the line of every key, kept
// inside a Circuit so that variants and overrides can be applied to the
// source and validated again.
type rawCase struct {
	tree  map[string]any
	lines map[string]int      // path.key() → line
	order map[string][]string // "parts", "models", "ports", "variants" → names in file order
}

// decodeRaw parses the TOML syntax. A syntax error is one diagnostic: the
// TOML parser stops at the first.
func decodeRaw(file string, data []byte) (*rawCase, *Diagnostic) {
	var tree map[string]any
	md, err := toml.NewDecoder(bytes.NewReader(data)).Decode(&tree)
	if err != nil {
		d := &Diagnostic{File: file, Line: 1, Message: "TOML syntax: " + err.Error()}
		var pe toml.ParseError
		if errors.As(err, &pe) {
			d.Line = max(pe.Position.Line, 1)
			d.Message = "TOML syntax: " + pe.Message
		}
		return nil, d
	}
	raw := &rawCase{tree: tree, lines: scanLines(string(data)), order: map[string][]string{}}
	seen := map[string]bool{}
	for _, k := range md.Keys() {
		if len(k) < 2 {
			continue
		}
		switch k[0] {
		case "parts", "models", "ports", "variants":
			if s := k[0] + "\x1f" + k[1]; !seen[s] {
				seen[s] = true
				raw.order[k[0]] = append(raw.order[k[0]], k[1])
			}
		}
	}
	return raw, nil
}

// builder turns a raw tree into a Circuit, collecting diagnostics.
type builder struct {
	file  string
	raw   *rawCase
	c     *Circuit
	diags []Diagnostic
	parts map[string]*Part
	// complete is false when some part's kind or terminals could not be
	// read; topology checks are then skipped, as they would report
	// consequences of that error rather than new ones.
	complete  bool
	badModels map[string]bool // models named in the file but not decodable
	// goodVariants are the variants whose override paths are sound.
	goodVariants []*Variant
}

// topKeys are the keys a case file may have at the top level.
var topKeys = []string{"title", "temperature", "models", "parts", "ports", "transfer", "variants", "solver"}

// build validates raw. With checkVariants, every variant is also applied and
// validated.
func build(file string, raw *rawCase, checkVariants bool) (*Circuit, error) {
	b := &builder{
		file:      file,
		raw:       raw,
		parts:     map[string]*Part{},
		complete:  true,
		badModels: map[string]bool{},
		c: &Circuit{
			File:        file,
			Temperature: devices.NominalTemperature,
			Models:      map[string]*Model{},
			Solver:      DefaultSolverOptions(),
			src:         raw,
		},
	}
	t := raw.tree
	b.unknownKeys(nil, t, topKeys, "at the top level")
	if v, ok := t["title"]; ok {
		b.c.Title, _ = b.str(path{"title"}, v, "a title string")
	}
	if v, ok := t["temperature"]; ok {
		if x, ok := b.number(path{"temperature"}, v, spec{unit: "K", positive: true, zero: "the temperature must be above absolute zero"}); ok {
			b.c.Temperature = x
		}
	}
	b.solver()
	b.models()
	b.partsTable()
	b.ports()
	b.transfers()
	b.variants()
	if b.complete {
		b.topology()
	}
	if checkVariants {
		b.tryVariants()
	}

	var errs, warns []Diagnostic
	for _, d := range b.diags {
		if d.Warning {
			warns = append(warns, d)
		} else {
			errs = append(errs, d)
		}
	}
	if len(errs) > 0 {
		return nil, Errors(sortDiagnostics(errs))
	}
	b.c.Warnings = sortDiagnostics(warns)
	return b.c, nil
}

// line returns the line of p, or of its closest ancestor with a known line.
func (b *builder) line(p path) int {
	for i := len(p); i > 0; i-- {
		if l, ok := b.raw.lines[p[:i].key()]; ok {
			return l
		}
	}
	return 1
}

func (b *builder) errorf(p path, format string, args ...any) {
	b.diags = append(b.diags, Diagnostic{File: b.file, Line: b.line(p), Key: p.String(), Message: fmt.Sprintf(format, args...)})
}

func (b *builder) warnf(p path, format string, args ...any) {
	b.diags = append(b.diags, Diagnostic{File: b.file, Line: b.line(p), Key: p.String(), Message: fmt.Sprintf(format, args...), Warning: true})
}

// names returns the keys of a table in file order: the order recorded for
// section (if any) first, then any others sorted.
func (b *builder) names(section string, t map[string]any) []string {
	var out []string
	seen := map[string]bool{}
	for _, n := range b.raw.order[section] {
		if _, ok := t[n]; ok && !seen[n] {
			seen[n] = true
			out = append(out, n)
		}
	}
	var rest []string
	for n := range t {
		if !seen[n] {
			rest = append(rest, n)
		}
	}
	slices.SortFunc(rest, func(x, y string) int {
		if lx, ly := b.raw.lines[path{section, x}.key()], b.raw.lines[path{section, y}.key()]; lx != ly {
			return lx - ly
		}
		return strings.Compare(x, y)
	})
	return append(out, rest...)
}

// sortedKeys returns the keys of t in line order (for stable messages).
func (b *builder) sortedKeys(p path, t map[string]any) []string {
	keys := make([]string, 0, len(t))
	lines := make(map[string]int, len(t))
	for k := range t {
		keys = append(keys, k)
		lines[k] = b.line(p.add(k))
	}
	slices.SortFunc(keys, func(x, y string) int {
		return cmp.Or(cmp.Compare(lines[x], lines[y]), strings.Compare(x, y))
	})
	return keys
}

// unknownKeys reports every key of t (at p) not in allowed.
func (b *builder) unknownKeys(p path, t map[string]any, allowed []string, where string) {
	for _, k := range b.sortedKeys(p, t) {
		if !slices.Contains(allowed, k) {
			b.errorf(p.add(k), "unknown key %q %s%s; expected one of: %s", k, where, suggest(k, allowed), strings.Join(allowed, ", "))
		}
	}
}

// table returns v as a table, or reports that a table was expected.
func (b *builder) table(p path, v any, what string) (map[string]any, bool) {
	t, ok := v.(map[string]any)
	if !ok {
		b.errorf(p, "expected %s, found %s", what, tomlType(v))
	}
	return t, ok
}

// str returns v as a string, or reports that one was expected.
func (b *builder) str(p path, v any, what string) (string, bool) {
	s, ok := v.(string)
	if !ok {
		b.errorf(p, "expected %s, found %s", what, tomlType(v))
	}
	return s, ok
}

// name reads a reference (a node, part, model or port name): a non-empty
// string without surrounding spaces.
func (b *builder) name(p path, v any, what string) (string, bool) {
	s, ok := b.str(p, v, what)
	if !ok {
		return "", false
	}
	if s == "" {
		b.errorf(p, "empty name; expected %s", what)
		return "", false
	}
	if strings.TrimSpace(s) != s {
		b.errorf(p, "%q has leading or trailing spaces; expected %s", s, what)
		return "", false
	}
	return s, true
}

// spec describes the values a numeric key accepts.
type spec struct {
	unit     string // see ParseValue
	allowInf bool
	signed   bool   // negative values are meaningful
	positive bool   // zero is rejected
	zero     string // message when zero is rejected; "" for a generic one
}

// number reads a numeric key: a TOML integer or float (a plain SI value) or
// a string with prefix and unit (see ParseValue).
func (b *builder) number(p path, v any, sp spec) (float64, bool) {
	var x float64
	switch v := v.(type) {
	case int64:
		x = float64(v)
	case float64:
		x = v
		if math.IsNaN(v) {
			b.errorf(p, "nan is not a value; expected %s such as %s", describeUnit(sp.unit), unitExample(sp.unit))
			return 0, false
		}
		if math.IsInf(v, 0) && (!sp.allowInf || v < 0) {
			b.errorf(p, "%v is not allowed for this key; expected a finite value such as %s", v, unitExample(sp.unit))
			return 0, false
		}
	case string:
		var err error
		if sp.allowInf {
			x, err = ParseValueInf(v, sp.unit)
		} else {
			x, err = ParseValue(v, sp.unit)
		}
		if err != nil {
			b.errorf(p, "%v", err)
			return 0, false
		}
	default:
		b.errorf(p, "expected %s (a number, or a string such as %s), found %s", describeUnit(sp.unit), unitExample(sp.unit), tomlType(v))
		return 0, false
	}
	if _, isString := v.(string); !isString && sp.unit == "K" {
		b.errorf(p, "a temperature needs its unit: write it as a string such as %s (a bare number would be a guess between K and °C)", unitExample("K"))
		return 0, false
	}
	if x < 0 && !sp.signed {
		if sp.unit == "K" {
			b.errorf(p, "%s is below absolute zero", show(v))
		} else {
			bound := "≥ 0"
			if sp.positive {
				bound = "> 0"
			}
			b.errorf(p, "%s is negative; expected %s %s", show(v), describeUnit(sp.unit), bound)
		}
		return 0, false
	}
	if x == 0 && sp.positive {
		if sp.zero != "" {
			b.errorf(p, "%s", sp.zero)
		} else {
			b.errorf(p, "%s is zero; expected %s > 0", show(v), describeUnit(sp.unit))
		}
		return 0, false
	}
	return x, true
}

// show formats a raw value as it appears in the file.
func show(v any) string {
	if s, ok := v.(string); ok {
		return fmt.Sprintf("%q", s)
	}
	return fmt.Sprint(v)
}

// integer reads a TOML integer in [lo, hi].
func (b *builder) integer(p path, v any, lo, hi int64) (int, bool) {
	n, ok := v.(int64)
	if !ok {
		b.errorf(p, "expected an integer from %d to %d, found %s", lo, hi, tomlType(v))
		return 0, false
	}
	if n < lo || n > hi {
		b.errorf(p, "%d is out of range; expected an integer from %d to %d", n, lo, hi)
		return 0, false
	}
	return int(n), true
}

// tomlType names the TOML type of a decoded value for messages.
func tomlType(v any) string {
	switch v.(type) {
	case string:
		return "a string"
	case int64:
		return "an integer"
	case float64:
		return "a float"
	case bool:
		return "a boolean"
	case map[string]any:
		return "a table"
	case []any, []map[string]any:
		return "an array"
	case nil:
		return "nothing"
	}
	return "a date or time"
}

// solverKeys are the keys of the [solver] table.
var solverKeys = []string{"relative_tolerance", "voltage_tolerance", "current_tolerance", "max_iterations"}

func (b *builder) solver() {
	v, ok := b.raw.tree["solver"]
	if !ok {
		return
	}
	p := path{"solver"}
	t, ok := b.table(p, v, "a [solver] table")
	if !ok {
		return
	}
	b.unknownKeys(p, t, solverKeys, "in [solver]")
	s := &b.c.Solver
	if v, ok := t["relative_tolerance"]; ok {
		if x, ok := b.number(p.add("relative_tolerance"), v, spec{unit: "", positive: true}); ok {
			if x >= 1 {
				b.errorf(p.add("relative_tolerance"), "%s is not a relative tolerance; expected a number between 0 and 1 such as 1e-9", show(v))
			}
			s.RelativeTolerance = x
		}
	}
	if v, ok := t["voltage_tolerance"]; ok {
		if x, ok := b.number(p.add("voltage_tolerance"), v, spec{unit: "V", positive: true}); ok {
			s.VoltageTolerance = x
		}
	}
	if v, ok := t["current_tolerance"]; ok {
		if x, ok := b.number(p.add("current_tolerance"), v, spec{unit: "A", positive: true}); ok {
			s.CurrentTolerance = x
		}
	}
	if v, ok := t["max_iterations"]; ok {
		if n, ok := b.integer(p.add("max_iterations"), v, 1, 100000); ok {
			s.MaxIterations = n
		}
	}
}

// deviceKinds are the values of a model's device key.
var deviceKinds = []string{DeviceDiode, DeviceNPN, DevicePNP, DeviceNMOS, DevicePMOS}

func (b *builder) models() {
	v, ok := b.raw.tree["models"]
	if !ok {
		return
	}
	t, ok := b.table(path{"models"}, v, "model tables [models.NAME]")
	if !ok {
		return
	}
	for _, name := range b.names("models", t) {
		b.model(name, t[name])
	}
}

func (b *builder) model(name string, v any) {
	p := path{"models", name}
	b.badModels[name] = true
	t, ok := b.table(p, v, "a model table [models."+name+"] with a device key")
	if !ok {
		return
	}
	dv, ok := t["device"]
	if !ok {
		b.errorf(p, "missing key device; expected one of: %s", strings.Join(deviceKinds, ", "))
		return
	}
	dev, ok := b.str(p.add("device"), dv, "a device kind ("+strings.Join(deviceKinds, ", ")+")")
	if !ok {
		return
	}
	params := devices.Params(dev)
	if params == nil || !slices.Contains(deviceKinds, dev) {
		b.errorf(p.add("device"), "unknown device %q%s; expected one of: %s", dev, suggest(dev, deviceKinds), strings.Join(deviceKinds, ", "))
		return
	}
	delete(b.badModels, name)
	m := &Model{Name: name, Device: dev, Params: map[string]float64{}, Line: b.line(p)}
	allowed := []string{"device"}
	for _, pr := range params {
		allowed = append(allowed, pr.Key)
	}
	for _, k := range b.sortedKeys(p, t) {
		if k == "device" {
			continue
		}
		i := slices.IndexFunc(params, func(pr devices.Param) bool { return pr.Key == k })
		if i < 0 {
			b.errorf(p.add(k), "unknown key %q for %s model%s; expected one of: %s", k, an(dev), suggest(k, allowed), strings.Join(allowed, ", "))
			continue
		}
		pr := params[i]
		if x, ok := b.number(p.add(k), t[k], spec{unit: pr.Unit, allowInf: pr.AllowInf, signed: pr.Signed, positive: pr.Positive}); ok {
			m.Params[k] = x
		}
	}
	for _, pr := range params {
		if _, ok := t[pr.Key]; pr.Required && !ok {
			b.errorf(p, "missing key %s: %s model needs it (there is no default), e.g. %s = %s", pr.Key, an(dev), pr.Key, requiredExample(pr.Key, pr.Unit))
		}
	}
	b.c.Models[name] = m
}

// partKinds lists the part kinds in the order messages give them.
var partKinds = []string{
	string(Resistor), string(Capacitor), string(Inductor), string(VoltageSource), string(CurrentSource),
	string(VCVS), string(VCCS), string(CCCS), string(CCVS), string(Diode), string(BJT), string(MOSFET),
}

// keySpec is one non-terminal key of a part kind.
type keySpec struct {
	key      string
	required bool
	spec
}

// partValueKeys returns the numeric keys of a part kind.
func partValueKeys(k Kind) []keySpec {
	tol := keySpec{key: "tolerance", spec: spec{unit: "%"}}
	switch k {
	case Resistor:
		return []keySpec{{"value", true, spec{unit: "Ω", positive: true, zero: "a zero resistance is singular; join the two nodes or use a voltage_source of 0 V"}}, tol}
	case Capacitor:
		return []keySpec{{"value", true, spec{unit: "F", positive: true, zero: "a zero capacitance is an open circuit; remove the part"}}, tol}
	case Inductor:
		return []keySpec{{"value", true, spec{unit: "H", positive: true, zero: "a zero inductance is a short; join the two nodes or use a voltage_source of 0 V"}}, tol}
	case VoltageSource, CurrentSource:
		u := "V"
		if k == CurrentSource {
			u = "A"
		}
		return []keySpec{{"dc", true, spec{unit: u, signed: true}}, {"ac", false, spec{unit: u}}, {"ac_phase", false, spec{unit: "°", signed: true}}}
	case VCVS, CCCS:
		return []keySpec{{"gain", true, spec{unit: "dB", signed: true}}}
	case VCCS:
		return []keySpec{{"transconductance", true, spec{unit: "S", signed: true}}}
	case CCVS:
		return []keySpec{{"transresistance", true, spec{unit: "Ω", signed: true}}}
	case Diode, BJT:
		return []keySpec{{"area", false, spec{unit: "", positive: true}}}
	case MOSFET:
		return []keySpec{{"width", false, spec{unit: "m", positive: true}}, {"length", false, spec{unit: "m", positive: true}}, {"multiplier", false, spec{unit: "", positive: true}}}
	}
	return nil
}

// partKeys returns every key a part of kind k may have.
func partKeys(k Kind) []string {
	keys := append([]string{"kind"}, Terminals(k)...)
	switch k {
	case CCCS, CCVS:
		keys = append(keys, "control")
	case Diode, BJT, MOSFET:
		keys = append(keys, "model")
	}
	for _, ks := range partValueKeys(k) {
		keys = append(keys, ks.key)
	}
	return keys
}

// controlKinds are the two-terminal parts whose current can control a cccs
// or ccvs.
var controlKinds = []Kind{Resistor, Capacitor, Inductor, VoltageSource, CurrentSource, Diode}

// deviceModels gives the model device kinds that fit a device part.
var deviceModels = map[Kind][]string{
	Diode:  {DeviceDiode},
	BJT:    {DeviceNPN, DevicePNP},
	MOSFET: {DeviceNMOS, DevicePMOS},
}

func (b *builder) partsTable() {
	v, ok := b.raw.tree["parts"]
	if !ok {
		b.errorf(nil, "the case has no parts; expected part tables such as [parts.R1] with kind, terminals and value")
		b.complete = false
		return
	}
	t, ok := b.table(path{"parts"}, v, "part tables [parts.NAME]")
	if !ok {
		b.complete = false
		return
	}
	if len(t) == 0 {
		b.errorf(path{"parts"}, "the case has no parts")
		b.complete = false
	}
	for _, name := range b.names("parts", t) {
		if part := b.part(name, t[name]); part != nil {
			b.c.Parts = append(b.c.Parts, part)
			b.parts[name] = part
		}
	}
	// References, now that every part and model is known.
	for _, part := range b.c.Parts {
		b.references(part, t[part.Name].(map[string]any))
	}
	// Nodes in order of first appearance.
	seen := map[string]bool{Ground: true, "": true}
	for _, part := range b.c.Parts {
		for _, n := range part.Nodes {
			if !seen[n] {
				seen[n] = true
				b.c.Nodes = append(b.c.Nodes, n)
			}
		}
	}
}

func (b *builder) part(name string, v any) *Part {
	p := path{"parts", name}
	t, ok := b.table(p, v, "a part table [parts."+name+"] with kind and terminals")
	if !ok {
		b.complete = false
		return nil
	}
	kv, ok := t["kind"]
	if !ok {
		b.errorf(p, "missing key kind; expected one of: %s", strings.Join(partKinds, ", "))
		b.complete = false
		return nil
	}
	ks, ok := b.str(p.add("kind"), kv, "a part kind ("+strings.Join(partKinds, ", ")+")")
	if !ok {
		b.complete = false
		return nil
	}
	kind := Kind(ks)
	if Terminals(kind) == nil {
		b.errorf(p.add("kind"), "unknown part kind %q%s; expected one of: %s", ks, suggest(ks, partKinds), strings.Join(partKinds, ", "))
		b.complete = false
		return nil
	}
	part := &Part{Name: name, Kind: kind, Line: b.line(p), Area: 1, Multiplier: 1}
	b.unknownKeys(p, t, partKeys(kind), "for "+an(ks))

	terms := Terminals(kind)
	part.Nodes = make([]string, len(terms))
	for i, term := range terms {
		tv, ok := t[term]
		if !ok {
			if kind == MOSFET && term == "body" {
				part.Nodes[i] = part.Nodes[2] // the source
				continue
			}
			b.errorf(p.add(term), "missing terminal %s: %s connects %s, each to a node", term, an(ks), strings.Join(requiredTerminals(kind), ", "))
			b.complete = false
			continue
		}
		node, ok := b.name(p.add(term), tv, `a node name such as "vcc" or "gnd"`)
		if !ok {
			b.complete = false
			continue
		}
		part.Nodes[i] = node
	}

	for _, k := range partValueKeys(kind) {
		v, ok := t[k.key]
		if !ok {
			if k.required {
				b.errorf(p.add(k.key), "missing key %s: %s needs %s = %s", k.key, an(ks), k.key, unitExample(k.unit))
			}
			continue
		}
		x, ok := b.number(p.add(k.key), v, k.spec)
		if !ok {
			continue
		}
		switch k.key {
		case "value", "gain", "transconductance", "transresistance":
			part.Value = x
		case "tolerance":
			if x >= 1 {
				b.errorf(p.add(k.key), "%s is not a tolerance; expected a fraction below 1 such as \"5 %%\" or 0.05", show(v))
			}
			part.Tolerance = x
		case "dc":
			part.DC = x
		case "ac":
			part.AC = x
		case "ac_phase":
			part.ACPhase = x * math.Pi / 180
		case "area":
			part.Area = x
		case "width":
			part.Width = x
		case "length":
			part.Length = x
		case "multiplier":
			part.Multiplier = x
		}
	}
	return part
}

// requiredTerminals lists the terminals a part must name.
func requiredTerminals(k Kind) []string {
	if k == MOSFET {
		return []string{"drain", "gate", "source"}
	}
	return Terminals(k)
}

// references checks the model and control names of a part and a mosfet's
// geometry.
func (b *builder) references(part *Part, t map[string]any) {
	p := path{"parts", part.Name}
	switch part.Kind {
	case CCCS, CCVS:
		v, ok := t["control"]
		if !ok {
			b.errorf(p.add("control"), "missing key control: %s is controlled by the current of a two-terminal part; expected control = \"NAME\" naming a %s", an(string(part.Kind)), kindNames(controlKinds))
			return
		}
		name, ok := b.name(p.add("control"), v, "the name of a two-terminal part")
		if !ok {
			return
		}
		part.Control = name
		ctl, ok := b.parts[name]
		switch {
		case name == part.Name:
			b.errorf(p.add("control"), "%s cannot be controlled by its own current", an(string(part.Kind)))
		case !ok:
			if !b.inFile("parts", name) {
				b.errorf(p.add("control"), "no part named %q%s; expected a %s", name, suggest(name, b.partNames()), kindNames(controlKinds))
			}
		case !slices.Contains(controlKinds, ctl.Kind):
			b.errorf(p.add("control"), "part %s is %s; a controlling current must be that of a two-terminal part (%s)", name, an(string(ctl.Kind)), kindNames(controlKinds))
		}
	case Diode, BJT, MOSFET:
		fits := deviceModels[part.Kind]
		v, ok := t["model"]
		if !ok {
			b.errorf(p.add("model"), "missing key model: %s needs model = \"NAME\" naming %s model%s", an(string(part.Kind)), anList(fits), b.modelList(fits))
			return
		}
		name, ok := b.name(p.add("model"), v, "a model name")
		if !ok {
			return
		}
		part.Model = name
		m, ok := b.c.Models[name]
		switch {
		case !ok && b.badModels[name]:
			// The model's own error is reported.
		case !ok:
			b.errorf(p.add("model"), "no model named %q%s; expected %s model%s", name, suggest(name, b.modelNames()), anList(fits), b.modelList(fits))
		case !slices.Contains(fits, m.Device):
			b.errorf(p.add("model"), "model %s is %s model; %s needs %s model%s", name, an(m.Device), an(string(part.Kind)), anList(fits), b.modelList(fits))
		case part.Kind == MOSFET:
			for _, g := range []string{"width", "length"} {
				_, onPart := t[g]
				mt, _ := b.rawEntry("models", name)
				_, onModel := mt[g]
				if !onPart && !onModel {
					b.errorf(p.add(g), "no %s: give it on the part or in model %s, e.g. %s = %s", g, name, g, unitExample("m"))
				}
			}
		}
	}
}

// an prefixes a kind name with its article: "an npn", "a pmos".
func an(word string) string {
	first, _, _ := strings.Cut(word, " ")
	if word != "" && (strings.ContainsRune("aeiou", rune(word[0])) || first == "npn" || first == "nmos") {
		return "an " + word
	}
	return "a " + word
}

// anList joins device kinds with "or" under one article: "an npn or pnp".
func anList(words []string) string { return an(strings.Join(words, " or ")) }

// requiredExample gives a plausible value for a required model key.
func requiredExample(key, unit string) string {
	switch key {
	case "saturation_current":
		return `"5 fA"`
	case "threshold_voltage":
		return `"0.5 V"`
	case "process_transconductance":
		return `"200 µA/V²"`
	}
	return unitExample(unit)
}

func kindNames(ks []Kind) string {
	s := make([]string, len(ks))
	for i, k := range ks {
		s[i] = string(k)
	}
	return strings.Join(s[:len(s)-1], ", ") + " or " + s[len(s)-1]
}

func (b *builder) partNames() []string {
	var s []string
	for _, p := range b.c.Parts {
		s = append(s, p.Name)
	}
	return s
}

func (b *builder) modelNames() []string {
	var s []string
	for n := range b.c.Models {
		s = append(s, n)
	}
	slices.Sort(s)
	return s
}

// modelList names the models of the given device kinds, for messages.
func (b *builder) modelList(fits []string) string {
	var s []string
	for _, n := range b.modelNames() {
		if slices.Contains(fits, b.c.Models[n].Device) {
			s = append(s, n)
		}
	}
	if len(s) == 0 {
		return " (the case defines no such model)"
	}
	return " (the case defines " + strings.Join(s, ", ") + ")"
}

// rawEntry returns the table [section.name] of the source, if it is one.
func (b *builder) rawEntry(section, name string) (map[string]any, bool) {
	t, _ := b.raw.tree[section].(map[string]any)
	e, ok := t[name].(map[string]any)
	return e, ok
}

// inFile reports whether the source has a key section.name.
func (b *builder) inFile(section, name string) bool {
	t, _ := b.raw.tree[section].(map[string]any)
	_, ok := t[name]
	return ok
}

// hasNode reports whether n is gnd or a node of some part.
func (b *builder) hasNode(n string) bool {
	return n == Ground || slices.Contains(b.c.Nodes, n)
}

func (b *builder) ports() {
	v, ok := b.raw.tree["ports"]
	if !ok {
		return
	}
	t, ok := b.table(path{"ports"}, v, "port tables [ports.NAME]")
	if !ok {
		return
	}
	for _, name := range b.names("ports", t) {
		p := path{"ports", name}
		pt, ok := b.table(p, t[name], "a port table [ports."+name+"] with plus (and minus) or source")
		if !ok {
			continue
		}
		b.unknownKeys(p, pt, []string{"plus", "minus", "source"}, "in a port")
		port := &Port{Name: name, Minus: Ground, Line: b.line(p)}
		if sv, ok := pt["source"]; ok {
			_, hasPlus := pt["plus"]
			_, hasMinus := pt["minus"]
			if hasPlus || hasMinus {
				b.errorf(p, "a port is either a pair of nodes (plus, minus) or a source, not both")
				continue
			}
			src, ok := b.name(p.add("source"), sv, "the name of a voltage_source or current_source")
			if !ok {
				continue
			}
			part, ok := b.parts[src]
			switch {
			case !ok:
				if !b.inFile("parts", src) {
					b.errorf(p.add("source"), "no part named %q%s; expected an independent voltage_source or current_source", src, suggest(src, b.partNames()))
				}
				continue
			case part.Kind != VoltageSource && part.Kind != CurrentSource:
				b.errorf(p.add("source"), "part %s is %s; a port's source must be an independent voltage_source or current_source", src, an(string(part.Kind)))
				continue
			}
			// The port's plus is the node the source drives: a voltage
			// source's plus, the node a current source pushes its
			// current into (to).
			port.Source, port.Plus, port.Minus = src, part.Nodes[0], part.Nodes[1]
			if part.Kind == CurrentSource {
				port.Plus, port.Minus = part.Nodes[1], part.Nodes[0]
			}
		} else {
			if _, ok := pt["plus"]; !ok {
				b.errorf(p.add("plus"), "missing key plus: a port is plus = \"NODE\" (minus defaults to gnd) or source = \"PART\"")
				continue
			}
			ok = true
			for _, term := range []string{"plus", "minus"} {
				v, given := pt[term]
				if !given {
					continue
				}
				n, good := b.name(p.add(term), v, "a node name")
				if good && !b.hasNode(n) {
					b.errorf(p.add(term), "node %q is not connected to any part%s", n, suggest(n, b.c.Nodes))
					good = false
				}
				ok = ok && good
				if term == "plus" {
					port.Plus = n
				} else {
					port.Minus = n
				}
			}
			if !ok {
				continue
			}
			if port.Plus == port.Minus {
				b.errorf(p, "plus and minus are both %q; a port needs two different nodes", port.Plus)
				continue
			}
		}
		b.c.Ports = append(b.c.Ports, port)
	}
}

// transferKinds lists the transfer kinds.
var transferKinds = []string{
	string(VoltageGain), string(CurrentGain), string(Transconductance), string(Transimpedance),
	string(InputImpedance), string(OutputImpedance),
}

// Sweep limits: enough for any Bode plot, small enough that a typo cannot
// ask for millions of points.
const (
	maxPointsPerDecade = 1000
	maxSweepPoints     = 100000
)

func (b *builder) transfers() {
	v, ok := b.raw.tree["transfer"]
	if !ok {
		return
	}
	var list []map[string]any
	switch v := v.(type) {
	case []map[string]any:
		list = v
	case []any:
		for i, e := range v {
			m, ok := e.(map[string]any)
			if !ok {
				b.errorf(path{"transfer", idx(i)}, "expected a transfer table, found %s", tomlType(e))
				continue
			}
			list = append(list, m)
		}
	default:
		b.errorf(path{"transfer"}, "expected [[transfer]] entries (an array of tables), found %s", tomlType(v))
		return
	}
	portNames := make([]string, len(b.c.Ports))
	for i, p := range b.c.Ports {
		portNames[i] = p.Name
	}
	allPorts, _ := b.raw.tree["ports"].(map[string]any)
	for i, t := range list {
		p := path{"transfer", idx(i)}
		b.unknownKeys(p, t, []string{"from", "to", "kind", "sweep"}, "in a [[transfer]]")
		tr := &Transfer{Line: b.line(p)}
		ok := true
		for _, k := range []string{"from", "to"} {
			v, given := t[k]
			if !given {
				b.errorf(p.add(k), "missing key %s: a transfer goes from one port to another (ports: %s)", k, strings.Join(portNames, ", "))
				ok = false
				continue
			}
			n, good := b.name(p.add(k), v, "a port name")
			if good && !slices.Contains(portNames, n) {
				if _, inFile := allPorts[n]; !inFile {
					b.errorf(p.add(k), "no port named %q%s; the case defines: %s", n, suggest(n, portNames), strings.Join(portNames, ", "))
				}
				good = false
			}
			ok = ok && good
			if k == "from" {
				tr.From = n
			} else {
				tr.To = n
			}
		}
		if v, given := t["kind"]; !given {
			b.errorf(p.add("kind"), "missing key kind; expected one of: %s", strings.Join(transferKinds, ", "))
			ok = false
		} else if s, good := b.str(p.add("kind"), v, "a transfer kind"); !good {
			ok = false
		} else if !slices.Contains(transferKinds, s) {
			b.errorf(p.add("kind"), "unknown transfer kind %q%s; expected one of: %s", s, suggest(s, transferKinds), strings.Join(transferKinds, ", "))
			ok = false
		} else {
			tr.Kind = TransferKind(s)
		}
		if ok && tr.From == tr.To && tr.Kind != InputImpedance {
			b.errorf(p.add("to"), "from and to are both port %q; only an input_impedance may use one port for both", tr.From)
			ok = false
		}
		if v, given := t["sweep"]; given {
			tr.Sweep = b.sweep(p.add("sweep"), v)
			if tr.Sweep == nil {
				ok = false
			}
		}
		if ok {
			b.c.Transfers = append(b.c.Transfers, tr)
		}
	}
}

func (b *builder) sweep(p path, v any) *Sweep {
	t, ok := b.table(p, v, `a sweep table such as { start = "10 Hz", stop = "100 MHz", points_per_decade = 20 }`)
	if !ok {
		return nil
	}
	b.unknownKeys(p, t, []string{"start", "stop", "points_per_decade"}, "in a sweep")
	s := &Sweep{}
	ok = true
	for _, k := range []string{"start", "stop"} {
		v, given := t[k]
		if !given {
			b.errorf(p.add(k), "missing key %s: a sweep needs start, stop (Hz) and points_per_decade", k)
			ok = false
			continue
		}
		x, good := b.number(p.add(k), v, spec{unit: "Hz", positive: true, zero: "a logarithmic sweep cannot reach 0 Hz; start at e.g. \"1 Hz\""})
		ok = ok && good
		if k == "start" {
			s.Start = x
		} else {
			s.Stop = x
		}
	}
	if v, given := t["points_per_decade"]; !given {
		b.errorf(p.add("points_per_decade"), "missing key points_per_decade: expected an integer from 1 to %d such as 20", maxPointsPerDecade)
		ok = false
	} else if n, good := b.integer(p.add("points_per_decade"), v, 1, maxPointsPerDecade); good {
		s.PointsPerDecade = n
	} else {
		ok = false
	}
	if !ok {
		return nil
	}
	if s.Start >= s.Stop {
		b.errorf(p.add("stop"), "stop (%g Hz) must be above start (%g Hz)", s.Stop, s.Start)
		return nil
	}
	if math.Log10(s.Stop/s.Start)*float64(s.PointsPerDecade) > maxSweepPoints {
		b.errorf(p, "the sweep asks for more than %d points; narrow it or lower points_per_decade", maxSweepPoints)
		return nil
	}
	return s
}

// suggest returns ` (did you mean "x"?)` for the closest option within a
// small edit distance of s, or "".
func suggest(s string, options []string) string {
	if len([]rune(s)) <= 2 {
		return "" // any two short names are close: a hint would be noise
	}
	best, bestD := "", 3
	if len(s) <= 4 {
		bestD = 2
	}
	for _, o := range options {
		if d := editDistance(strings.ToLower(s), strings.ToLower(o)); d < bestD {
			best, bestD = o, d
		}
	}
	if best == "" || best == s {
		return ""
	}
	return fmt.Sprintf(" (did you mean %q?)", best)
}

// editDistance is the Levenshtein distance between a and b, in runes.
func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	if len(ra) > 64 || len(rb) > 64 {
		return 99
	}
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			c := 1
			if ra[i-1] == rb[j-1] {
				c = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+c)
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}
