package schema

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// badInputs lists every file under testdata/bad with the one diagnostic it must produce. Each position was
// counted by hand from the file (1-based line, and column in characters, as a text editor shows them).
var badInputs = []struct {
	file      string
	code      string
	line, col int
}{
	{"below-absolute-zero.yaml", "UNIT-RANGE", 8, 24},
	{"bool-yes.yaml", "FIELD-TYPE", 8, 14},
	{"count-fraction.yaml", "FIELD-TYPE", 7, 11},
	{"count-zero.yaml", "FIELD-RANGE", 7, 13},
	{"empty-name.yaml", "FIELD-REQUIRED", 2, 9},
	{"enum-typo.yaml", "FIELD-ENUM", 7, 15},
	{"key-not-scalar.yaml", "FIELD-TYPE", 7, 5},
	{"list-expected.yaml", "FIELD-TYPE", 9, 5},
	{"missing-bank.yaml", "FIELD-REQUIRED", 1, 1},
	{"missing-capacitance.yaml", "FIELD-REQUIRED", 4, 1},
	{"missing-name.yaml", "FIELD-REQUIRED", 1, 1},
	{"null-value.yaml", "FIELD-TYPE", 7, 3},
	{"ring-bore.yaml", "RIG-CONFLICT", 10, 19},
	{"section-list.yaml", "FIELD-TYPE", 5, 3},
	{"section-scalar.yaml", "FIELD-TYPE", 4, 7},
	{"text-bool.yaml", "FIELD-TYPE", 2, 9},
	{"tilt-over.yaml", "UNIT-RANGE", 8, 9},
	{"tolerance-over.yaml", "UNIT-RANGE", 7, 26},
	{"top-not-mapping.yaml", "FIELD-TYPE", 1, 1},
	{"transformer-unit.yaml", "UNIT-DIMENSION", 10, 29},
	{"unit-bool.yaml", "FIELD-TYPE", 7, 8},
	{"unit-comma-decimal.yaml", "UNIT-SYNTAX", 5, 17},
	{"unit-dimension.yaml", "UNIT-DIMENSION", 5, 20},
	{"unit-lookalike-cyrillic.yaml", "UNIT-LOOKALIKE", 6, 23},
	{"unit-lookalike-flow.yaml", "UNIT-LOOKALIKE", 2, 52},
	{"unit-lookalike-minus.yaml", "UNIT-LOOKALIKE", 8, 24},
	{"unit-lookalike-quoted.yaml", "UNIT-LOOKALIKE", 6, 24},
	{"unit-missing-capacitance.yaml", "UNIT-MISSING", 5, 16},
	{"unit-missing-percent.yaml", "UNIT-MISSING", 7, 26},
	{"unit-missing-temperature.yaml", "UNIT-MISSING", 8, 24},
	{"unit-nan.yaml", "UNIT-NONFINITE", 5, 16},
	{"unit-negative.yaml", "UNIT-RANGE", 7, 8},
	{"unit-not-number.yaml", "UNIT-SYNTAX", 7, 8},
	{"unit-overflow.yaml", "UNIT-NONFINITE", 6, 19},
	{"unit-unknown.yaml", "UNIT-UNKNOWN", 6, 23},
	{"unit-zero.yaml", "UNIT-RANGE", 8, 15},
	{"unknown-key-typo.yaml", "FIELD-UNKNOWN", 5, 3},
	{"unknown-key-lookalike.yaml", "FIELD-UNKNOWN", 5, 3}, // Cyrillic es for the first letter
	{"unknown-key.yaml", "FIELD-UNKNOWN", 7, 3},
	{"unknown-section.yaml", "FIELD-UNKNOWN", 7, 1},
	{"wire-gauge.yaml", "FIELD-RANGE", 8, 15},
	{"yaml-alias-bomb.yaml", "YAML-ALIAS", 1, 1},
	{"yaml-control.yaml", "YAML-ENCODING", 7, 9},
	{"yaml-deep.yaml", "YAML-DEPTH", 7, 46},
	{"yaml-dupkey.yaml", "YAML-DUPKEY", 7, 3},
	{"yaml-empty.yaml", "YAML-EMPTY", 1, 1},
	{"yaml-indent.yaml", "YAML-SYNTAX", 6, 2},
	{"yaml-merge.yaml", "YAML-MERGE", 5, 3},
	{"yaml-multidoc.yaml", "YAML-MULTIDOC", 7, 1},
	{"yaml-tab.yaml", "YAML-SYNTAX", 5, 1},
	{"yaml-tag.yaml", "YAML-TAG", 5, 16},
	{"yaml-utf8.yaml", "YAML-ENCODING", 7, 19},
}

func TestBadInputs(t *testing.T) {
	files, err := filepath.Glob("../testdata/bad/*.yaml")
	if err != nil {
		t.Fatal(err)
	}
	listed := map[string]bool{}
	for _, c := range badInputs {
		listed[c.file] = true
	}
	for _, f := range files {
		if !listed[filepath.Base(f)] {
			t.Errorf("got testdata/bad/%s without an entry in badInputs, want every bad input tested", filepath.Base(f))
		}
	}
	if len(badInputs) < 30 {
		t.Errorf("got %d bad inputs, want at least 30", len(badInputs))
	}
	for _, c := range badInputs {
		t.Run(c.file, func(t *testing.T) {
			data, err := os.ReadFile(filepath.Join("../testdata/bad", c.file))
			if err != nil {
				t.Fatal(err)
			}
			r, err := LoadRig(c.file, data)
			if r != nil {
				t.Errorf("got a rig, want nil for bad input")
			}
			var ds Diagnostics
			if !errors.As(err, &ds) {
				t.Fatalf("got error %v (%T), want Diagnostics", err, err)
			}
			if len(ds) != 1 {
				t.Fatalf("got %d diagnostics, want 1:\n%v", len(ds), ds)
			}
			d := ds[0]
			if d.Code != c.code || d.Line != c.line || d.Column != c.col {
				t.Errorf("got %s at %d:%d (%s), want %s at %d:%d", d.Code, d.Line, d.Column, d.Summary, c.code, c.line, c.col)
			}
			if d.Severity != SeverityError || d.File != c.file || d.Summary == "" || d.Detail == "" {
				t.Errorf("got severity %v, file %q, summary %q, detail %q; want error severity, the file name, a summary and a fix", d.Severity, d.File, d.Summary, d.Detail)
			}
			if d.Unwrap() == nil {
				t.Errorf("got code %s without a sentinel error, want one", d.Code)
			}
		})
	}
}

// TestOversizeFile checks the 1 MiB limit with a generated file (a file that large is not committed).
func TestOversizeFile(t *testing.T) {
	data := []byte("rig:\n  name: big\n  purpose: \"" + strings.Repeat("x", MaxFileSize) + "\"\n")
	_, err := LoadRig("big.yaml", data)
	var ds Diagnostics
	if !errors.As(err, &ds) || len(ds) != 1 || ds[0].Code != "YAML-SIZE" || ds[0].Line != 1 || ds[0].Column != 1 {
		t.Fatalf("got %v, want one YAML-SIZE at 1:1", err)
	}
	if !errors.Is(err, ErrLimit) {
		t.Errorf("got errors.Is(err, ErrLimit) false, want true")
	}
}

// TestAllProblemsInOnePass checks that loading reports every problem of a file, not only the first.
func TestAllProblemsInOnePass(t *testing.T) {
	src := "rig:\n  name: x\n  revision: \"1\"\n  colour: red\nbank:\n  capacitance: 400 V\n  voltage_rating: 450 V\n  esr: -1 Ω\n  series: 0\n"
	_, err := LoadRig("many.yaml", []byte(src))
	var ds Diagnostics
	if !errors.As(err, &ds) {
		t.Fatalf("got %v, want Diagnostics", err)
	}
	var got []string
	for _, d := range ds {
		got = append(got, d.Code)
	}
	want := []string{"FIELD-UNKNOWN", "UNIT-DIMENSION", "UNIT-RANGE", "FIELD-RANGE"}
	if strings.Join(got, " ") != strings.Join(want, " ") {
		t.Errorf("got %v, want %v", got, want)
	}
	for _, c := range []struct {
		sentinel error
		want     bool
	}{{ErrField, true}, {ErrUnit, true}, {ErrRange, true}, {ErrSyntax, false}, {ErrLimit, false}} {
		if got := errors.Is(err, c.sentinel); got != c.want {
			t.Errorf("got errors.Is(err, %v) = %v, want %v", c.sentinel, got, c.want)
		}
	}
}
