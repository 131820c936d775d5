package main

import "errors"

// PLACEHOLDER: replaced by the issue that builds the schema command.
var schemaCommand = command{name: "schema", summary: "(not built yet)", run: func(args []string, e *env) error {
	return errors.New("schema: not built yet")
}}
