package rules

import "testing"

func TestSplitPlaceholder(t *testing.T) {
	cases := []struct{ in, expr, unit, fallback string }{
		{"bank.energy", "bank.energy", "", ""},
		{"bank.energy / 2 | J", "bank.energy / 2 ", "J", ""},
		{"a || b | 1", "a || b ", "1", ""},
		{"pulse.peak_current | A | high-current", "pulse.peak_current ", "A", "high-current"},
		{"rig.supply.rectifier | | rectifier", "rig.supply.rectifier ", "", "rectifier"},
	}
	for _, c := range cases {
		e, u, f := splitPlaceholder(c.in)
		if e != c.expr || u != c.unit || f != c.fallback {
			t.Errorf("splitPlaceholder(%q): got %q %q %q, want %q %q %q", c.in, e, u, f, c.expr, c.unit, c.fallback)
		}
	}
}

// TestMessageRendering: placeholders take the unit of the name they show, an explicit unit, or the
// fallback when the value is absent.
func TestMessageRendering(t *testing.T) {
	site := []byte("rules:\n  - id: TMP-01\n    hazard: guarding\n    title: t\n    severity: NOTICE\n    disposition: advisory\n" +
		"    when: bank.energy > 0\n" +
		"    message: \"{bank.energy} {bank.capacitance} {bank.voltage / policy.shock.voltage | %} {noise.peak_spl | dB | not estimated} {rig.controls.eye_protection} {rig.controls.interlock}\"\n" +
		"    basis: common practice\n")
	s, err := Load("", nil, "t.yaml", site)
	if err != nil {
		t.Fatal(err)
	}
	rv := evaluate(t, s, baseFixture())
	f, ok := findRule(rv, "TMP-01")
	// Base fixture: 2 J, 1.1 mF, 60 V against the 100 V shock threshold (60 %), no noise estimate, goggles,
	// an interlock.
	if want := "2 J 1.10 mF 60 % not estimated goggles yes"; !ok || f.Message != want {
		t.Errorf("got %q, want %q", f.Message, want)
	}
}
