package report

import (
	"bytes"
	"encoding/json"
	"testing"
)

func TestJSON(t *testing.T) {
	r := fixtureReview(t, 5, "Bench demo thrower")
	var b bytes.Buffer
	if err := JSON(&b, r, Options{Version: "0.1.0"}); err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Rig        map[string]any `json:"rig"`
		Quantities map[string]struct {
			Value   float64  `json:"value"`
			Worst   *float64 `json:"worst"`
			Unit    string   `json:"unit"`
			Formula string   `json:"formula"`
			Basis   string   `json:"basis"`
		} `json:"quantities"`
		Findings []struct {
			Rule, Hazard, Severity, Disposition, Message, Basis string
			Controls                                            []string
		} `json:"findings"`
		Verdict     string            `json:"verdict"`
		Overrides   []json.RawMessage `json:"overrides"`
		Fingerprint string            `json:"fingerprint"`
	}
	if err := json.Unmarshal(b.Bytes(), &doc); err != nil {
		t.Fatalf("output is not JSON: %v", err)
	}
	if doc.Verdict != "not ready" {
		t.Errorf("verdict: got %q, want %q", doc.Verdict, "not ready")
	}
	if doc.Fingerprint != Fingerprint(r, "0.1.0") {
		t.Errorf("fingerprint: got %q, want %q", doc.Fingerprint, Fingerprint(r, "0.1.0"))
	}
	if len(doc.Quantities) != len(r.Assessment.Quantities) {
		t.Errorf("quantities: got %d, want %d", len(doc.Quantities), len(r.Assessment.Quantities))
	}
	for _, q := range r.Assessment.Quantities {
		got, ok := doc.Quantities[q.Name]
		switch {
		case !ok:
			t.Errorf("%s: missing", q.Name)
		case got.Value != q.Value || got.Unit != q.Unit || got.Formula != q.Formula || got.Basis != q.Basis:
			t.Errorf("%s: got %+v, want value %g unit %q", q.Name, got, q.Value, q.Unit)
		case (got.Worst == nil) != (q.Worst == nil) || (got.Worst != nil && *got.Worst != *q.Worst):
			t.Errorf("%s worst: got %v, want %v", q.Name, got.Worst, q.Worst)
		}
	}
	// "worst": null, not omitted, where tolerances do not apply (DESIGN.md §9).
	if !bytes.Contains(b.Bytes(), []byte(`"worst": null`)) {
		t.Errorf("got no \"worst\": null entry, want one for bank.voltage")
	}
	if len(doc.Findings) != len(r.Findings) {
		t.Fatalf("findings: got %d, want %d", len(doc.Findings), len(r.Findings))
	}
	for i, f := range r.Findings {
		g := doc.Findings[i]
		if g.Rule != f.Rule || g.Severity != f.Severity.String() || g.Disposition != f.Disposition.String() || g.Message != f.Message {
			t.Errorf("finding %d: got %+v, want %+v", i, g, f)
		}
	}
	if len(doc.Overrides) != 1 {
		t.Errorf("overrides: got %d, want 1", len(doc.Overrides))
	}
	if info, _ := doc.Rig["rig"].(map[string]any); info["name"] != "Bench demo thrower" {
		t.Errorf("rig.rig.name: got %v, want the rig's name", doc.Rig["rig"])
	}
	// Deterministic: a second rendering is identical.
	var b2 bytes.Buffer
	if err := JSON(&b2, r, Options{Version: "0.1.0"}); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(b.Bytes(), b2.Bytes()) {
		t.Errorf("two renderings differ")
	}
}
