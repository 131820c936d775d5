package rules

import (
	"strconv"
	"strings"
	"sync"

	"github.com/santhosh-tekuri/jsonschema/v5"
	"gopkg.in/yaml.v3"

	"chargeward/schema"
)

// readFile reads one rulebook or policy file with the project's hardened YAML reader and validates it
// against its schema.
func readFile(name string, data []byte, id string, schemaJSON []byte) (*yaml.Node, Diagnostics) {
	root, ds := schema.ReadYAML(name, data)
	if ds.HasErrors() || root == nil {
		return nil, ds
	}
	sch, err := compiled(id, schemaJSON)
	if err != nil {
		return nil, Diagnostics{errAt(name, 0, 0, "SCHEMA-VIOLATION", "embedded schema does not compile: "+err.Error(), "this is a program error")}
	}
	if ds := schema.ValidateNode(name, root, sch); len(ds) > 0 {
		return nil, ds
	}
	return root, nil
}

var (
	schemaMu    sync.Mutex
	schemaCache = map[string]*jsonschema.Schema{}
)

// compiled returns an embedded schema, compiled once.
func compiled(id string, data []byte) (*jsonschema.Schema, error) {
	schemaMu.Lock()
	defer schemaMu.Unlock()
	if s, ok := schemaCache[id]; ok {
		return s, nil
	}
	s, err := schema.CompileSchema(id, data)
	if err != nil {
		return nil, err
	}
	schemaCache[id] = s
	return s, nil
}

// nodeAt follows a JSON pointer ("/rules/3/when") through a node tree; it returns the deepest node reached
// and, for a mapping entry, its key node.
func nodeAt(root *yaml.Node, pointer string) (value, key *yaml.Node) {
	n := root
	if pointer == "" {
		return n, nil
	}
	for _, tok := range strings.Split(strings.TrimPrefix(pointer, "/"), "/") {
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
