package main

import "errors"

// PLACEHOLDER: replaced by the issue that builds the bleeder command.
var bleederCommand = command{name: "bleeder", summary: "(not built yet)", run: func(args []string, e *env) error {
	return errors.New("bleeder: not built yet")
}}
