package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"chargeward/schema"
)

// runCLI runs the program in-process with the given standard input.
func runCLI(t *testing.T, stdin string, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errb bytes.Buffer
	defer func() {
		if r := recover(); r != nil {
			t.Fatalf("got panic %v, want none", r)
		}
	}()
	code = run(args, strings.NewReader(stdin), &out, &errb)
	return code, out.String(), errb.String()
}

// TestCheckBadInputs runs 'check' on every bad input: exit 2, nothing on standard output, and a positioned
// diagnostic with its code on standard error; never a panic or a Go stack trace.
func TestCheckBadInputs(t *testing.T) {
	files, err := filepath.Glob("../../testdata/bad/*.yaml")
	if err != nil || len(files) < 30 {
		t.Fatalf("got %d bad inputs (%v), want at least 30", len(files), err)
	}
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			code, stdout, stderr := runCLI(t, "", "check", f)
			if code != exitBadInput {
				t.Errorf("got exit %d, want %d", code, exitBadInput)
			}
			if stdout != "" {
				t.Errorf("got stdout %q, want nothing", stdout)
			}
			if !strings.HasPrefix(stderr, f+":") || !strings.Contains(stderr, ": error[") {
				t.Errorf("got stderr %q, want it to start with %q and name an error code", stderr, f+":")
			}
			if strings.Contains(stderr, "goroutine ") || strings.Contains(stderr, "panic") {
				t.Errorf("got a stack trace on stderr:\n%s", stderr)
			}
		})
	}
}

func TestCheckDemoRigs(t *testing.T) {
	files, _ := filepath.Glob("../../testdata/rigs/*.yaml")
	if len(files) < 3 {
		t.Fatalf("got %d demo rigs, want at least 3", len(files))
	}
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			code, stdout, stderr := runCLI(t, "", "check", "--fail-on", "never", f)
			if code != exitOK || stderr != "" {
				t.Fatalf("got exit %d, stderr %q; want 0 and nothing", code, stderr)
			}
			if !strings.HasPrefix(stdout, f+": ") || !strings.Contains(stdout, "  bank ") {
				t.Errorf("got stdout %q, want a summary naming the file and the bank", stdout)
			}
		})
	}
}

func TestCheckStdin(t *testing.T) {
	data, err := os.ReadFile("../../testdata/rigs/flash-bank.yaml")
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name, stdin string
		wantCode    int
		wantOut     string // prefix of stdout
		wantErr     string // substring of stderr
	}{
		{"good rig", string(data), exitOK, `-: "Photoflash trainer, kit 7", revision 1.2`, ""},
		{"bad rig", "rig: {name: x}\n", exitBadInput, "", "-:1:1: error[FIELD-REQUIRED]"},
		{"empty", "", exitBadInput, "", "-:1:1: error[YAML-EMPTY]"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, stdout, stderr := runCLI(t, c.stdin, "check", "--fail-on", "never", "-")
			if code != c.wantCode || !strings.HasPrefix(stdout, c.wantOut) || !strings.Contains(stderr, c.wantErr) {
				t.Errorf("got exit %d, stdout %q, stderr %q; want exit %d, stdout starting %q, stderr containing %q", code, stdout, stderr, c.wantCode, c.wantOut, c.wantErr)
			}
		})
	}
}

func TestCheckRendersExcerpt(t *testing.T) {
	src := "rig:\n  name: x\n  revision: \"1\"\nbank:\n  capacitance: 400 V\n  voltage_rating: 450 V\n"
	code, stdout, stderr := runCLI(t, src, "check", "-")
	want := "-:5:20: error[UNIT-DIMENSION]: bank.capacitance: \"400 V\" is a voltage, but this field takes a capacitance\n" +
		" 5 |   capacitance: 400 V\n" +
		"   |                    ^\n" +
		"  = Give a capacitance, e.g. \"2200 uF\". Check that the value is in the right field.\n" +
		"-: 1 problem\n"
	if code != exitBadInput || stdout != "" || stderr != want {
		t.Errorf("got exit %d, stdout %q, stderr\n%s\nwant exit 2, no stdout, stderr\n%s", code, stdout, stderr, want)
	}
}

func TestCheckArguments(t *testing.T) {
	cases := []struct {
		name     string
		args     []string
		wantCode int
	}{
		{"no rig", []string{"check"}, exitBadInput},
		{"missing file", []string{"check", "no-such-rig.yaml"}, exitBadInput},
		{"bad flag", []string{"check", "--no-such-flag", "x.yaml"}, exitBadInput},
		{"one bad of two", []string{"check", "../../testdata/rigs/flash-bank.yaml", "../../testdata/bad/unit-nan.yaml"}, exitBadInput},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if code, _, _ := runCLI(t, "", c.args...); code != c.wantCode {
				t.Errorf("got exit %d, want %d", code, c.wantCode)
			}
		})
	}
}

// TestHelp checks that every command answers --help with its own usage on stdout and exit 0.
func TestHelp(t *testing.T) {
	for _, c := range []string{"check", "schema", "example", "rules"} {
		t.Run(c, func(t *testing.T) {
			code, stdout, _ := runCLI(t, "", c, "--help")
			if code != exitOK || !strings.HasPrefix(stdout, "Usage: chargeward "+c) {
				t.Errorf("got exit %d, stdout %q; want 0 and the usage of %s", code, stdout, c)
			}
		})
	}
}

func TestSchemaCommand(t *testing.T) {
	code, stdout, _ := runCLI(t, "", "schema")
	if code != exitOK {
		t.Fatalf("got exit %d, want 0", code)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatalf("got invalid JSON: %v", err)
	}
	if doc["$schema"] != "https://json-schema.org/draft/2020-12/schema" {
		t.Errorf("got $schema %v, want the draft 2020-12 meta-schema", doc["$schema"])
	}
	// The printed schema, compiled on its own, must accept every demo rig.
	compiled, err := schema.CompileSchema("https://chargeward.example/printed.json", []byte(stdout))
	if err != nil {
		t.Fatalf("got %v compiling the printed schema", err)
	}
	files, _ := filepath.Glob("../../testdata/rigs/*.yaml")
	for _, f := range files {
		data, _ := os.ReadFile(f)
		root, ds := schema.ReadYAML(f, data)
		if len(ds) == 0 {
			ds = schema.ValidateNode(f, root, compiled)
		}
		if len(ds) > 0 {
			t.Errorf("got %v for %s, want the printed schema to accept it", ds, f)
		}
	}
	bad := []byte("rig: {name: x, revision: \"1\", colour: red}\nbank: {capacitance: 1 uF, voltage_rating: 1 V}\n")
	root, _ := schema.ReadYAML("bad.yaml", bad)
	if ds := schema.ValidateNode("bad.yaml", root, compiled); len(ds) != 1 || ds[0].Line != 1 || ds[0].Column != 31 {
		t.Errorf("got %v, want one violation at 1:31 (the unknown key)", ds)
	}
}

func TestExampleCommand(t *testing.T) {
	code, stdout, _ := runCLI(t, "", "example")
	if code != exitOK || stdout != "disc-thrower\nflash-bank\nring-jumper\n" {
		t.Errorf("got exit %d, list %q; want the three demo rigs", code, stdout)
	}
	want, _ := os.ReadFile("../../testdata/rigs/ring-jumper.yaml")
	code, stdout, _ = runCLI(t, "", "example", "ring-jumper")
	if code != exitOK || stdout != string(want) {
		t.Errorf("got exit %d and %d bytes, want 0 and the demo file (%d bytes)", code, len(stdout), len(want))
	}
	code, stdout, stderr := runCLI(t, "", "example", "disc")
	if code != exitBadInput || stdout != "" || !strings.Contains(stderr, `did you mean "disc-thrower"?`) {
		t.Errorf("got exit %d, stdout %q, stderr %q; want 2, nothing, a suggestion", code, stdout, stderr)
	}
}

// TestCheckFlagsAfterRig: options may follow the rig files, as users type them ("check RIG --policy F").
// Before this was supported, "--policy" was read as a second rig file and the site policy as a third.
func TestCheckFlagsAfterRig(t *testing.T) {
	rig := "../../testdata/rigs/ring-jumper.yaml"
	policy := "../../testdata/policy/site-stricter.yaml"
	before, out1, _ := runCLI(t, "", "check", "--policy", policy, "--fail-on", "never", rig)
	after, out2, errOut := runCLI(t, "", "check", rig, "--policy", policy, "--fail-on", "never")
	if before != 0 || after != 0 {
		t.Fatalf("got exit %d (flags first) and %d (flags last; stderr %q), want 0 and 0", before, after, errOut)
	}
	if out1 != out2 {
		t.Errorf("got different output for flags after the rig file, want the same")
	}
	if !strings.Contains(out2, "Site policy overrides") {
		t.Errorf("got no site policy override in the output, want the --policy file applied")
	}
}
