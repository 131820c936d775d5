package main

import "errors"

// PLACEHOLDER: replaced by the issue that builds the rules command.
var rulesCommand = command{name: "rules", summary: "(not built yet)", run: func(args []string, e *env) error {
	return errors.New("rules: not built yet")
}}
