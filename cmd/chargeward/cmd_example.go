package main

import "errors"

// PLACEHOLDER: replaced by the issue that builds the example command.
var exampleCommand = command{name: "example", summary: "(not built yet)", run: func(args []string, e *env) error {
	return errors.New("example: not built yet")
}}
