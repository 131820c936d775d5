package main

import (
	"encoding/json"
	"os"
	"strings"
	"testing"

	"chargeward/rules"
	"chargeward/schema"
)

const (
	discRig  = "../../testdata/rigs/disc-thrower.yaml"
	ringRig  = "../../testdata/rigs/ring-jumper.yaml"
	flashRig = "../../testdata/rigs/flash-bank.yaml"
)

func TestCheckVerdicts(t *testing.T) {
	cases := []struct {
		rig, verdict string
		wantCode     int // with the default --fail-on controls
	}{
		{discRig, "not ready", exitFindings},
		{ringRig, "ready with controls", exitFindings},
	}
	for _, c := range cases {
		t.Run(c.rig, func(t *testing.T) {
			code, stdout, stderr := runCLI(t, "", "check", "--format", "json", c.rig)
			if code != c.wantCode || stderr != "" {
				t.Fatalf("got exit %d, stderr %q; want %d", code, stderr, c.wantCode)
			}
			var doc struct {
				Verdict  string `json:"verdict"`
				Findings []struct {
					Rule, Hazard, Severity, Disposition, Message, Basis string
					Controls                                            []string
				} `json:"findings"`
			}
			if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
				t.Fatalf("got invalid JSON: %v", err)
			}
			if doc.Verdict != c.verdict || len(doc.Findings) == 0 {
				t.Errorf("got verdict %q with %d findings, want %q", doc.Verdict, len(doc.Findings), c.verdict)
			}
			for _, f := range doc.Findings {
				if f.Rule == "" || f.Hazard == "" || f.Severity == "" || f.Disposition == "" || f.Message == "" || f.Basis == "" {
					t.Errorf("got incomplete finding %+v", f)
				}
			}
		})
	}
}

func TestCheckFailOn(t *testing.T) {
	cases := []struct {
		args []string
		want int
	}{
		{[]string{"--fail-on", "must-fix", flashRig}, exitOK},
		{[]string{"--fail-on", "DANGER", flashRig}, exitOK},
		{[]string{"--fail-on", "notice", flashRig}, exitFindings},
		{[]string{"--fail-on", "must-fix", ringRig}, exitOK},
		{[]string{"--fail-on", "controls", ringRig}, exitFindings},
		{[]string{"--fail-on", "must-fix", discRig}, exitFindings},
		{[]string{"--fail-on", "never", discRig}, exitOK},
		{[]string{"--fail-on", "severe", discRig}, exitBadInput},
		{[]string{"--format", "pdf", discRig}, exitBadInput},
	}
	for _, c := range cases {
		t.Run(strings.Join(c.args, " "), func(t *testing.T) {
			if code, _, stderr := runCLI(t, "", append([]string{"check"}, c.args...)...); code != c.want {
				t.Errorf("got exit %d (stderr %q), want %d", code, stderr, c.want)
			}
		})
	}
}

func TestCheckManyRigs(t *testing.T) {
	code, stdout, _ := runCLI(t, "", "check", "--fail-on", "must-fix", flashRig, ringRig, discRig)
	lines := strings.Split(strings.TrimSuffix(stdout, "\n"), "\n")
	if code != exitFindings || len(lines) != 3 {
		t.Fatalf("got exit %d and %d lines:\n%s\nwant the worst code 1 and one line per rig", code, len(lines), stdout)
	}
	if !strings.HasPrefix(lines[2], discRig+": NOT READY") || !strings.HasPrefix(lines[1], ringRig+": READY WITH CONTROLS") {
		t.Errorf("got\n%s\nwant a verdict line per rig", stdout)
	}
	code, stdout, _ = runCLI(t, "", "check", "--format", "json", "--fail-on", "never", flashRig, ringRig)
	var docs []map[string]any
	if code != exitOK || json.Unmarshal([]byte(stdout), &docs) != nil || len(docs) != 2 {
		t.Errorf("got exit %d and %d JSON documents, want 0 and an array of 2", code, len(docs))
	}
}

func TestCheckSitePolicy(t *testing.T) {
	code, stdout, stderr := runCLI(t, "", "check", "--fail-on", "never", "--policy", "../../testdata/policy/site-stricter.yaml", ringRig)
	if code != exitOK || !strings.Contains(stdout, "residual.safe_voltage") {
		t.Errorf("got exit %d, stderr %q, stdout without the override; want it listed", code, stderr)
	}
	bad := "../../testdata/policy/bad-unknown-key.yaml"
	code, stdout, stderr = runCLI(t, "", "check", "--policy", bad, ringRig)
	if code != exitBadInput || stdout != "" || !strings.HasPrefix(stderr, bad+":2:3: error[POLICY-KEY]") {
		t.Errorf("got exit %d, stdout %q, stderr %q; want 2, nothing, the positioned diagnostic", code, stdout, stderr)
	}
	code, _, _ = runCLI(t, "", "check", "--rules", "../../testdata/rulebook/site-key-switch.yaml", "--fail-on", "never", ringRig)
	if code != exitOK {
		t.Errorf("site rulebook: got exit %d, want 0", code)
	}
}

// TestJudgeVoltageClass: a bank above 1000 V is assessed against the 5 min of NEC 460.28(A), one at or
// below it against the 1 min of 460.6(A).
func TestJudgeVoltageClass(t *testing.T) {
	data, err := os.ReadFile(flashRig)
	if err != nil {
		t.Fatal(err)
	}
	set, err := rules.Default()
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		volts, rating string
		want          float64
	}{{"300 V", "360 V", 60}, {"1500 V", "2000 V", 300}} {
		src := strings.Replace(strings.Replace(string(data), "dc_voltage: 300 V", "dc_voltage: "+c.volts, 1), "voltage_rating: 360 V", "voltage_rating: "+c.rating, 1)
		rig, err := schema.LoadRig("rig.yaml", []byte(src))
		if err != nil {
			t.Fatal(err)
		}
		rv, err := judge(rig, set)
		if err != nil {
			t.Fatal(err)
		}
		if got := rv.Assessment.Targets.TimeAllowed; got != c.want {
			t.Errorf("%s bank: got time allowed %g s, want %g s", c.volts, got, c.want)
		}
	}
}
