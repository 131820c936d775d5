package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"chargeward/rules"
)

// hostileCases lists every file under testdata/hostile with the diagnostic it must give: code, line and
// column (1-based, columns in characters as an editor shows them). rig-* files are rigs; policy-* and
// rules-* are site files applied to the demo disc thrower. Each position was read off the file: it is on
// the bad value, or for a state the models cannot handle, on the field the message names or else on the
// section of the failing stage. These complement testdata/bad (the loader's corpus) with physics-level
// and site-file cases.
var hostileCases = []struct {
	file      string
	code      string
	line, col int
}{
	{"policy-alias-bomb.yaml", "YAML-ALIAS", 1, 1},
	{"policy-deep-nesting.yaml", "YAML-DEPTH", 3, 47},
	{"policy-empty-basis.yaml", "SCHEMA-VIOLATION", 3, 44},
	{"policy-key-typo.yaml", "POLICY-KEY", 3, 3},
	{"policy-lookalike-unit.yaml", "POLICY-UNIT", 3, 26},
	{"policy-nan-threshold.yaml", "RULE-SCHEMA", 3, 26},
	{"policy-negative-threshold.yaml", "POLICY-RANGE", 3, 25},
	{"policy-no-basis.yaml", "SCHEMA-VIOLATION", 3, 17},
	{"policy-null-value.yaml", "SCHEMA-VIOLATION", 3, 25},
	{"policy-thresholds-list.yaml", "SCHEMA-VIOLATION", 3, 3},
	{"policy-unit-mismatch.yaml", "POLICY-UNIT", 3, 38},
	{"policy-unknown-top.yaml", "SCHEMA-VIOLATION", 3, 1},
	{"policy-wrong-dimension.yaml", "POLICY-UNIT", 3, 34},
	{"policy-zero-safe-voltage.yaml", "POLICY-RANGE", 3, 34},
	{"rig-bleeder-count-1e9.yaml", "FIELD-RANGE", 21, 10},
	{"rig-bleeder-elements-huge.yaml", "FIELD-RANGE", 22, 23},
	{"rig-cap-1e308.yaml", "PHYSICS-MODEL", 13, 1},
	{"rig-cap-tiny.yaml", "PHYSICS-MODEL", 33, 1},
	{"rig-cap-tol-100.yaml", "PHYSICS-MODEL", 7, 26},
	{"rig-cap-tol-negative.yaml", "UNIT-RANGE", 7, 26},
	{"rig-ceiling-tiny.yaml", "RIG-CONFLICT", 40, 19},
	{"rig-charging-r-zero.yaml", "UNIT-RANGE", 17, 22},
	{"rig-coil-id-eq-od.yaml", "RIG-CONFLICT", 30, 19},
	{"rig-coil-id-gt-od.yaml", "RIG-CONFLICT", 30, 19},
	{"rig-dc-1e300.yaml", "PHYSICS-MODEL", 5, 1},
	{"rig-disc-5m-over-small-coil.yaml", "PHYSICS-MODEL", 36, 19},
	{"rig-disc-bigger-than-room.yaml", "RIG-CONFLICT", 40, 19},
	{"rig-disc-tiny.yaml", "PHYSICS-MODEL", 33, 1},
	{"rig-disc-with-inner.yaml", "RIG-CONFLICT", 37, 19},
	{"rig-esr-huge.yaml", "PHYSICS-MODEL", 23, 1},
	{"rig-esr-negative.yaml", "UNIT-RANGE", 10, 8},
	{"rig-filaments-5000.yaml", "PHYSICS-MODEL", 39, 14},
	{"rig-forward-drop-over-charge.yaml", "PHYSICS-MODEL", 23, 1},
	{"rig-gap-above-ceiling.yaml", "RIG-CONFLICT", 40, 19},
	{"rig-gap-negative.yaml", "UNIT-RANGE", 38, 8},
	{"rig-lookalike-cyrillic-a.yaml", "UNIT-LOOKALIKE", 16, 22},
	{"rig-lookalike-fullwidth-digit.yaml", "UNIT-LOOKALIKE", 6, 16},
	{"rig-lookalike-greek-omicron.yaml", "UNIT-LOOKALIKE", 10, 12},
	{"rig-lookalike-kelvin-sign.yaml", "UNIT-LOOKALIKE", 20, 18},
	{"rig-lookalike-rtl-override.yaml", "UNIT-LOOKALIKE", 15, 19},
	{"rig-lookalike-zero-width.yaml", "UNIT-LOOKALIKE", 15, 16},
	{"rig-nel-in-name.yaml", "YAML-ENCODING", 3, 16},
	{"rig-line-separator.yaml", "YAML-ENCODING", 3, 20},
	{"rig-number-10000-digits.yaml", "UNIT-NONFINITE", 6, 16},
	{"rig-number-hex.yaml", "UNIT-UNKNOWN", 6, 17},
	{"rig-number-inf-word.yaml", "UNIT-NONFINITE", 6, 16},
	{"rig-parallel-1e9.yaml", "FIELD-RANGE", 12, 13},
	{"rig-ring-id-eq-od.yaml", "RIG-CONFLICT", 37, 19},
	{"rig-series-1e9.yaml", "FIELD-RANGE", 11, 11},
	{"rig-solenoid-layers-1e6.yaml", "FIELD-RANGE", 29, 11},
	{"rig-solenoid-tiny-length.yaml", "PHYSICS-MODEL", 28, 10},
	{"rig-solenoid-wire-dont-fit.yaml", "PHYSICS-MODEL", 28, 10},
	{"rig-solenoid-zero-length.yaml", "UNIT-RANGE", 28, 11},
	{"rig-spiral-turns-dont-fit.yaml", "PHYSICS-MODEL", 28, 10},
	{"rig-thickness-zero.yaml", "UNIT-RANGE", 37, 14},
	{"rig-transformer-count-huge.yaml", "FIELD-RANGE", 18, 41},
	{"rig-turns-1e6.yaml", "FIELD-RANGE", 28, 10},
	{"rig-turns-5000.yaml", "PHYSICS-MODEL", 28, 10},
	{"rig-wire-gauge-4-0.yaml", "PHYSICS-MODEL", 28, 10},
	{"rig-wire-gauge-neg.yaml", "PHYSICS-MODEL", 28, 10},
	{"rules-disable-all.yaml", "RULE-DISABLE-ALL", 2, 1},
	{"rules-disable-unknown.yaml", "RULE-UNKNOWN", 3, 10},
	{"rules-duplicate-id.yaml", "RULE-DUPLICATE", 3, 9},
	{"rules-id-lookalike.yaml", "SCHEMA-VIOLATION", 3, 9},
	{"rules-no-basis.yaml", "SCHEMA-VIOLATION", 3, 5},
	{"rules-range-bomb.yaml", "RULE-EVAL", 8, 11},
	{"rules-severity-lowercase.yaml", "SCHEMA-VIOLATION", 6, 15},
	{"rules-string-bomb.yaml", "RULE-EVAL", 8, 11},
	{"rules-template-open.yaml", "RULE-EXPR", 9, 22},
	{"rules-type-mismatch.yaml", "RULE-EXPR", 8, 39},
	{"rules-unknown-hazard.yaml", "RULE-HAZARD", 4, 13},
	{"rules-unknown-name.yaml", "RULE-NAME", 8, 11},
	{"rules-when-not-bool.yaml", "RULE-EXPR", 8, 11},
}

// TestHostileInputs runs check and review on each hostile file: exit 2, the expected diagnostic first on
// standard error with its position, nothing on standard output, and no file written — a review over an
// existing file leaves it as it was, and no temporary file is left behind.
func TestHostileInputs(t *testing.T) {
	files, err := filepath.Glob("../../testdata/hostile/*.yaml")
	if err != nil {
		t.Fatal(err)
	}
	listed := map[string]bool{}
	for _, c := range hostileCases {
		listed[c.file] = true
	}
	for _, f := range files {
		if !listed[filepath.Base(f)] {
			t.Errorf("got %s in testdata/hostile without an entry in hostileCases, want every file listed", filepath.Base(f))
		}
	}
	rig := "../../testdata/rigs/disc-thrower.yaml"
	for _, c := range hostileCases {
		t.Run(strings.TrimSuffix(c.file, ".yaml"), func(t *testing.T) {
			path := filepath.Join("../../testdata/hostile", c.file)
			if c.file == "rules-disable-all.yaml" {
				path = disableAllRules(t, path)
			}
			var args []string
			switch {
			case strings.HasPrefix(c.file, "rig-"):
				args = []string{path}
			case strings.HasPrefix(c.file, "policy-"):
				args = []string{"--policy", path, rig}
			case strings.HasPrefix(c.file, "rules-"):
				args = []string{"--rules", path, rig}
			default:
				t.Fatalf("got file %s, want a rig-, policy- or rules- prefix", c.file)
			}
			want := filepath.Base(c.file) + ":" + strconv.Itoa(c.line) + ":" + strconv.Itoa(c.col) + ": error[" + c.code + "]"

			var stdout, stderr bytes.Buffer
			if got := run(append([]string{"check"}, args...), strings.NewReader(""), &stdout, &stderr); got != exitBadInput {
				t.Fatalf("check: got exit %d, want %d; stderr:\n%s", got, exitBadInput, stderr.String())
			}
			if stdout.Len() != 0 {
				t.Errorf("check: got %d bytes on standard output, want none", stdout.Len())
			}
			first, _, _ := strings.Cut(stderr.String(), "\n")
			if !strings.Contains(first, want) {
				t.Errorf("check: got first line %q, want it to contain %q", first, want)
			}

			dir := t.TempDir()
			out := filepath.Join(dir, "review.pdf")
			old := []byte("previous review, must survive a failed run\n")
			if err := os.WriteFile(out, old, 0o644); err != nil {
				t.Fatal(err)
			}
			stderr.Reset()
			rargs := append([]string{"review", "--date", "2026-12-01", "-o", out}, args...)
			if got := run(rargs, strings.NewReader(""), &stdout, &stderr); got != exitBadInput {
				t.Fatalf("review: got exit %d, want %d; stderr:\n%s", got, exitBadInput, stderr.String())
			}
			if first, _, _ := strings.Cut(stderr.String(), "\n"); !strings.Contains(first, want) {
				t.Errorf("review: got first line %q, want it to contain %q", first, want)
			}
			if got, err := os.ReadFile(out); err != nil || !bytes.Equal(got, old) {
				t.Errorf("review: got the existing output %q (err %v), want it untouched", got, err)
			}
			if ents, _ := os.ReadDir(dir); len(ents) != 1 {
				t.Errorf("review: got %d entries in the output directory, want only the existing file", len(ents))
			}
		})
	}
}

// disableAllRules rewrites the disable-everything rulebook with the rules in force today, so that a rule
// added to the default rulebook later does not turn the case into one that loads. Its first two lines (the
// comment and "disable:", where the diagnostic is placed) are kept from the corpus file.
func disableAllRules(t *testing.T, corpus string) string {
	t.Helper()
	data, err := os.ReadFile(corpus)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitN(string(data), "\n", 3)
	if len(lines) < 3 || lines[1] != "disable:" {
		t.Fatalf("got %s starting %q, want a comment line and then disable:", corpus, lines)
	}
	set, err := rules.Default()
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	b.WriteString(lines[0] + "\n" + lines[1] + "\n")
	for _, r := range set.Rules() {
		fmt.Fprintf(&b, "  - {id: %s, reason: \"site says so\"}\n", r.ID)
	}
	p := filepath.Join(t.TempDir(), filepath.Base(corpus))
	if err := os.WriteFile(p, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}
