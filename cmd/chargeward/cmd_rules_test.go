package main

import (
	"encoding/json"
	"strings"
	"testing"

	"chargeward/rules"
)

func TestRulesCommand(t *testing.T) {
	set, err := rules.Default()
	if err != nil {
		t.Fatal(err)
	}
	code, stdout, stderr := runCLI(t, "", "rules")
	if code != exitOK || stderr != "" {
		t.Fatalf("got exit %d, stderr %q; want 0", code, stderr)
	}
	for _, r := range set.Rules() {
		if !strings.Contains(stdout, r.ID+" ") || !strings.Contains(stdout, r.Basis) {
			t.Errorf("got listing without %s and its basis", r.ID)
		}
	}
	code, stdout, _ = runCLI(t, "", "rules", "--conditions")
	if code != exitOK || !strings.Contains(stdout, "when: worst.bank.voltage >= policy.shock.voltage && worst.bank.energy >= policy.shock.energy") {
		t.Errorf("--conditions: got exit %d, want SHK-01's condition listed", code)
	}
	code, stdout, _ = runCLI(t, "", "rules", "--policy")
	if code != exitOK {
		t.Fatalf("got exit %d, want 0", code)
	}
	for _, e := range set.Policy().Entries() {
		if !strings.Contains(stdout, e.Key) || !strings.Contains(stdout, e.Basis) {
			t.Errorf("got threshold listing without %s and its basis", e.Key)
		}
	}
}

func TestRulesCommandSiteFiles(t *testing.T) {
	code, stdout, _ := runCLI(t, "", "rules", "--policy", "--site-policy", "../../testdata/policy/site-looser.yaml")
	if code != exitOK || !strings.Contains(stdout, "2 min") && !strings.Contains(stdout, "120 s (reference 60 s)") || !strings.Contains(stdout, "LOOSER") {
		t.Errorf("got exit %d, stdout\n%s\nwant the site value beside the reference, marked looser", code, stdout)
	}
	code, stdout, _ = runCLI(t, "", "rules", "--site-rules", "../../testdata/rulebook/site-key-switch.yaml")
	if code != exitOK || !strings.Contains(stdout, "KEY-01") || !strings.Contains(stdout, "Disabled by the site rulebook") {
		t.Errorf("got exit %d, stdout\n%s\nwant KEY-01 and the disabled DIS-10", code, stdout)
	}
	f := "../../testdata/rulebook/bad-misspelt-quantity.yaml"
	code, stdout, stderr := runCLI(t, "", "rules", "--site-rules", f)
	if code != exitBadInput || stdout != "" || !strings.HasPrefix(stderr, f+":7:11: error[RULE-NAME]") {
		t.Errorf("got exit %d, stdout %q, stderr %q; want 2 and the positioned diagnostic", code, stdout, stderr)
	}
}

func TestRulesCommandJSONAndSchemas(t *testing.T) {
	code, stdout, _ := runCLI(t, "", "rules", "--format", "json")
	var doc struct {
		Rules []struct{ ID, Basis string } `json:"rules"`
	}
	if code != exitOK || json.Unmarshal([]byte(stdout), &doc) != nil || len(doc.Rules) == 0 {
		t.Fatalf("got exit %d, invalid or empty JSON", code)
	}
	for _, which := range []string{"rulebook", "policy"} {
		code, stdout, _ := runCLI(t, "", "rules", "--schema", which)
		var s map[string]any
		if code != exitOK || json.Unmarshal([]byte(stdout), &s) != nil || s["$schema"] != "https://json-schema.org/draft/2020-12/schema" {
			t.Errorf("--schema %s: got exit %d, want a draft 2020-12 schema", which, code)
		}
	}
	if code, _, _ := runCLI(t, "", "rules", "--schema", "rig"); code != exitBadInput {
		t.Errorf("--schema rig: got exit %d, want 2", code)
	}
}
