package main

import "errors"

// PLACEHOLDER: replaced by the issue that builds the review command.
var reviewCommand = command{name: "review", summary: "(not built yet)", run: func(args []string, e *env) error {
	return errors.New("review: not built yet")
}}
