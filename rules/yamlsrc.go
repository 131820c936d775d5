package rules

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/santhosh-tekuri/jsonschema/v5"
	"gopkg.in/yaml.v3"
)

// maxFileSize bounds a rulebook or policy file (1 MiB, the same limit as rig files).
const maxFileSize = 1 << 20

// readYAML parses one YAML document into a node tree, rejecting oversize files, extra documents, aliases
// and duplicate keys, each as a positioned diagnostic.
func readYAML(name string, data []byte) (*yaml.Node, Diagnostics) {
	if len(data) > maxFileSize {
		return nil, Diagnostics{{File: name, Code: CodeTooLarge, Summary: fmt.Sprintf("file is %d bytes, over the %d-byte limit", len(data), maxFileSize), Detail: "split the file or remove unused entries"}}
	}
	dec := yaml.NewDecoder(bytes.NewReader(data))
	var doc yaml.Node
	if err := dec.Decode(&doc); err != nil {
		if errors.Is(err, io.EOF) {
			return nil, Diagnostics{{File: name, Line: 1, Column: 1, Code: CodeParse, Summary: "file is empty", Detail: "write the mapping the schema describes"}}
		}
		return nil, Diagnostics{yamlErrorDiag(name, err)}
	}
	var extra yaml.Node
	if err := dec.Decode(&extra); err == nil {
		return nil, Diagnostics{{File: name, Line: extra.Line, Column: extra.Column, Code: CodeParse, Summary: "more than one YAML document", Detail: "keep one document per file; remove the '---' separator"}}
	} else if !errors.Is(err, io.EOF) {
		return nil, Diagnostics{yamlErrorDiag(name, err)}
	}
	if len(doc.Content) != 1 {
		return nil, Diagnostics{{File: name, Line: 1, Column: 1, Code: CodeParse, Summary: "file holds no mapping"}}
	}
	root := doc.Content[0]
	var ds Diagnostics
	walkNodes(root, func(n *yaml.Node) {
		switch n.Kind {
		case yaml.AliasNode:
			ds = append(ds, Diagnostic{File: name, Line: n.Line, Column: n.Column, Code: CodeParse, Summary: "YAML aliases are not accepted here", Detail: "write the value out in full"})
		case yaml.MappingNode:
			seen := map[string]bool{}
			for i := 0; i+1 < len(n.Content); i += 2 {
				k := n.Content[i]
				if seen[k.Value] {
					ds = append(ds, Diagnostic{File: name, Line: k.Line, Column: k.Column, Code: CodeDuplicate, Summary: fmt.Sprintf("key %q given twice", k.Value), Detail: "remove one of them"})
				}
				seen[k.Value] = true
			}
		}
	})
	if len(ds) > 0 {
		return nil, ds
	}
	return root, nil
}

func yamlErrorDiag(name string, err error) Diagnostic {
	msg := err.Error()
	line := 0
	// yaml.v3 reports "yaml: line N: ..."
	if i := strings.Index(msg, "line "); i >= 0 {
		rest := msg[i+5:]
		if j := strings.IndexByte(rest, ':'); j > 0 {
			if n, e := strconv.Atoi(rest[:j]); e == nil {
				line = n
				msg = strings.TrimSpace(rest[j+1:])
			}
		}
	}
	d := Diagnostic{File: name, Line: line, Code: CodeParse, Summary: "not valid YAML: " + strings.TrimPrefix(msg, "yaml: "), Detail: "check indentation and quoting"}
	if line > 0 {
		d.Column = 1
	}
	return d
}

func walkNodes(n *yaml.Node, f func(*yaml.Node)) {
	f(n)
	for _, c := range n.Content {
		walkNodes(c, f)
	}
}

// nodeValue converts a node tree into the plain values encoding/json would produce, for schema validation.
func nodeValue(n *yaml.Node) any {
	switch n.Kind {
	case yaml.MappingNode:
		m := make(map[string]any, len(n.Content)/2)
		for i := 0; i+1 < len(n.Content); i += 2 {
			m[n.Content[i].Value] = nodeValue(n.Content[i+1])
		}
		return m
	case yaml.SequenceNode:
		s := make([]any, len(n.Content))
		for i, c := range n.Content {
			s[i] = nodeValue(c)
		}
		return s
	case yaml.ScalarNode:
		switch n.Tag {
		case "!!int", "!!float":
			var f float64
			if err := n.Decode(&f); err == nil {
				return json.Number(strconv.FormatFloat(f, 'g', -1, 64))
			}
		case "!!bool":
			var b bool
			if err := n.Decode(&b); err == nil {
				return b
			}
		case "!!null":
			return nil
		}
		return n.Value
	}
	return nil
}

// nodeAt follows a JSON pointer ("/rules/3/when") through a node tree; it returns the deepest node reached
// and, for a mapping entry, its key node.
func nodeAt(root *yaml.Node, pointer string) (value, key *yaml.Node) {
	n := root
	if pointer == "" {
		return n, nil
	}
	for _, tok := range strings.Split(strings.TrimPrefix(pointer, "/"), "/") {
		tok = strings.ReplaceAll(strings.ReplaceAll(tok, "~1", "/"), "~0", "~")
		switch n.Kind {
		case yaml.MappingNode:
			found := false
			for i := 0; i+1 < len(n.Content); i += 2 {
				if n.Content[i].Value == tok {
					key, n, found = n.Content[i], n.Content[i+1], true
					break
				}
			}
			if !found {
				return n, key
			}
		case yaml.SequenceNode:
			i, err := strconv.Atoi(tok)
			if err != nil || i < 0 || i >= len(n.Content) {
				return n, key
			}
			n, key = n.Content[i], nil
		default:
			return n, key
		}
	}
	return n, key
}

// compileSchema compiles an embedded JSON Schema.
func compileSchema(url string, text []byte) (*jsonschema.Schema, error) {
	c := jsonschema.NewCompiler()
	c.Draft = jsonschema.Draft2020
	if err := c.AddResource(url, bytes.NewReader(text)); err != nil {
		return nil, err
	}
	return c.Compile(url)
}

// validateNode validates a node tree against a schema and maps each leaf error back to its YAML position.
func validateNode(name string, sch *jsonschema.Schema, root *yaml.Node) Diagnostics {
	err := sch.Validate(nodeValue(root))
	if err == nil {
		return nil
	}
	var ve *jsonschema.ValidationError
	if !errors.As(err, &ve) {
		return Diagnostics{{File: name, Code: CodeSchema, Summary: err.Error()}}
	}
	var ds Diagnostics
	var leaves func(e *jsonschema.ValidationError)
	leaves = func(e *jsonschema.ValidationError) {
		if len(e.Causes) == 0 {
			n, k := nodeAt(root, e.InstanceLocation)
			pos := n
			detail := "see the file's JSON Schema (chargeward rules --schema)"
			msg := e.Message
			if strings.HasPrefix(msg, "additionalProperties") && k == nil {
				// point at the unknown key itself
				if kn := unknownKeyNode(n, msg); kn != nil {
					pos = kn
				}
			}
			if k != nil && strings.HasPrefix(msg, "missing properties") {
				pos = k
			}
			where := e.InstanceLocation
			if where == "" {
				where = "/"
			}
			ds = append(ds, Diagnostic{File: name, Line: pos.Line, Column: pos.Column, Code: CodeSchema, Summary: fmt.Sprintf("at %s: %s", where, msg), Detail: detail})
			return
		}
		for _, c := range e.Causes {
			leaves(c)
		}
	}
	leaves(ve)
	return ds
}

// unknownKeyNode finds the first key named in an "additionalProperties 'x' not allowed" message.
func unknownKeyNode(n *yaml.Node, msg string) *yaml.Node {
	if n.Kind != yaml.MappingNode {
		return nil
	}
	for i := 0; i+1 < len(n.Content); i += 2 {
		if strings.Contains(msg, "'"+n.Content[i].Value+"'") {
			return n.Content[i]
		}
	}
	return nil
}
