package report

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"testing"

	"chargeward/rules"
)

// TestFingerprintFraming recomputes the fingerprint from its documented definition with crypto/sha256
// (FIPS 180-4), so that a change of framing cannot pass unnoticed: old reviews would stop verifying.
func TestFingerprintFraming(t *testing.T) {
	r := fixtureReview(t, 2, "Bench demo thrower")
	rig, err := json.Marshal(r.Assessment.Rig)
	if err != nil {
		t.Fatal(err)
	}
	msg := ""
	for _, p := range [][2]string{{"domain", "chargeward review fingerprint v1"}, {"rig", string(rig)},
		{"rulebook", r.RulebookDigest}, {"policy", r.PolicyDigest}, {"version", "0.1.0"}} {
		msg += fmt.Sprintf("%s %d\n%s\n", p[0], len(p[1]), p[1])
	}
	sum := sha256.Sum256([]byte(msg))
	if got, want := Fingerprint(r, "0.1.0"), hex.EncodeToString(sum[:]); got != want {
		t.Errorf("got %s, want %s", got, want)
	}
}

func TestFingerprintSensitivity(t *testing.T) {
	base := Fingerprint(fixtureReview(t, 2, "Bench demo thrower"), "0.1.0")
	if len(base) != 64 {
		t.Fatalf("got %d hex digits, want 64", len(base))
	}
	tests := []struct {
		name    string
		change  func(r *rules.Review)
		version string
		same    bool
	}{
		{"nothing", func(r *rules.Review) {}, "0.1.0", true},
		{"source text only", func(r *rules.Review) { r.Assessment.Rig.Source.Raw = []byte("# other comments\n") }, "0.1.0", true},
		{"findings only", func(r *rules.Review) { r.Findings = nil }, "0.1.0", true},
		{"capacitance", func(r *rules.Review) { *r.Assessment.Rig.Bank.Capacitance = 2.3e-3 }, "0.1.0", false},
		{"revision", func(r *rules.Review) { r.Assessment.Rig.Rig.Revision = "D" }, "0.1.0", false},
		{"rulebook", func(r *rules.Review) { r.RulebookDigest = "00" }, "0.1.0", false},
		{"policy", func(r *rules.Review) { r.PolicyDigest = "00" }, "0.1.0", false},
		{"version", func(r *rules.Review) {}, "0.1.1", false},
		// Moving bytes between parts must not collide: the length framing separates them.
		{"digest boundary", func(r *rules.Review) { r.RulebookDigest += r.PolicyDigest[:2]; r.PolicyDigest = r.PolicyDigest[2:] }, "0.1.0", false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := fixtureReview(t, 2, "Bench demo thrower")
			tt.change(r)
			got := Fingerprint(r, tt.version)
			if (got == base) != tt.same {
				t.Errorf("got %s against base %s, want same=%v", got, base, tt.same)
			}
		})
	}
	if got := Fingerprint(nil, "0.1.0"); got != "" {
		t.Errorf("nil review: got %q, want empty", got)
	}
}
