package cases

import (
	"cmp"
	"errors"
	"fmt"
	"slices"
	"strings"

	"tangent/devices"
)

// ApplyVariant returns a new, validated circuit: c with the overrides of the
// named variant applied to its source. The result keeps c's variants and
// records the name in Circuit.Variant. Parse has already checked that every
// variant applies cleanly to the base case.
func (c *Circuit) ApplyVariant(name string) (*Circuit, error) {
	i := slices.IndexFunc(c.Variants, func(v *Variant) bool { return v.Name == name })
	if i < 0 {
		var names []string
		for _, v := range c.Variants {
			names = append(names, v.Name)
		}
		if len(names) == 0 {
			return nil, fmt.Errorf("cases: %s: no variant named %q (the case defines none)", c.File, name)
		}
		return nil, fmt.Errorf("cases: %s: no variant named %q%s (the case defines %s)", c.File, name, suggest(name, names), strings.Join(names, ", "))
	}
	nc, err := c.WithOverrides(c.Variants[i].Overrides)
	if err != nil {
		var errs Errors
		if errors.As(err, &errs) {
			for j := range errs {
				errs[j].Message += " (with variant " + name + ")"
			}
			return nil, errs
		}
		return nil, err
	}
	nc.Variant = name
	return nc, nil
}

// WithOverrides returns a new, validated circuit: c with each override's
// value set at its path, as if the file had said so. Paths are those of the
// file: temperature, solver.KEY, models.NAME.KEY and parts.NAME.KEY, where
// KEY is any key that table may have (set in the file or not); a part's kind
// and a model's device cannot be changed. A one-element path may also name
// a switch (early_effect, terminal_resistances, channel_length_modulation,
// body_effect, capacitances; see the package comment), which stands for the
// model keys it sets; an explicit override of one of those keys in the same
// list is a conflict. Values are raw TOML values: a string such as "4k7" is
// read as in the file. Override.Line is used in messages (0 when the
// override does not come from a file). A switch that changes nothing adds a
// warning to the result's Warnings.
func (c *Circuit) WithOverrides(overrides []Override) (*Circuit, error) {
	if c.src == nil {
		return nil, errors.New("cases: the circuit was not decoded from a case file, so it has no source to override")
	}
	var errs Errors
	for _, o := range overrides {
		if isSwitch(o.Path) {
			continue
		}
		if msg := overridePathError(c.src.tree, o.Path); msg != "" {
			errs = append(errs, Diagnostic{File: c.File, Line: o.Line, Key: path(o.Path).String(), Message: msg})
		}
	}
	expanded, probs := expandSwitches(c.src.tree, overrides)
	var warns []Diagnostic
	for _, p := range probs {
		d := Diagnostic{File: c.File, Line: p.line, Key: p.rel.String(), Message: p.msg, Warning: p.warning}
		if p.warning {
			warns = append(warns, d)
		} else {
			errs = append(errs, d)
		}
	}
	if len(errs) > 0 {
		return nil, Errors(sortDiagnostics(errs))
	}
	nc, err := build(c.File, applyOverrides(c.src, expanded), false)
	if err != nil {
		return nil, err
	}
	nc.Variant = c.Variant
	nc.Warnings = sortDiagnostics(append(nc.Warnings, warns...))
	return nc, nil
}

// overrideForms says what an override path may be.
const overrideForms = "expected temperature, solver.KEY, models.NAME.KEY or parts.NAME.KEY"

// overridePathError returns why rel is not a path an override can set, or
// "" when it is. A table whose own decoding failed accepts any key: its
// error is reported where it is.
func overridePathError(tree map[string]any, rel []string) string {
	if len(rel) == 0 {
		return "empty override path; " + overrideForms
	}
	switch rel[0] {
	case "temperature":
		if len(rel) == 1 {
			return ""
		}
	case "solver":
		if len(rel) == 2 {
			if slices.Contains(solverKeys, rel[1]) {
				return ""
			}
			return fmt.Sprintf("[solver] has no key %q%s; expected one of: %s", rel[1], suggest(rel[1], solverKeys), strings.Join(solverKeys, ", "))
		}
	case "models":
		if len(rel) == 3 {
			models, _ := tree["models"].(map[string]any)
			m, ok := models[rel[1]].(map[string]any)
			if !ok {
				return fmt.Sprintf("no model named %q%s", rel[1], suggest(rel[1], mapKeys(models)))
			}
			dev, _ := m["device"].(string)
			params := devices.Params(dev)
			if params == nil {
				return ""
			}
			if rel[2] == "device" {
				return "a variant cannot change a model's device; define a second model and point the part at it"
			}
			var keys []string
			for _, p := range params {
				keys = append(keys, p.Key)
			}
			if !slices.Contains(keys, rel[2]) {
				return fmt.Sprintf("%s model has no key %q%s; expected one of: %s", an(dev), rel[2], suggest(rel[2], keys), strings.Join(keys, ", "))
			}
			return ""
		}
	case "parts":
		if len(rel) == 3 {
			parts, _ := tree["parts"].(map[string]any)
			p, ok := parts[rel[1]].(map[string]any)
			if !ok {
				return fmt.Sprintf("no part named %q%s", rel[1], suggest(rel[1], mapKeys(parts)))
			}
			ks, _ := p["kind"].(string)
			kind := Kind(ks)
			if Terminals(kind) == nil {
				return ""
			}
			if rel[2] == "kind" {
				return "a variant cannot change a part's kind"
			}
			keys := partKeys(kind)[1:]
			if !slices.Contains(keys, rel[2]) {
				return fmt.Sprintf("%s has no key %q%s; expected one of: %s", an(ks), rel[2], suggest(rel[2], keys), strings.Join(keys, ", "))
			}
			return ""
		}
	}
	return fmt.Sprintf("%q names no key an override can set; %s", strings.Join(rel, "."), overrideForms)
}

func mapKeys(m map[string]any) []string {
	var s []string
	for k := range m {
		s = append(s, k)
	}
	slices.Sort(s)
	return s
}

// applyOverrides returns a copy of raw with the overrides set; the line of
// each overridden key becomes the override's line.
func applyOverrides(raw *rawCase, overrides []Override) *rawCase {
	nr := &rawCase{
		tree:  deepCopy(raw.tree).(map[string]any),
		lines: make(map[string]int, len(raw.lines)),
		order: raw.order,
	}
	for k, v := range raw.lines {
		nr.lines[k] = v
	}
	for _, o := range overrides {
		t := nr.tree
		for _, k := range o.Path[:len(o.Path)-1] {
			sub, ok := t[k].(map[string]any)
			if !ok {
				if _, exists := t[k]; exists {
					t = nil // not a table: the base case's error says so
					break
				}
				sub = map[string]any{}
				t[k] = sub
			}
			t = sub
		}
		if t == nil {
			continue
		}
		t[o.Path[len(o.Path)-1]] = normalize(o.Value)
		if o.Line > 0 {
			nr.lines[path(o.Path).key()] = o.Line
		}
	}
	return nr
}

// normalize converts Go numbers to the types the TOML decoder produces.
func normalize(v any) any {
	switch v := v.(type) {
	case int:
		return int64(v)
	case int32:
		return int64(v)
	case float32:
		return float64(v)
	}
	return v
}

func deepCopy(v any) any {
	switch v := v.(type) {
	case map[string]any:
		m := make(map[string]any, len(v))
		for k, e := range v {
			m[k] = deepCopy(e)
		}
		return m
	case []map[string]any:
		s := make([]map[string]any, len(v))
		for i, e := range v {
			s[i] = deepCopy(e).(map[string]any)
		}
		return s
	case []any:
		s := make([]any, len(v))
		for i, e := range v {
			s[i] = deepCopy(e)
		}
		return s
	}
	return v
}

// variants decodes [variants.NAME] tables and checks their override paths.
func (b *builder) variants() {
	v, ok := b.raw.tree["variants"]
	if !ok {
		return
	}
	t, ok := b.table(path{"variants"}, v, "variant tables [variants.NAME]")
	if !ok {
		return
	}
	for _, name := range b.names("variants", t) {
		p := path{"variants", name}
		vt, ok := b.table(p, t[name], "a variant table [variants."+name+"] of overrides such as models.NAME.KEY = value")
		if !ok {
			continue
		}
		va := &Variant{Name: name, Line: b.line(p)}
		if nv, ok := vt["note"]; ok {
			va.Note, _ = b.str(p.add("note"), nv, "a note string")
		}
		var rels []path
		collectLeaves(nil, vt, &rels)
		for k := range vt {
			if isSwitch([]string{k}) {
				rels = append(rels, path{k})
			}
		}
		slices.SortStableFunc(rels, func(x, y path) int {
			return cmp.Or(b.line(p.add(x...))-b.line(p.add(y...)), strings.Compare(x.key(), y.key()))
		})
		good := true
		for _, rel := range rels {
			full := p.add(rel...)
			if !isSwitch(rel) {
				if msg := overridePathError(b.raw.tree, rel); msg != "" {
					b.errorf(full, "%s", msg)
					good = false
				}
			}
			va.Overrides = append(va.Overrides, Override{Path: rel, Value: leaf(vt, rel), Line: b.line(full)})
		}
		expanded, probs := expandSwitches(b.raw.tree, va.Overrides)
		for _, pr := range probs {
			if pr.warning {
				b.warnf(p.add(pr.rel...), "%s", pr.msg)
				continue
			}
			b.errorf(p.add(pr.rel...), "%s", pr.msg)
			good = false
		}
		if len(rels) == 0 {
			b.warnf(p, "the variant overrides nothing")
		} else if len(expanded) == 0 && len(probs) == 0 {
			b.warnf(p, "the variant changes nothing: every switch in it is true")
		}
		if good {
			b.goodVariants = append(b.goodVariants, va)
		}
		b.c.Variants = append(b.c.Variants, va)
	}
}

// collectLeaves appends the paths of all non-table values under t (except a
// top-level note and switches) to out.
func collectLeaves(prefix path, t map[string]any, out *[]path) {
	for k, v := range t {
		if len(prefix) == 0 && (k == "note" || isSwitch([]string{k})) {
			continue
		}
		if sub, ok := v.(map[string]any); ok && len(sub) > 0 {
			collectLeaves(prefix.add(k), sub, out)
			continue
		}
		*out = append(*out, prefix.add(k))
	}
}

func leaf(t map[string]any, rel path) any {
	var v any = t
	for _, k := range rel {
		m, _ := v.(map[string]any)
		v = m[k]
	}
	return v
}

// tryVariants applies every variant whose paths are sound to the base case
// and reports the problems that the variant introduces, at the variant's
// lines.
func (b *builder) tryVariants() {
	base := map[string]bool{}
	for _, d := range b.diags {
		base[d.Error()] = true
	}
	for _, va := range b.goodVariants {
		expanded, _ := expandSwitches(b.raw.tree, va.Overrides)
		_, err := build(b.file, applyOverrides(b.raw, expanded), false)
		var errs Errors
		if !errors.As(err, &errs) {
			continue
		}
		for _, d := range errs {
			if base[d.Error()] {
				continue
			}
			for _, o := range va.Overrides {
				if d.Key == path(o.Path).String() {
					d.Key = path{"variants", va.Name}.add(o.Path...).String()
				}
			}
			d.Message += " (with variant " + va.Name + ")"
			b.diags = append(b.diags, d)
		}
	}
}
