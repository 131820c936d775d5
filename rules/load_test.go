package rules

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"chargeward/schema"
)

func readTestdata(t *testing.T, rel string) []byte {
	t.Helper()
	data, err := os.ReadFile(filepath.Join("..", "testdata", rel))
	if err != nil {
		t.Fatal(err)
	}
	return data
}

// TestBadSiteFiles: each bad site file is refused with a diagnostic of the expected code at the exact line
// and column of the offending value (1-based, in characters).
func TestBadSiteFiles(t *testing.T) {
	cases := []struct {
		file         string
		code         string
		line, column int
		summary      string // substring of the summary
	}{
		{"policy/bad-unknown-key.yaml", CodeUnknownKey, 2, 3, `did you mean "residual.safe_voltage"?`},
		{"policy/bad-unit.yaml", CodeUnit, 4, 11, `reference unit is "V"`},
		{"policy/bad-value.yaml", CodeUnit, 3, 12, "shock.energy"},
		{"policy/bad-no-basis.yaml", "SCHEMA-VIOLATION", 3, 5, "basis"},
		{"policy/bad-extra-key.yaml", "SCHEMA-VIOLATION", 6, 5, `"reason"`},
		{"policy/bad-blank-basis.yaml", CodeBasis, 2, 3, "no basis"},
		{"rulebook/bad-misspelt-quantity.yaml", CodeUnknownName, 7, 11, `did you mean "bank.energy"?`},
		{"rulebook/bad-type.yaml", CodeExpr, 7, 39, "mismatched types"}, // expr marks the operator
		{"rulebook/bad-no-basis.yaml", "SCHEMA-VIOLATION", 2, 5, "basis"},
		{"rulebook/bad-duplicate-id.yaml", CodeDuplicate, 2, 9, "SHK-01"},
		{"rulebook/bad-unknown-disable.yaml", CodeUnknownRule, 2, 9, `did you mean "SHK-01"?`},
		{"rulebook/bad-unknown-hazard.yaml", CodeHazard, 3, 13, `did you mean "shock"?`},
		{"rulebook/bad-template.yaml", CodeUnknownName, 8, 48, `did you mean "bank.voltage"?`},
		{"rulebook/bad-section-value.yaml", CodeUnknownName, 7, 11, "group of names"},
		{"rulebook/bad-block-condition.yaml", CodeUnknownName, 9, 7, `did you mean "rig.controls.key_switch"?`},
		{"rulebook/bad-literal-condition.yaml", CodeUnknownName, 9, 12, `did you mean "policy.shock.energy"?`},
		{"rulebook/bad-bad-severity.yaml", "SCHEMA-VIOLATION", 5, 15, "severity"},
		{"rulebook/bad-no-condition.yaml", CodeRuleSchema, 2, 9, "no condition"},
	}
	for _, c := range cases {
		t.Run(c.file, func(t *testing.T) {
			data := readTestdata(t, c.file)
			var err error
			if strings.HasPrefix(c.file, "policy/") {
				_, err = Load(c.file, data, "", nil)
			} else {
				_, err = Load("", nil, c.file, data)
			}
			var ds schema.Diagnostics
			if !errors.As(err, &ds) || len(ds) == 0 {
				t.Fatalf("got error %v, want diagnostics", err)
			}
			d := ds[0]
			if d.Code != c.code || d.Line != c.line || d.Column != c.column || d.File != c.file || !strings.Contains(d.Summary, c.summary) {
				t.Errorf("got %s:%d:%d [%s] %q, want %s:%d:%d [%s] containing %q", d.File, d.Line, d.Column, d.Code, d.Summary, c.file, c.line, c.column, c.code, c.summary)
			}
			if d.Severity != schema.SeverityError {
				t.Errorf("got severity %v, want error", d.Severity)
			}
		})
	}
}

// TestEvalErrorPositioned: a site condition that compiles but fails on a rig (ln of a negative number) is a
// RULE-EVAL diagnostic at the condition, not a crash and not a silent pass.
func TestEvalErrorPositioned(t *testing.T) {
	site := []byte("rules:\n  - id: TMP-01\n    hazard: guarding\n    title: t\n    severity: NOTICE\n    disposition: advisory\n    when: ln(bank.energy) > 0\n    message: m\n    basis: common practice\n")
	s, err := Load("", nil, "t.yaml", site)
	if err != nil {
		t.Fatal(err)
	}
	f := baseFixture()
	f.set("bank.energy", -1)
	_, err = s.Evaluate(f.assessment(t))
	var ds schema.Diagnostics
	if !errors.As(err, &ds) || len(ds) != 1 || ds[0].Code != CodeEval || ds[0].File != "t.yaml" || ds[0].Line != 7 || ds[0].Column != 11 {
		t.Errorf("got %v, want one RULE-EVAL diagnostic at t.yaml:7:11", err)
	}
}
