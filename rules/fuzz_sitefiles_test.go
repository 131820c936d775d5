package rules

import (
	"errors"
	"io"
	"math"
	"os"
	"strings"
	"testing"

	"chargeward/hazards"
	"chargeward/schema"
)

// Seeds for the site-file fuzz targets: small valid site files, the embedded defaults (which a site file may
// not repeat: duplicate ids and keys are diagnostics), and broken ones. Crashers found earlier live in
// testdata/fuzz/FuzzLoadPolicy and testdata/fuzz/FuzzLoadRulebook.
var (
	fzPolicySeeds = []string{
		"thresholds:\n  residual.safe_voltage:\n    value: 30 V\n    unit: V\n    basis: site electrical safety program\n",
		"thresholds:\n  shock.energy: {value: 5, unit: J, basis: site}\n  residual.time_low: {value: 2 min, unit: s, basis: site}\n",
		"thresholds:\n  shock.energy: {value: -1e308, unit: J, basis: site}\n",
		"thresholds:\n  shock.energy: {value: 1e400, unit: J, basis: site}\n",
		"thresholds:\n  shock.voltage: {value: \"100 kV\", unit: V, basis: site}\n",
		"thresholds:\n  shock.voltage: {value: \"100 Ⅴ\", unit: V, basis: site}\n",
		"thresholds: {}\n",
		"thresholds:\n  nosuch.key: {value: 1, unit: V, basis: x}\n",
		"[1, 2\n",
		"",
	}
	fzRulebookSeeds = []string{
		"rules:\n  - id: SITE-01\n    hazard: shock\n    title: Site rule\n    severity: WARNING\n    disposition: controls\n    when: bank.energy > 1\n    message: \"stores {bank.energy}\"\n    basis: site electrical safety program\n",
		"disable:\n  - {id: SHK-01, reason: site}\n",
		"disable:\n  - {id: SHK-99, reason: site}\n",
		"rules:\n  - id: SITE-02\n    hazard: nosuch\n    title: t\n    severity: NOTICE\n    disposition: advisory\n    when: bank.energy / 0 > 1 && worst.bank.voltage < policy.shock.voltage\n    message: \"{bank.energy * 2 | J} {\"\n    basis: x\n",
		"rules:\n  - id: SITE-03\n    hazard: shock\n    title: t\n    severity: NOTICE\n    disposition: advisory\n    when: 'rig.controls.interlock == true or stated(\"coil\")'\n    message: m\n    basis: x\n    controls:\n      - {phase: storage, text: lock it, measured: \"V\"}\n",
		"checklist:\n  - {phase: set-up, text: read the review}\n",
		"rules: [",
		"",
	}
)

// FuzzLoadPolicy feeds arbitrary bytes to Load as a site policy. Invariants: no panic; a set that loads has
// finite thresholds and evaluates a demo assessment without error; a failure is Diagnostics, each with a
// code, error severity and a position inside the site file (or the default rulebook, which site values may
// make fail to compile — never expected), and rendering them never fails.
func FuzzLoadPolicy(f *testing.F) {
	for _, s := range fzPolicySeeds {
		f.Add([]byte(s))
	}
	a := fzDemoAssessment(f)
	f.Fuzz(func(t *testing.T, data []byte) {
		set, err := Load("site-policy.yaml", data, "", nil)
		fzCheckLoad(t, "site-policy.yaml", data, set, err, a)
	})
}

// FuzzLoadRulebook feeds arbitrary bytes to Load as a site rulebook, with the same invariants as
// FuzzLoadPolicy: a rulebook that compiles must evaluate without a panic and render finite messages.
func FuzzLoadRulebook(f *testing.F) {
	for _, s := range fzRulebookSeeds {
		f.Add([]byte(s))
	}
	a := fzDemoAssessment(f)
	f.Fuzz(func(t *testing.T, data []byte) {
		set, err := Load("", nil, "site-rules.yaml", data)
		fzCheckLoad(t, "site-rules.yaml", data, set, err, a)
	})
}

func fzCheckLoad(t *testing.T, name string, data []byte, set *Set, err error, a *hazards.Assessment) {
	t.Helper()
	if err == nil {
		if set == nil {
			t.Fatal("got a nil set and no error, want one of them")
		}
		for _, e := range set.Policy().Entries() {
			if math.IsNaN(e.Value) || math.IsInf(e.Value, 0) {
				t.Fatalf("got threshold %s = %v, want a finite value", e.Key, e.Value)
			}
		}
		rv, err := set.Evaluate(a)
		if err != nil {
			// A site rule may divide by zero or compare a string with a number: that is reported per
			// rule, never a failure of the whole review. An evaluation error must still name the rule.
			var ds Diagnostics
			if !errors.As(err, &ds) || len(ds) != 1 || ds[0].Code != CodeEval || !strings.Contains(ds[0].Summary, "rules: ") {
				t.Fatalf("got evaluation error %q, want one RULE-EVAL diagnostic that names the rule", err)
			}
			return
		}
		for _, fd := range rv.Findings {
			for _, bad := range []string{"NaN", "+Inf", "-Inf"} {
				if strings.Contains(fd.Message, bad) {
					t.Fatalf("got finding %s message %q, want no %s", fd.Rule, fd.Message, bad)
				}
			}
		}
		return
	}
	if set != nil {
		t.Fatal("got a set and an error, want one of them")
	}
	var ds Diagnostics
	if !errors.As(err, &ds) || len(ds) == 0 {
		t.Fatalf("got %v (%T), want Diagnostics", err, err)
	}
	lines := yamlLines(data)
	for _, d := range ds {
		if d.Code == "" || d.Severity != schema.SeverityError || d.Line < 1 || d.Column < 1 {
			t.Fatalf("got diagnostic %+v, want a code, error severity and a position", d)
		}
		if d.File == name && d.Line > lines {
			t.Fatalf("got diagnostic %+v at line %d, want within the %d lines of %s", d, d.Line, lines, name)
		}
	}
	if err := ds.Render(io.Discard, map[string][]byte{name: data}); err != nil {
		t.Fatal(err)
	}
}

// fzDemoAssessment is the disc thrower's assessment, the input the fuzzed site files are evaluated over.
func fzDemoAssessment(tb testing.TB) *hazards.Assessment {
	tb.Helper()
	data, err := os.ReadFile("../testdata/rigs/disc-thrower.yaml")
	if err != nil {
		tb.Fatal(err)
	}
	rig, err := schema.LoadRig("disc-thrower.yaml", data)
	if err != nil {
		tb.Fatal(err)
	}
	set, err := Default()
	if err != nil {
		tb.Fatal(err)
	}
	a, err := hazards.Assess(rig, set.Targets())
	if err != nil {
		tb.Fatal(err)
	}
	return a
}

// yamlLines counts lines as the YAML parser and schema's positions break them: LF, CRLF, a lone CR, and
// NEL, LS and PS (YAML 1.1 §5.4 line breaks, which yaml.v3 follows), so that a diagnostic on the last line
// of "\r0" or "\u00850" is inside the file.
func yamlLines(data []byte) int {
	n := 1
	for i := 0; i < len(data); i++ {
		switch {
		case data[i] == '\n':
			n++
		case data[i] == '\r':
			n++
			if i+1 < len(data) && data[i+1] == '\n' {
				i++
			}
		case data[i] == 0xc2 && i+1 < len(data) && data[i+1] == 0x85:
			n++
			i++
		case data[i] == 0xe2 && i+2 < len(data) && data[i+1] == 0x80 && (data[i+2] == 0xa8 || data[i+2] == 0xa9):
			n++
			i += 2
		}
	}
	return n
}
