package schema

import (
	"errors"
	"fmt"
	"math"
	"reflect"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"
)

// DecodeOptions adjust Decode for one file type. Paths are dotted field paths with "[]" standing for any
// sequence index: "supply.transformers[].count".
type DecodeOptions struct {
	Required  []string // fields that must be present (and, for text, non-empty)
	AllowZero []string // quantity and count fields where 0 is meaningful; everywhere else 0 is refused
	// AllowNegative are fields that may be negative (by default no value may be).
	AllowNegative []string
	// Hooks parse a field's text before the default rules; a hook returns ok=false to fall through. The value
	// is a float64 (SI units) for a quantity field and an int for a count field.
	Hooks map[string]func(text string) (value any, ok bool)
}

// Decode fills target (a pointer to a struct) from a YAML mapping, driven by the struct tags: `yaml` names
// the key, `unit` makes a *float64 field a quantity of that dimension (see ParseQuantity), `enum:"a|b"` lists
// a string field's accepted values. Pointer fields stay nil when their key is absent. Every problem found is
// reported: unknown keys (with a suggestion), wrong types, bad quantities, values out of range, missing
// required fields. pos receives the position of every value, keyed by its dotted path (a section's entry
// is the position of its key).
func Decode(name string, root *yaml.Node, target any, opt DecodeOptions, pos map[string]Pos) Diagnostics {
	d := decoder{name: name, opt: opt, pos: pos, required: set(opt.Required), zero: set(opt.AllowZero), neg: set(opt.AllowNegative)}
	if pos == nil {
		d.pos = map[string]Pos{}
	}
	rv := reflect.ValueOf(target)
	if rv.Kind() != reflect.Pointer || rv.IsNil() || rv.Elem().Kind() != reflect.Struct {
		return Diagnostics{{Severity: SeverityError, Code: "INTERNAL", Summary: fmt.Sprintf("schema.Decode needs a pointer to a struct, got %T", target), File: name, Line: 1, Column: 1}}
	}
	d.decodeStruct(root, nil, rv.Elem(), "", "")
	return d.diags
}

type decoder struct {
	name                string
	opt                 DecodeOptions
	pos                 map[string]Pos
	diags               Diagnostics
	required, zero, neg map[string]bool
	aliasHops           int
}

func set(xs []string) map[string]bool {
	m := make(map[string]bool, len(xs))
	for _, x := range xs {
		m[x] = true
	}
	return m
}

func (d *decoder) add(n *yaml.Node, code, path, summary, detail string) {
	diag := Diagnostic{Severity: SeverityError, Code: code, Summary: summary, Detail: detail, File: d.name, Path: path}
	if n != nil {
		diag.Line, diag.Column = n.Line, n.Column
	}
	d.diags = append(d.diags, diag)
}

// resolve follows aliases to their target (the reader has already bounded their expansion).
func resolve(n *yaml.Node) *yaml.Node {
	for i := 0; n != nil && n.Kind == yaml.AliasNode && i < MaxDepth; i++ {
		n = n.Alias
	}
	return n
}

func join(path, key string) string {
	if path == "" {
		return key
	}
	return path + "." + key
}

// fieldKeys returns the yaml keys of a struct type in declaration order.
func fieldKeys(t reflect.Type) []string {
	var keys []string
	for i := 0; i < t.NumField(); i++ {
		if k := yamlKey(t.Field(i)); k != "" {
			keys = append(keys, k)
		}
	}
	return keys
}

func yamlKey(f reflect.StructField) string {
	k, _, _ := strings.Cut(f.Tag.Get("yaml"), ",")
	if k == "-" || !f.IsExported() {
		return ""
	}
	if k == "" {
		return strings.ToLower(f.Name)
	}
	return k
}

func describeKind(n *yaml.Node) string {
	switch n.Kind {
	case yaml.MappingNode:
		return "a mapping (section)"
	case yaml.SequenceNode:
		return "a list"
	case yaml.ScalarNode:
		switch n.Tag {
		case "!!null":
			return "an empty value"
		case "!!bool":
			return "true/false"
		case "!!int", "!!float":
			return "the number " + clip(n.Value)
		}
		return fmt.Sprintf("the text %q", clip(n.Value))
	}
	return "an alias"
}

func clip(s string) string {
	if r := []rune(s); len(r) > 40 {
		return string(r[:40]) + "…"
	}
	return s
}

// decodeStruct fills sv from a mapping node. key is the node of the section's key (nil at the top).
func (d *decoder) decodeStruct(n, key *yaml.Node, sv reflect.Value, path, pattern string) {
	n = resolve(n)
	where := n
	if key != nil {
		where = key
	}
	if n == nil || n.Kind != yaml.MappingNode {
		what := "the file"
		if path != "" {
			what = fmt.Sprintf("%q", path)
		}
		got := "nothing"
		if n != nil {
			got = describeKind(n)
			where = n
		}
		d.add(where, "FIELD-TYPE", path, fmt.Sprintf("%s must be a mapping of keys, got %s", what, got),
			fmt.Sprintf("Write the keys of this section indented under it, one 'key: value' per line; known keys: %s.", strings.Join(fieldKeys(sv.Type()), ", ")))
		return
	}
	t := sv.Type()
	byKey := map[string]int{}
	for i := 0; i < t.NumField(); i++ {
		if k := yamlKey(t.Field(i)); k != "" {
			byKey[k] = i
		}
	}
	present := map[string]bool{}
	suggested := map[string]bool{} // a misspelt key already names the field; do not also call it missing
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := resolve(n.Content[i]), n.Content[i+1]
		if k == nil || k.Kind != yaml.ScalarNode {
			d.add(n.Content[i], "FIELD-TYPE", path, "a key must be plain text", "Write keys as plain words such as 'capacitance'.")
			continue
		}
		if k.Tag == "!!merge" {
			continue // already refused by the reader
		}
		idx, ok := byKey[k.Value]
		if !ok {
			suggested[d.unknownKey(k, t, path)] = true
			continue
		}
		if present[k.Value] {
			continue // duplicate: already refused by the reader
		}
		present[k.Value] = true
		f := t.Field(idx)
		fp, fpat := join(path, k.Value), join(pattern, k.Value)
		d.pos[fp] = Pos{k.Line, k.Column}
		d.decodeField(v, k, sv.Field(idx), f.Tag, fp, fpat)
	}
	for i := 0; i < t.NumField(); i++ {
		k := yamlKey(t.Field(i))
		if k == "" || present[k] || suggested[k] || !d.required[join(pattern, k)] {
			continue
		}
		what := "key"
		if ft := t.Field(i).Type; ft.Kind() == reflect.Struct || (ft.Kind() == reflect.Pointer && ft.Elem().Kind() == reflect.Struct) {
			what = "section"
		}
		in := "the file"
		if path != "" {
			in = fmt.Sprintf("%q", path)
		}
		d.add(where, "FIELD-REQUIRED", join(path, k), fmt.Sprintf("required %s %q is missing from %s", what, k, in),
			fmt.Sprintf("Add '%s:' to %s; run 'chargeward example' for a complete rig.", k, in))
	}
}

// unknownKey reports a key the struct does not have and returns the suggested key ("" if none).
func (d *decoder) unknownKey(k *yaml.Node, t reflect.Type, path string) string {
	keys := fieldKeys(t)
	summary := fmt.Sprintf("unknown key %q", k.Value)
	if path != "" {
		summary += fmt.Sprintf(" in %q", path)
	}
	detail := ""
	if m := Suggest(k.Value, keys); m != "" {
		summary += fmt.Sprintf(" (did you mean %q?)", m)
		detail = fmt.Sprintf("Rename it to %q. ", m)
	}
	detail += lookAlikeHint(k.Value) + "Known keys here: " + strings.Join(keys, ", ") + "."
	d.diags = append(d.diags, Diagnostic{Severity: SeverityError, Code: "FIELD-UNKNOWN", Summary: summary, Detail: detail,
		File: d.name, Line: k.Line, Column: k.Column, Path: join(path, k.Value), Length: len([]rune(k.Value))})
	return Suggest(k.Value, keys)
}

// decodeField fills one field from its value node. tag is the field's struct tag (for a list element or
// a map value, the tag of the list or map field).
func (d *decoder) decodeField(v, key *yaml.Node, fv reflect.Value, tag reflect.StructTag, path, pattern string) {
	v = resolve(v)
	if v == nil {
		return
	}
	if v.Kind == yaml.ScalarNode && v.Tag == "!!null" && key != nil {
		d.add(key, "FIELD-TYPE", path, fmt.Sprintf("%q has no value", path),
			"Give a value, or remove the key when it is not known (a missing value is reported as a finding, never assumed safe).")
		return
	}
	ft := fv.Type()
	base := ft
	if base.Kind() == reflect.Pointer {
		base = base.Elem()
	}
	switch {
	case base.Kind() == reflect.Struct:
		nv := reflect.New(base)
		d.decodeStruct(v, key, nv.Elem(), path, pattern)
		store(fv, nv.Elem())
	case ft.Kind() == reflect.Slice:
		if v.Kind != yaml.SequenceNode {
			d.add(v, "FIELD-TYPE", path, fmt.Sprintf("%q must be a list, got %s", path, describeKind(v)),
				"Write each entry on its own line starting with '- ', or '[]' for none.")
			return
		}
		sl := reflect.MakeSlice(ft, len(v.Content), len(v.Content))
		for i, el := range v.Content {
			ep := fmt.Sprintf("%s[%d]", path, i)
			if r := resolve(el); r != nil {
				d.pos[ep] = Pos{r.Line, r.Column}
			}
			d.decodeField(el, nil, sl.Index(i), tag, ep, pattern+"[]")
		}
		fv.Set(sl)
	case ft.Kind() == reflect.Map && ft.Key().Kind() == reflect.String:
		if v.Kind != yaml.MappingNode {
			d.add(v, "FIELD-TYPE", path, fmt.Sprintf("%q must be a mapping, got %s", path, describeKind(v)), "Write one 'name: value' per line, indented under the key.")
			return
		}
		m := reflect.MakeMapWithSize(ft, len(v.Content)/2)
		for i := 0; i+1 < len(v.Content); i += 2 {
			k := resolve(v.Content[i])
			if k == nil || k.Kind != yaml.ScalarNode || k.Tag == "!!merge" {
				continue
			}
			ep := join(path, k.Value)
			d.pos[ep] = Pos{k.Line, k.Column}
			ev := reflect.New(ft.Elem()).Elem()
			d.decodeField(v.Content[i+1], k, ev, tag, ep, pattern+"[]")
			m.SetMapIndex(reflect.ValueOf(k.Value).Convert(ft.Key()), ev)
		}
		fv.Set(m)
	default:
		d.decodeScalar(v, fv, tag, path, pattern)
	}
	if r := resolve(v); r != nil && r.Kind == yaml.ScalarNode {
		d.pos[path] = Pos{r.Line, r.Column}
	}
}

// store sets fv (a value or a pointer to one) to x.
func store(fv reflect.Value, x reflect.Value) {
	if fv.Kind() == reflect.Pointer {
		p := reflect.New(fv.Type().Elem())
		p.Elem().Set(x.Convert(fv.Type().Elem()))
		fv.Set(p)
		return
	}
	fv.Set(x.Convert(fv.Type()))
}

func (d *decoder) decodeScalar(v *yaml.Node, fv reflect.Value, tag reflect.StructTag, path, pattern string) {
	if v.Kind != yaml.ScalarNode {
		d.add(v, "FIELD-TYPE", path, fmt.Sprintf("%q takes a single value, got %s", path, describeKind(v)), "Write the value on the same line as the key.")
		return
	}
	if v.Tag == "!!null" {
		d.add(v, "FIELD-TYPE", path, fmt.Sprintf("%q has no value", path),
			"Give a value, or remove the key when it is not known (a missing value is reported as a finding, never assumed safe).")
		return
	}
	if hook := d.opt.Hooks[pattern]; hook != nil {
		if val, ok := hook(v.Value); ok {
			store(fv, reflect.ValueOf(val))
			return
		}
	}
	base := fv.Type()
	if base.Kind() == reflect.Pointer {
		base = base.Elem()
	}
	switch base.Kind() {
	case reflect.String:
		d.decodeString(v, fv, tag, path, pattern)
	case reflect.Float64:
		d.decodeQuantity(v, fv, tag.Get("unit"), path, pattern)
	case reflect.Int:
		d.decodeCount(v, fv, path, pattern)
	case reflect.Bool:
		d.decodeBool(v, fv, path)
	default:
		// A program error (a model field of a type the decoder does not know), reported rather than panicking.
		d.add(v, "INTERNAL", path, fmt.Sprintf("%q has Go type %s, which the decoder does not support", path, fv.Type()), "This is a defect in chargeward; please report it.")
	}
}

func (d *decoder) decodeString(v *yaml.Node, fv reflect.Value, tag reflect.StructTag, path, pattern string) {
	s := v.Value
	if v.Tag == "!!bool" {
		d.add(v, "FIELD-TYPE", path, fmt.Sprintf("%q takes text, got %s", path, describeKind(v)), fmt.Sprintf("Quote the value if it is meant as text: \"%s\".", s))
		return
	}
	if enum := tag.Get("enum"); enum != "" {
		opts := strings.Split(enum, "|")
		for _, o := range opts {
			if s == o {
				store(fv, reflect.ValueOf(s))
				return
			}
		}
		summary := fmt.Sprintf("%q is not one of the values %q accepts", clip(s), path)
		if m := Suggest(s, opts); m != "" {
			summary += fmt.Sprintf(" (did you mean %q?)", m)
		}
		d.diags = append(d.diags, Diagnostic{Severity: SeverityError, Code: "FIELD-ENUM", Summary: summary,
			Detail: lookAlikeHint(s) + "Accepted values: " + strings.Join(opts, ", ") + ".", File: d.name, Line: v.Line, Column: v.Column, Path: path})
		return
	}
	if strings.TrimSpace(s) == "" && d.required[pattern] {
		d.add(v, "FIELD-REQUIRED", path, fmt.Sprintf("%q must not be empty", path), "Write the text; a review needs it to identify the rig.")
		return
	}
	store(fv, reflect.ValueOf(s))
}

// lookAlikeHint names the first non-ASCII character of a key or word, which is usually a look-alike typed
// or pasted in by accident ("с", Cyrillic, for "c").
func lookAlikeHint(s string) string {
	for i, r := range []rune(s) {
		if r >= 0x80 {
			h := fmt.Sprintf("Character %d, %q (U+%04X), is not ASCII", i+1, string(r), r)
			if like, ok := lookAlikes[r]; ok {
				h += fmt.Sprintf("; it looks like %q", like)
			}
			return h + ". "
		}
	}
	return ""
}

// quantityColumn places a quantity error: the node column, plus the offset into the text (and the quote).
func quantityColumn(v *yaml.Node, off int) int {
	switch v.Style {
	case yaml.DoubleQuotedStyle, yaml.SingleQuotedStyle:
		return v.Column + 1 + off
	case yaml.LiteralStyle, yaml.FoldedStyle:
		return v.Column
	}
	return v.Column + off
}

func (d *decoder) decodeQuantity(v *yaml.Node, fv reflect.Value, unit, path, pattern string) {
	if v.Tag == "!!bool" {
		d.add(v, "FIELD-TYPE", path, fmt.Sprintf("%q takes %s, got %s", path, UnitName(unit), v.Value),
			fmt.Sprintf("Write %s with its unit, e.g. %q.", UnitName(unit), UnitExample(unit)))
		return
	}
	x, err := ParseQuantity(v.Value, unit)
	if err != nil {
		var qe *QuantityError
		if !errors.As(err, &qe) {
			qe = &QuantityError{Code: "UNIT-SYNTAX", Summary: err.Error()}
		}
		d.diags = append(d.diags, Diagnostic{Severity: SeverityError, Code: qe.Code, Summary: fmt.Sprintf("%s: %s", path, qe.Summary), Detail: qe.Detail,
			File: d.name, Line: v.Line, Column: quantityColumn(v, qe.Offset), Path: path, Length: qe.Length})
		return
	}
	if msg, ok := d.rangeOK(x, pattern); !ok {
		if unit == "K" && x < 0 {
			msg = "is below absolute zero"
		}
		d.add(v, "UNIT-RANGE", path, fmt.Sprintf("%s: %s %s", path, clip(strings.TrimSpace(v.Value)), msg),
			"Check the value and its sign; remove the key if it is not known.")
		return
	}
	store(fv, reflect.ValueOf(x))
}

func (d *decoder) rangeOK(x float64, pattern string) (string, bool) {
	switch {
	case math.IsNaN(x) || math.IsInf(x, 0):
		return "is not finite", false
	case x < 0 && !d.neg[pattern]:
		return "is negative; this value cannot be", false
	case x == 0 && !d.zero[pattern] && !d.neg[pattern]:
		return "is zero; this value must be positive", false
	}
	return "", true
}

func (d *decoder) decodeCount(v *yaml.Node, fv reflect.Value, path, pattern string) {
	n, err := strconv.Atoi(strings.TrimSpace(v.Value))
	if err != nil || v.Tag == "!!bool" {
		d.add(v, "FIELD-TYPE", path, fmt.Sprintf("%q takes a whole number, got %s", path, describeKind(v)), "Write a count such as 2, without a unit or decimal point.")
		return
	}
	if msg, ok := d.rangeOK(float64(n), pattern); !ok {
		d.add(v, "FIELD-RANGE", path, fmt.Sprintf("%s: %d %s", path, n, msg), "Write a count of at least 1; remove the key if it is not known.")
		return
	}
	store(fv, reflect.ValueOf(n))
}

func (d *decoder) decodeBool(v *yaml.Node, fv reflect.Value, path string) {
	if v.Tag == "!!bool" {
		var b bool
		if err := v.Decode(&b); err == nil {
			store(fv, reflect.ValueOf(b))
			return
		}
	}
	detail := "Write true or false."
	switch strings.ToLower(v.Value) {
	case "yes", "y", "on":
		detail = "Write true (YAML 1.2 reads 'yes' and 'on' as text)."
	case "no", "n", "off":
		detail = "Write false (YAML 1.2 reads 'no' and 'off' as text)."
	}
	d.add(v, "FIELD-TYPE", path, fmt.Sprintf("%q takes true or false, got %s", path, describeKind(v)), detail)
}
