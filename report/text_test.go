package report

import (
	"bytes"
	"encoding/json"
	"strings"
	"testing"
	"unicode/utf8"

	"chargeward/rules"
)

func TestText(t *testing.T) {
	r := fixtureReview(t, 9, "Bench demo thrower")
	var b bytes.Buffer
	if err := Text(&b, r, Options{Version: "0.1.0"}); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	want := []string{
		"Verdict: NOT READY",
		"3 DANGER, 2 WARNING, 2 CAUTION, 2 NOTICE; 3 must-fix, 3 controls, 3 advisory",
		"Fingerprint: " + Fingerprint(r, "0.1.0"),
		// key quantities, nominal and worst, as SI prints them (checked in TestSI)
		"bank.energy", "547 J", "656 J", "3.27 kA", "3.61 kA", "586 s", "640 s", "2.2 mF", "2.64 mF", "1.5 mΩ",
		"switch.di_dt_critical", // the gap
		"discharge.time_allowed: site 120 s, reference 60 s (less strict than the reference)",
		"Required controls:", "Basis: NFPA 70 (NEC) 460.6(A)",
		"does not replace local codes",
	}
	for _, f := range r.Findings {
		want = append(want, f.Rule)
	}
	for _, w := range want {
		if !strings.Contains(out, w) {
			t.Errorf("text output lacks %q", w)
		}
	}
	// Hazard classes appear once each, as group headings, in the Review's order.
	last := -1
	for _, g := range groupFindings(r) {
		i := strings.Index(out, "\n"+g.title+" (")
		if i < 0 || i < last {
			t.Errorf("heading %q: got index %d after %d, want increasing", g.title, i, last)
		}
		last = i
	}
	for i, line := range strings.Split(out, "\n") {
		if n := utf8.RuneCountInString(line); n > textWidth {
			t.Errorf("line %d: got %d characters, want ≤ %d: %q", i+1, n, textWidth, line)
		}
	}
}

func TestTextNoReview(t *testing.T) {
	var b bytes.Buffer
	if err := Text(&b, nil); err != ErrNoReview {
		t.Errorf("got %v, want ErrNoReview", err)
	}
}

func TestWrapWords(t *testing.T) {
	tests := []struct {
		s     string
		width int
		want  []string
	}{
		{"one two three", 20, []string{"one two three"}},
		{"aaaa bbbb cccc dddd eeee ffff", 20, []string{"aaaa bbbb cccc dddd", "eeee ffff"}},
		{strings.Repeat("x", 45), 20, []string{strings.Repeat("x", 20), strings.Repeat("x", 20), strings.Repeat("x", 5)}},
		{"a\nb", 20, []string{"a", "b"}},
	}
	for _, tt := range tests {
		t.Run(tt.s, func(t *testing.T) {
			got := wrapWords(tt.s, tt.width)
			if strings.Join(got, "|") != strings.Join(tt.want, "|") {
				t.Errorf("got %q, want %q", got, tt.want)
			}
		})
	}
}

// TestHazardTitlesAndDisabledRules: headings use the rulebook's class titles, and every output lists the
// default rules a site rulebook switched off, with the site's reason (DESIGN.md §5: the report lists what a
// site changed beside the reference).
func TestHazardTitlesAndDisabledRules(t *testing.T) {
	r := fixtureReview(t, 6, "Titles rig")
	r.HazardClasses = nil
	for _, f := range r.Findings {
		r.HazardClasses = append(r.HazardClasses, rules.HazardClass{ID: f.Hazard, Title: "Class titled " + f.Hazard})
	}
	r.Disabled = []rules.DisabledRule{{ID: "ZZZ-99", Reason: "covered by the site's own enclosure rule", Origin: "site-rules.yaml"}}

	var text strings.Builder
	if err := Text(&text, r); err != nil {
		t.Fatal(err)
	}
	out := text.String()
	for _, want := range []string{"\nClass titled " + r.Findings[0].Hazard + " (", "ZZZ-99: switched off by site-rules.yaml",
		"covered by the site's own enclosure rule"} {
		if !strings.Contains(out, want) {
			t.Errorf("text: got no %q, want it", want)
		}
	}
	var js strings.Builder
	if err := JSON(&js, r); err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Disabled []rules.DisabledRule `json:"disabled_rules"`
	}
	if err := json.Unmarshal([]byte(js.String()), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Disabled) != 1 || doc.Disabled[0].ID != "ZZZ-99" {
		t.Errorf("json: got disabled_rules %+v, want ZZZ-99", doc.Disabled)
	}
}
