package schema

import (
	"errors"
	"fmt"
	"os"
	"strings"
	"testing"
)

func TestRender(t *testing.T) {
	src := map[string][]byte{"r.yaml": []byte("bank:\n  capacitance: 400 V  # cells\n\tesr: \"5 Ω\"\n")}
	cases := []struct {
		name string
		d    Diagnostic
		want string
	}{
		{"value marked to the comment", Diagnostic{Severity: SeverityError, Code: "UNIT-DIMENSION", Summary: "wrong", Detail: "fix it", File: "r.yaml", Line: 2, Column: 16},
			"r.yaml:2:16: error[UNIT-DIMENSION]: wrong\n 2 |   capacitance: 400 V  # cells\n   |                ^^^^^\n  = fix it\n"},
		{"explicit length", Diagnostic{Severity: SeverityError, Code: "C", Summary: "s", File: "r.yaml", Line: 2, Column: 20, Length: 1},
			"r.yaml:2:20: error[C]: s\n 2 |   capacitance: 400 V  # cells\n   |                    ^\n"},
		{"key marked without its colon", Diagnostic{Severity: SeverityError, Code: "C", Summary: "s", File: "r.yaml", Line: 2, Column: 3},
			"r.yaml:2:3: error[C]: s\n 2 |   capacitance: 400 V  # cells\n   |   ^^^^^^^^^^^\n"},
		{"tab kept, quoted value", Diagnostic{Severity: SeverityWarning, Code: "C", Summary: "s", Detail: "a\nb", File: "r.yaml", Line: 3, Column: 7},
			"r.yaml:3:7: warning[C]: s\n 3 | \tesr: \"5 Ω\"\n   | \t     ^^^^^\n  = a\n    b\n"},
		{"no source", Diagnostic{Severity: SeverityError, Code: "C", Summary: "s", File: "other.yaml", Line: 1, Column: 1},
			"other.yaml:1:1: error[C]: s\n"},
		{"no position", Diagnostic{Severity: SeverityError, Code: "C", Summary: "s", File: "r.yaml"},
			"r.yaml: error[C]: s\n"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var b strings.Builder
			if err := (Diagnostics{c.d}).Render(&b, src); err != nil {
				t.Fatal(err)
			}
			if b.String() != c.want {
				t.Errorf("got\n%q\nwant\n%q", b.String(), c.want)
			}
		})
	}
}

func TestSuggest(t *testing.T) {
	keys := []string{"capacitance", "voltage_rating", "esr", "series", "parallel"}
	cases := []struct{ in, want string }{
		{"capacitence", "capacitance"},
		{"Capacitance", "capacitance"},
		{"voltage-rating", "voltage_rating"},
		{"paralel", "parallel"},
		{"colour", ""},
		{"esx", "esr"}, // one edit is allowed even in a short word
		{"qrx", ""},    // two or more edits in three letters is too far to be a plausible typo
	}
	for _, c := range cases {
		t.Run(c.in, func(t *testing.T) {
			if got := Suggest(c.in, keys); got != c.want {
				t.Errorf("got %q, want %q", got, c.want)
			}
		})
	}
}

func TestSeverityZeroIsInvalid(t *testing.T) {
	var d Diagnostic
	if d.Severity != SeverityInvalid || !(Diagnostics{d}).HasErrors() {
		t.Errorf("got zero severity %v counted as no error, want invalid and counted", d.Severity)
	}
	if (Diagnostics{{Severity: SeverityWarning}}).Err() != nil {
		t.Errorf("got an error for warnings only, want nil")
	}
}

func TestSentinels(t *testing.T) {
	cases := []struct {
		code string
		want error
	}{
		{"YAML-SYNTAX", ErrSyntax}, {"YAML-SIZE", ErrLimit}, {"YAML-DUPKEY", ErrRefused}, {"FIELD-UNKNOWN", ErrField},
		{"FIELD-RANGE", ErrRange}, {"UNIT-RANGE", ErrRange}, {"UNIT-DIMENSION", ErrUnit}, {"SCHEMA-VIOLATION", ErrSchema},
		{"RIG-CONFLICT", ErrConflict},
	}
	for _, c := range cases {
		t.Run(c.code, func(t *testing.T) {
			var err error = Diagnostics{{Severity: SeverityError, Code: c.code}}
			if !errors.Is(err, c.want) {
				t.Errorf("got errors.Is false for %s, want %v", c.code, c.want)
			}
			var d Diagnostic
			if !errors.As(err, &d) || d.Code != c.code {
				t.Errorf("got errors.As %v, want the diagnostic", d)
			}
		})
	}
}

// TestAliasesWithinLimit checks that a small anchor reused by an alias is accepted and resolved.
func TestAliasesWithinLimit(t *testing.T) {
	src := "rig: {name: a, revision: \"1\"}\nbank: {capacitance: 1 mF, voltage_rating: 450 V}\nsupply:\n  transformers:\n" +
		"    - &t {primary_voltage: 230 V, secondary_voltage: 120 V}\n    - *t\n"
	r, err := LoadRig("a.yaml", []byte(src))
	if err != nil {
		t.Fatalf("got %v, want none", err)
	}
	if len(r.Supply.Transformers) != 2 || *r.Supply.Transformers[1].SecondaryVoltage != 120 {
		t.Errorf("got %+v, want two transformers of 120 V", r.Supply.Transformers)
	}
}

func ExampleParseQuantity() {
	c, _ := ParseQuantity("2200 uF", "F")
	i2t, _ := ParseQuantity("51 kA²s", "A²s")
	theta, _ := ParseQuantity("155 °C", "K")
	_, err := ParseQuantity("400 V", "F")
	fmt.Println(c, i2t, theta)
	fmt.Println(err)
	// Output:
	// 0.0022 51000 428.15
	// "400 V" is a voltage, but this field takes a capacitance
}

func ExampleDiagnostics_Render() {
	src := []byte("rig:\n  name: Bench 4\n  revision: \"1\"\nbank:\n  capacitence: 2200 uF\n  voltage_rating: 400 V\n")
	_, err := LoadRig("bench4.yaml", src)
	var ds Diagnostics
	if errors.As(err, &ds) {
		ds.Render(os.Stdout, map[string][]byte{"bench4.yaml": src})
	}
	// Output:
	// bench4.yaml:5:3: error[FIELD-UNKNOWN]: unknown key "capacitence" in "bank" (did you mean "capacitance"?)
	//  5 |   capacitence: 2200 uF
	//    |   ^^^^^^^^^^^
	//   = Rename it to "capacitance". Known keys here: capacitance, capacitance_tolerance, voltage_rating, dielectric, esr, leakage, peak_current_rating, series, parallel, leakage_spread, balancing, pulse_rated.
}

// TestLineStarts checks line counting against the YAML 1.1 line breaks that libyaml (and so yaml.v3)
// recognises: LF, CR, CR LF, NEL (U+0085), LS (U+2028), PS (U+2029) — YAML 1.1, "Line Break Characters"
// (from memory).
func TestLineStarts(t *testing.T) {
	cases := []struct {
		in   string
		want int
	}{
		{"a", 1}, {"a\n", 2}, {"a\nb", 2}, {"a\r\nb", 2}, {" \r0", 2}, {"a\rb\nc", 3}, {"a\u0085b", 2}, {"a\u2028b\u2029c", 3},
	}
	for _, c := range cases {
		t.Run(fmt.Sprintf("%q", c.in), func(t *testing.T) {
			if got := len(lineStarts([]byte(c.in))); got != c.want {
				t.Errorf("got %d lines, want %d", got, c.want)
			}
		})
	}
	if l, ok := sourceLine([]byte("a\r\nbc\rd"), 2); !ok || l != "bc" {
		t.Errorf("got line 2 %q, want %q", l, "bc")
	}
}
