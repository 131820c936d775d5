package main

import "errors"

// PLACEHOLDER: replaced by the issue that builds the verify command.
var verifyCommand = command{name: "verify", summary: "(not built yet)", run: func(args []string, e *env) error {
	return errors.New("verify: not built yet")
}}
