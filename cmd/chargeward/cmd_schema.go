package main

import (
	"fmt"

	"chargeward/schema"
)

var schemaCommand = command{name: "schema", summary: "print the JSON Schema of a rig description", run: runSchema}

const schemaUsage = `Usage: chargeward schema

Prints the JSON Schema (draft 2020-12) of a rig description, with every field's description and unit, for
editors that complete and check YAML against a JSON Schema.
`

func runSchema(args []string, e *env) error {
	fs := newFlags("schema", schemaUsage, e)
	if done, err := parseFlags(fs, args, e); done {
		return err
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(e.stderr, "chargeward schema: takes no arguments, got %q\n", fs.Arg(0))
		return exitError{exitBadInput}
	}
	_, err := e.stdout.Write(schema.RigSchemaJSON)
	return err
}
