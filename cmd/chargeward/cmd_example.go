package main

import (
	"chargeward/schema"

	"fmt"
	"io/fs"
	"path"
	"strings"

	"chargeward"
)

var exampleCommand = command{name: "example", summary: "print a demo rig description (no NAME: list them)", run: runExample}

const exampleUsage = `Usage: chargeward example [NAME]

Prints the demo rig NAME as YAML, to start a description from. Without NAME, lists the demo rigs. The demo
rigs are an invented scenario; replace every value with your rig's own.
`

func runExample(args []string, e *env) error {
	flags := newFlags("example", exampleUsage, e)
	if done, err := parseFlags(flags, args, e); done {
		return err
	}
	names, err := demoNames()
	if err != nil {
		return err
	}
	switch flags.NArg() {
	case 0:
		for _, n := range names {
			fmt.Fprintln(e.stdout, n)
		}
		return nil
	case 1:
	default:
		fmt.Fprintln(e.stderr, "chargeward example: takes at most one NAME")
		return exitError{exitBadInput}
	}
	name := strings.TrimSuffix(flags.Arg(0), ".yaml")
	for _, n := range names {
		if n == name {
			data, err := fs.ReadFile(chargeward.Demos, "testdata/rigs/"+n+".yaml")
			if err != nil {
				return err
			}
			_, err = e.stdout.Write(data)
			return err
		}
	}
	hint := ""
	if m := suggestName(name, names); m != "" {
		hint = fmt.Sprintf(" (did you mean %q?)", m)
	}
	fmt.Fprintf(e.stderr, "chargeward example: no demo rig %q%s; demo rigs: %s\n", name, hint, strings.Join(names, ", "))
	return exitError{exitBadInput}
}

// demoNames lists the demo rigs by name (file name without .yaml), sorted.
func demoNames() ([]string, error) {
	files, err := fs.Glob(chargeward.Demos, "testdata/rigs/*.yaml")
	if err != nil {
		return nil, err
	}
	names := make([]string, len(files))
	for i, f := range files {
		names[i] = strings.TrimSuffix(path.Base(f), ".yaml")
	}
	return names, nil
}

func suggestName(s string, names []string) string {
	for _, n := range names {
		if strings.HasPrefix(n, s) && s != "" {
			return n
		}
	}
	return schema.Suggest(s, names)
}
