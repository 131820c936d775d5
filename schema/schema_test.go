package schema

import (
	"bytes"
	"encoding/json"
	"flag"
	"io/fs"
	"os"
	"reflect"
	"strings"
	"testing"

	"chargeward"

	"github.com/santhosh-tekuri/jsonschema/v5"
)

var update = flag.Bool("update", false, "rewrite schema/rig.schema.json from the struct tags")

// TestSchemaFileInSync keeps the embedded rig.schema.json identical to the schema generated from the Rig
// struct tags and the field descriptions. Run 'go test ./schema -run TestSchemaFileInSync -update' after
// changing the rig model.
func TestSchemaFileInSync(t *testing.T) {
	got, err := GenerateRigSchema()
	if err != nil {
		t.Fatalf("GenerateRigSchema: %v", err)
	}
	if *update {
		if err := os.WriteFile("rig.schema.json", got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	if !bytes.Equal(got, RigSchemaJSON) {
		t.Errorf("got embedded rig.schema.json out of date, want the generated schema; run go test ./schema -run TestSchemaFileInSync -update")
	}
}

// rigField is one leaf field of the Rig model, found by walking the struct tags.
type rigField struct {
	pattern, unit, enum string
	kind                reflect.Kind
}

// rigFields walks the Rig type and returns every field (sections included) by dotted pattern.
func rigFields() []rigField {
	var out []rigField
	var walk func(t reflect.Type, prefix string)
	walk = func(t reflect.Type, prefix string) {
		for i := 0; i < t.NumField(); i++ {
			f := t.Field(i)
			k := yamlKey(f)
			if k == "" {
				continue
			}
			p := join(prefix, k)
			ft := f.Type
			if ft.Kind() == reflect.Pointer {
				ft = ft.Elem()
			}
			out = append(out, rigField{pattern: p, unit: f.Tag.Get("unit"), enum: f.Tag.Get("enum"), kind: ft.Kind()})
			switch ft.Kind() {
			case reflect.Struct:
				walk(ft, p)
			case reflect.Slice:
				walk(ft.Elem(), p+"[]")
			}
		}
	}
	walk(reflect.TypeOf(Rig{}), "")
	return out
}

// TestSchemaIsValidJSONSchema validates the embedded schema against the draft 2020-12 meta-schema.
func TestSchemaIsValidJSONSchema(t *testing.T) {
	meta, err := jsonschema.Compile("https://json-schema.org/draft/2020-12/schema")
	if err != nil {
		t.Fatalf("compiling the meta-schema: %v", err)
	}
	var doc any
	if err := json.Unmarshal(RigSchemaJSON, &doc); err != nil {
		t.Fatalf("got invalid JSON: %v", err)
	}
	if err := meta.Validate(doc); err != nil {
		t.Errorf("got %v, want the schema valid under its meta-schema", err)
	}
	if s, err := RigSchema(); s == nil || err != nil {
		t.Errorf("got compiled schema %v, error %v; want it compiled", s, err)
	}
}

// TestSchemaValidatesDemoRigs runs the JSON Schema alone (not the loader) over every demo rig.
func TestSchemaValidatesDemoRigs(t *testing.T) {
	names, _ := fs.Glob(chargeward.Demos, "testdata/rigs/*.yaml")
	for _, name := range names {
		t.Run(name, func(t *testing.T) {
			data, _ := fs.ReadFile(chargeward.Demos, name)
			root, ds := ReadYAML(name, data)
			if len(ds) > 0 {
				t.Fatalf("got %v", ds)
			}
			compiled, err := RigSchema()
			if err != nil {
				t.Fatal(err)
			}
			if ds := ValidateNode(name, root, compiled); len(ds) > 0 {
				t.Errorf("got schema violations %v, want none", ds)
			}
		})
	}
}

// TestSchemaMatchesStructTags walks the embedded JSON document (not the generator) and compares every
// property with the Rig struct tags: the same paths, the x-unit of each quantity equal to its unit tag, the
// enum of each enumeration equal to its enum tag, and a description everywhere.
func TestSchemaMatchesStructTags(t *testing.T) {
	var doc map[string]any
	if err := json.Unmarshal(RigSchemaJSON, &doc); err != nil {
		t.Fatal(err)
	}
	got := map[string]map[string]any{}
	var walk func(obj map[string]any, prefix string)
	walk = func(obj map[string]any, prefix string) {
		props, _ := obj["properties"].(map[string]any)
		for k, v := range props {
			p := join(prefix, k)
			s := v.(map[string]any)
			got[p] = s
			if s["type"] == "object" {
				walk(s, p)
			}
			if items, ok := s["items"].(map[string]any); ok {
				walk(items, p+"[]")
			}
		}
	}
	walk(doc, "")
	fields := rigFields()
	if len(got) != len(fields) {
		t.Errorf("got %d schema properties, want %d struct fields", len(got), len(fields))
	}
	for _, f := range fields {
		s, ok := got[f.pattern]
		if !ok {
			t.Errorf("got no schema property for field %s", f.pattern)
			continue
		}
		if d, _ := s["description"].(string); d == "" {
			t.Errorf("got no description for %s", f.pattern)
		}
		if f.unit != "" && s["x-unit"] != f.unit {
			t.Errorf("got x-unit %v for %s, want %q", s["x-unit"], f.pattern, f.unit)
		}
		if f.unit != "" && !strings.Contains(s["description"].(string), "Unit: "+f.unit) {
			t.Errorf("got description %q for %s, want it to state the unit %s", s["description"], f.pattern, f.unit)
		}
		if f.enum != "" {
			var enum []string
			for _, e := range s["enum"].([]any) {
				enum = append(enum, e.(string))
			}
			if strings.Join(enum, "|") != f.enum {
				t.Errorf("got enum %v for %s, want %s", enum, f.pattern, f.enum)
			}
		}
	}
	for p := range fieldDocs {
		found := p == ""
		for _, f := range fields {
			found = found || f.pattern == p || f.pattern+"[]" == p
		}
		if !found {
			t.Errorf("got a description for %q, which is no field", p)
		}
	}
}

// TestValidateNodePositions checks that schema violations are placed on the offending YAML value or key.
func TestValidateNodePositions(t *testing.T) {
	const s = `{"$schema": "https://json-schema.org/draft/2020-12/schema", "type": "object", "additionalProperties": false,
		"required": ["id"], "properties": {"id": {"type": "string"}, "limit": {"type": "number", "maximum": 10},
		"list": {"type": "array", "items": {"type": "integer"}}}}`
	compiled, err := CompileSchema("https://chargeward.example/test.json", []byte(s))
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name, src string
		line, col int
		path      string
	}{
		{"too large", "id: a\nlimit: 12\n", 2, 8, "limit"},
		{"wrong type in a list", "id: a\nlist: [1, 2, x]\n", 2, 14, "list[2]"},
		{"unexpected key", "id: a\n  \nextra: 1\n", 3, 1, "extra"},
		{"missing required", "limit: 1\n", 1, 1, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			root, ds := ReadYAML("t.yaml", []byte(c.src))
			if len(ds) > 0 {
				t.Fatal(ds)
			}
			ds = ValidateNode("t.yaml", root, compiled)
			if len(ds) != 1 {
				t.Fatalf("got %d diagnostics %v, want 1", len(ds), ds)
			}
			if d := ds[0]; d.Line != c.line || d.Column != c.col || d.Path != c.path || d.Code != "SCHEMA-VIOLATION" {
				t.Errorf("got %s at %d:%d path %q, want SCHEMA-VIOLATION at %d:%d path %q", d.Code, d.Line, d.Column, d.Path, c.line, c.col, c.path)
			}
		})
	}
}
