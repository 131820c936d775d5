package main

import "errors"

// PLACEHOLDER: replaced by the issue that builds the check command.
var checkCommand = command{name: "check", summary: "(not built yet)", run: func(args []string, e *env) error {
	return errors.New("check: not built yet")
}}
