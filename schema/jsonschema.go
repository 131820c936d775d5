package schema

import (
	"bytes"
	_ "embed"
	"encoding/json"
	"fmt"
	"math"
	"reflect"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"sync"

	"github.com/santhosh-tekuri/jsonschema/v5"
	"gopkg.in/yaml.v3"
)

// RigSchemaJSON is the JSON Schema (draft 2020-12) of a rig description, as printed by 'chargeward schema'.
// It is generated from the Rig struct tags and the field descriptions (GenerateRigSchema); a test keeps
// this embedded copy identical to the generated one.
//
//go:embed rig.schema.json
var RigSchemaJSON []byte

// RigSchemaID is the schema's $id.
const RigSchemaID = "https://chargeward.example/schema/rig.schema.json"

var (
	rigSchemaOnce sync.Once
	rigSchema     *jsonschema.Schema
	rigSchemaErr  error
)

// RigSchema returns the compiled rig schema, compiled once. The embedded schema is tested to compile, so an
// error here is a build defect.
func RigSchema() (*jsonschema.Schema, error) {
	rigSchemaOnce.Do(func() {
		rigSchema, rigSchemaErr = CompileSchema(RigSchemaID, RigSchemaJSON)
	})
	return rigSchema, rigSchemaErr
}

// CompileSchema compiles a draft 2020-12 JSON Schema held in memory (the policy and rulebook loaders use it
// for their own embedded schemas). The schema is itself validated against the draft's meta-schema.
func CompileSchema(id string, data []byte) (*jsonschema.Schema, error) {
	c := jsonschema.NewCompiler()
	c.Draft = jsonschema.Draft2020
	if err := c.AddResource(id, bytes.NewReader(data)); err != nil {
		return nil, err
	}
	return c.Compile(id)
}

// ValidateNode validates a YAML node tree against a compiled JSON Schema and maps every violation back to the
// line and column of the offending value (for an unexpected key, the key itself). YAML scalars are seen by
// the schema as JSON values by their resolved tag: numbers, booleans, null, and strings for everything else.
func ValidateNode(name string, node *yaml.Node, compiled *jsonschema.Schema) Diagnostics {
	if node == nil || compiled == nil {
		return nil
	}
	nodes := map[string]*yaml.Node{}
	v := toJSON(node, "", nodes, 0)
	err := compiled.Validate(v)
	if err == nil {
		return nil
	}
	ve, ok := err.(*jsonschema.ValidationError)
	if !ok {
		return Diagnostics{{Severity: SeverityError, Code: "SCHEMA-VIOLATION", Summary: err.Error(), File: name, Line: node.Line, Column: node.Column}}
	}
	var ds Diagnostics
	seen := map[string]bool{}
	var walk func(e *jsonschema.ValidationError)
	walk = func(e *jsonschema.ValidationError) {
		if len(e.Causes) > 0 {
			for _, c := range e.Causes {
				walk(c)
			}
			return
		}
		key := e.InstanceLocation + "\x00" + e.Message
		if seen[key] {
			return
		}
		seen[key] = true
		at := nodes[e.InstanceLocation]
		if at == nil {
			at = node
		}
		path := pointerToPath(e.InstanceLocation)
		if names := additionalRE.FindStringSubmatch(e.Message); names != nil {
			for _, q := range quotedRE.FindAllStringSubmatch(names[1], -1) {
				k := at
				if kn := nodes[e.InstanceLocation+"/"+escapePointer(q[1])+"#key"]; kn != nil {
					k = kn
				}
				ds = append(ds, Diagnostic{Severity: SeverityError, Code: "SCHEMA-VIOLATION", Summary: fmt.Sprintf("key %q is not allowed here by the schema", q[1]),
					Detail: "Remove the key or correct its spelling; 'chargeward schema' prints every allowed key.", File: name, Line: k.Line, Column: k.Column, Path: join(path, q[1])})
			}
			return
		}
		where := path
		if where == "" {
			where = "file"
		}
		ds = append(ds, Diagnostic{Severity: SeverityError, Code: "SCHEMA-VIOLATION", Summary: fmt.Sprintf("%s: %s", where, e.Message),
			Detail: "'chargeward schema' prints the schema with every field's type and unit.", File: name, Line: at.Line, Column: at.Column, Path: path})
	}
	walk(ve)
	return ds
}

var (
	additionalRE = regexp.MustCompile(`additionalProperties (.*) not allowed`)
	quotedRE     = regexp.MustCompile(`'([^']*)'`)
)

// toJSON converts a node tree into the values encoding/json would produce, recording each value's node by
// its JSON pointer (and each key's node under pointer+"#key").
func toJSON(n *yaml.Node, ptr string, nodes map[string]*yaml.Node, depth int) any {
	n = resolve(n)
	if n == nil || depth > 4*MaxDepth {
		return nil
	}
	nodes[ptr] = n
	switch n.Kind {
	case yaml.MappingNode:
		m := map[string]any{}
		for i := 0; i+1 < len(n.Content); i += 2 {
			k := resolve(n.Content[i])
			if k == nil {
				continue
			}
			p := ptr + "/" + escapePointer(k.Value)
			nodes[p+"#key"] = k
			m[k.Value] = toJSON(n.Content[i+1], p, nodes, depth+1)
		}
		return m
	case yaml.SequenceNode:
		a := make([]any, len(n.Content))
		for i, c := range n.Content {
			a[i] = toJSON(c, ptr+"/"+strconv.Itoa(i), nodes, depth+1)
		}
		return a
	case yaml.ScalarNode:
		switch n.Tag {
		case "!!null":
			return nil
		case "!!bool":
			var b bool
			if n.Decode(&b) == nil {
				return b
			}
		case "!!int", "!!float":
			var f float64
			if n.Decode(&f) == nil && !math.IsNaN(f) && !math.IsInf(f, 0) {
				return f
			}
		}
		return n.Value
	}
	return nil
}

var (
	pointerEscaper   = strings.NewReplacer("~", "~0", "/", "~1")
	pointerUnescaper = strings.NewReplacer("~1", "/", "~0", "~")
)

func escapePointer(s string) string { return pointerEscaper.Replace(s) }

// pointerToPath turns "/supply/transformers/0/count" into "supply.transformers[0].count".
func pointerToPath(p string) string {
	if p == "" {
		return ""
	}
	var b strings.Builder
	for _, tok := range strings.Split(strings.TrimPrefix(p, "/"), "/") {
		tok = pointerUnescaper.Replace(tok)
		if _, err := strconv.Atoi(tok); err == nil && b.Len() > 0 {
			fmt.Fprintf(&b, "[%s]", tok)
			continue
		}
		if b.Len() > 0 {
			b.WriteByte('.')
		}
		b.WriteString(tok)
	}
	return b.String()
}

// GenerateRigSchema builds the rig's JSON Schema from the Rig struct tags, the decode options (required
// fields, where zero is allowed) and the field descriptions. Every field must have a description; a missing
// one is an error (so a new field cannot ship undocumented).
func GenerateRigSchema() ([]byte, error) {
	g := schemaGen{opt: RigDecodeOptions(), req: set(rigRequired), zero: set(rigAllowZero), neg: set(RigDecodeOptions().AllowNegative)}
	root := g.object(reflect.TypeOf(Rig{}), "")
	if len(g.missing) > 0 {
		sort.Strings(g.missing)
		return nil, fmt.Errorf("fields without a description: %s", strings.Join(g.missing, ", "))
	}
	root["$schema"] = "https://json-schema.org/draft/2020-12/schema"
	root["$id"] = RigSchemaID
	root["title"] = "chargeward rig description"
	root["description"] = fieldDocs[""]
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	if err := enc.Encode(root); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

type schemaGen struct {
	opt            DecodeOptions
	req, zero, neg map[string]bool
	missing        []string
}

func (g *schemaGen) doc(pattern string) string {
	d, ok := fieldDocs[pattern]
	if !ok {
		g.missing = append(g.missing, pattern)
	}
	return d
}

func (g *schemaGen) object(t reflect.Type, pattern string) map[string]any {
	props := map[string]any{}
	var required []string
	for i := 0; i < t.NumField(); i++ {
		f := t.Field(i)
		k := yamlKey(f)
		if k == "" {
			continue
		}
		p := join(pattern, k)
		props[k] = g.field(f, p)
		if g.req[p] {
			required = append(required, k)
		}
	}
	o := map[string]any{"type": "object", "additionalProperties": false, "properties": props}
	if pattern != "" {
		o["description"] = g.doc(pattern)
	}
	if len(required) > 0 {
		o["required"] = required
	}
	return o
}

func (g *schemaGen) field(f reflect.StructField, p string) map[string]any {
	ft := f.Type
	if ft.Kind() == reflect.Pointer {
		ft = ft.Elem()
	}
	switch {
	case ft.Kind() == reflect.Struct:
		return g.object(ft, p)
	case ft.Kind() == reflect.Slice:
		return map[string]any{"type": "array", "description": g.doc(p), "items": g.object(ft.Elem(), p+"[]")}
	case ft.Kind() == reflect.Float64:
		unit := f.Tag.Get("unit")
		s := map[string]any{"type": []string{"number", "string"}, "x-unit": unit,
			"description": fmt.Sprintf("%s Unit: %s (%s); a plain number is in SI units, or write a string with a unit such as %q.", g.doc(p), unitLabel(unit), strings.TrimPrefix(strings.TrimPrefix(UnitName(unit), "an "), "a "), UnitExample(unit))}
		switch {
		case g.neg[p]:
		case g.zero[p]:
			s["minimum"] = 0
		default:
			s["exclusiveMinimum"] = 0
		}
		return s
	case ft.Kind() == reflect.Int:
		if g.opt.Hooks[p] != nil {
			return map[string]any{"type": []string{"integer", "string"}, "description": g.doc(p)}
		}
		s := map[string]any{"type": "integer", "description": g.doc(p), "minimum": 1}
		if g.zero[p] {
			s["minimum"] = 0
		}
		return s
	case ft.Kind() == reflect.Bool:
		return map[string]any{"type": "boolean", "description": g.doc(p)}
	case ft.Kind() == reflect.String:
		if enum := f.Tag.Get("enum"); enum != "" {
			return map[string]any{"type": "string", "enum": strings.Split(enum, "|"), "description": g.doc(p)}
		}
		s := map[string]any{"type": []string{"string", "number"}, "description": g.doc(p)}
		if g.req[p] {
			s["minLength"] = 1
		}
		return s
	}
	g.missing = append(g.missing, p+" (unsupported Go type "+f.Type.String()+")")
	return map[string]any{}
}

func unitLabel(unit string) string {
	if unit == "1" {
		return "1 (a fraction; \"%\" accepted)"
	}
	return unit
}
