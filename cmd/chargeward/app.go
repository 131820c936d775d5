package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"strings"

	"chargeward/schema"
)

// Exit codes shared by every command.
const (
	exitOK       = 0 // success; for check and verify: nothing reached the threshold / the review matches
	exitFindings = 1 // check: a finding at or above --fail-on; verify: the review does not match
	exitBadInput = 2 // bad input, bad flags, or a state the models cannot handle; nothing written
)

// command is one subcommand. Each lives in its own file (cmd_NAME.go) with its own flag set and usage.
type command struct {
	name    string
	summary string
	run     func(args []string, env *env) error
}

// env carries the standard streams to a command.
type env struct {
	stdin          io.Reader
	stdout, stderr io.Writer
}

// exitError carries an exit code out of a command; its message (if any) has already been printed.
type exitError struct{ code int }

func (e exitError) Error() string { return fmt.Sprintf("exit %d", e.code) }

// commands is the command table; each entry's file owns its flags and usage text.
var commands = []command{
	checkCommand,
	reviewCommand,
	bleederCommand,
	schemaCommand,
	exampleCommand,
	rulesCommand,
	verifyCommand,
}

// run dispatches to a command and maps its error to an exit code. It never panics on input.
func run(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	e := &env{stdin: stdin, stdout: stdout, stderr: stderr}
	if len(args) == 0 || args[0] == "-h" || args[0] == "--help" || args[0] == "help" {
		if len(args) > 1 {
			for _, c := range commands {
				if c.name == args[1] {
					return code(c.run([]string{"--help"}, e), stderr)
				}
			}
		}
		usage(stdout)
		if len(args) == 0 {
			return exitBadInput
		}
		return exitOK
	}
	if args[0] == "version" || args[0] == "--version" {
		fmt.Fprintln(stdout, "chargeward", Version)
		return exitOK
	}
	for _, c := range commands {
		if c.name == args[0] {
			return code(c.run(args[1:], e), stderr)
		}
	}
	fmt.Fprintf(stderr, "chargeward: unknown command %q%s\nRun 'chargeward --help' for the list of commands.\n", args[0], suggestCommand(args[0]))
	return exitBadInput
}

func code(err error, stderr io.Writer) int {
	if err == nil {
		return exitOK
	}
	var ee exitError
	if errors.As(err, &ee) {
		return ee.code
	}
	fmt.Fprintln(stderr, "chargeward:", err)
	return exitBadInput
}

func usage(w io.Writer) {
	fmt.Fprintf(w, "chargeward %s: hazard reviews for charged-capacitor bench rigs\n\nUsage: chargeward COMMAND [options] [arguments]\n\nCommands:\n", Version)
	names := make([]string, 0, len(commands))
	for _, c := range commands {
		names = append(names, fmt.Sprintf("  %-9s %s", c.name, c.summary))
	}
	fmt.Fprintln(w, strings.Join(names, "\n"))
	fmt.Fprintln(w, "\nRun 'chargeward COMMAND --help' for a command's options.")
	fmt.Fprintln(w, "This tool is an engineering aid. It does not replace local codes, your institution's electrical")
	fmt.Fprintln(w, "safety program, or the judgement of qualified, licensed persons.")
}

func suggestCommand(s string) string {
	names := make([]string, len(commands))
	for i, c := range commands {
		names[i] = c.name
	}
	if best := schema.Suggest(s, names); best != "" {
		return fmt.Sprintf(" (did you mean %q?)", best)
	}
	return ""
}

// newFlags returns a command's flag set. Parse errors go to stderr; --help prints usage (the command's
// text, then its flags) to stdout.
func newFlags(name, usageText string, e *env) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(e.stderr)
	fs.Usage = func() {
		out := fs.Output()
		fmt.Fprint(out, usageText)
		n := 0
		fs.VisitAll(func(*flag.Flag) { n++ })
		if n > 0 {
			fmt.Fprintln(out, "\nOptions:")
			fs.PrintDefaults()
		}
	}
	return fs
}

// parseFlags parses args. done is true when the command must stop: after --help (err nil, exit 0) or on a
// bad flag (err is an exit-2 exitError; the message has been printed).
func parseFlags(fs *flag.FlagSet, args []string, e *env) (done bool, err error) {
	for _, a := range args {
		if a == "--" {
			break
		}
		if a == "-h" || a == "-help" || a == "--help" {
			fs.SetOutput(e.stdout)
			fs.Usage()
			return true, nil
		}
	}
	if err := fs.Parse(args); err != nil {
		return true, exitError{exitBadInput}
	}
	return false, nil
}

// parseInterspersed parses flags that may come before, between or after the positional arguments
// ("review RIG -o FILE.pdf"); after "--" everything is positional.
func parseInterspersed(fs *flag.FlagSet, args []string, e *env) (pos []string, done bool, err error) {
	rest := args
	for {
		if done, err := parseFlags(fs, rest, e); done {
			return nil, true, err
		}
		consumed := len(rest) - fs.NArg()
		if consumed > 0 && rest[consumed-1] == "--" {
			return append(pos, fs.Args()...), false, nil
		}
		if fs.NArg() == 0 {
			return pos, false, nil
		}
		pos = append(pos, fs.Arg(0))
		rest = fs.Args()[1:]
	}
}

// readInput reads a named input file, or standard input for "-", refusing more than schema.MaxFileSize
// bytes before reading them all.
func readInput(name string, e *env) ([]byte, error) {
	var r io.Reader
	if name == "-" {
		r = e.stdin
	} else {
		f, err := os.Open(name)
		if err != nil {
			return nil, err
		}
		defer f.Close()
		r = f
	}
	data, err := io.ReadAll(io.LimitReader(r, schema.MaxFileSize+1))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	return data, nil
}

// loadRig reads and loads one rig. On bad input it prints every diagnostic, with source excerpts, to
// stderr and returns an exit-2 error.
func loadRig(name string, e *env) (*schema.Rig, error) {
	data, err := readInput(name, e)
	if err != nil {
		fmt.Fprintln(e.stderr, "chargeward:", err)
		return nil, exitError{exitBadInput}
	}
	rig, err := schema.LoadRig(name, data)
	if err != nil {
		var ds schema.Diagnostics
		if errors.As(err, &ds) {
			ds.Render(e.stderr, map[string][]byte{name: data})
			fmt.Fprintf(e.stderr, "%s: %s\n", name, plural(len(ds), "problem"))
		} else {
			fmt.Fprintln(e.stderr, "chargeward:", err)
		}
		return nil, exitError{exitBadInput}
	}
	return rig, nil
}

func plural(n int, word string) string {
	if n == 1 {
		return "1 " + word
	}
	return fmt.Sprintf("%d %ss", n, word)
}
