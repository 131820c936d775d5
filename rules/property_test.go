package rules

import (
	"fmt"
	"math/rand"
	"strings"
	"testing"

	"chargeward/hazards"
	"chargeward/internal/riggen"
	"chargeward/schema"
)

// TestStricterPolicyNeverImprovesVerdict is a metamorphic property over generated rigs: making any one
// threshold stricter (halving a "stricter: lower" value, doubling a "stricter: higher" one) and judging the
// same assessment can only keep or worsen the verdict, and never lowers the number of must-fix findings or
// of findings that demand something (must-fix or controls). It also checks invariants of
// every review: the verdict follows from the dispositions, every message is filled, the checklist is in
// phase and step order.
func TestStricterPolicyNeverImprovesVerdict(t *testing.T) {
	def := mustDefault(t)
	stricter := map[string]*Set{}
	for _, e := range def.Policy().Entries() {
		v := e.Value / 2
		if e.Stricter == "higher" {
			v = e.Value * 2
		}
		site := fmt.Sprintf("thresholds:\n  %s:\n    value: %g\n    unit: %q\n    basis: \"property test\"\n", e.Key, v, e.Unit)
		s, err := Load("stricter.yaml", []byte(site), "", nil)
		if err != nil {
			t.Fatalf("%s: %v", e.Key, err)
		}
		stricter[e.Key] = s
	}
	judged, worsened := 0, 0
	rng := rand.New(rand.NewSource(6)) // fixed seed: a reproducible sample
	n := 40
	if testing.Short() {
		n = 8
	}
	for i := 0; i < n; i++ {
		src := riggen.Rig(rng, riggen.Options{Launch: i%4 == 0}) // the launch simulation on a quarter of them
		rig, err := schema.LoadRig(fmt.Sprintf("gen-%d", i), []byte(src))
		if err != nil {
			t.Fatalf("generated rig %d does not load: %v\n%s", i, err, src)
		}
		a, err := hazards.Assess(rig, def.Targets())
		if err != nil {
			continue // a state the models refuse is the physics' concern, tested there
		}
		ref, err := def.Evaluate(a)
		if err != nil {
			t.Fatalf("rig %d: %v", i, err)
		}
		judged++
		checkInvariants(t, i, ref)
		for key, s := range stricter {
			rv, err := s.Evaluate(a)
			if err != nil {
				t.Fatalf("rig %d, stricter %s: %v", i, key, err)
			}
			m0, c0 := demands(ref)
			m1, c1 := demands(rv)
			if m1 < m0 || c1 < c0 {
				t.Errorf("rig %d: stricter %s: got %d must-fix and %d demanding findings, reference %d and %d; want no fewer", i, key, m1, c1, m0, c0)
			}
			if rv.Verdict > ref.Verdict || c1 > c0 {
				worsened++
			}
			if rv.Verdict < ref.Verdict {
				t.Errorf("rig %d: stricter %s: got verdict %v, reference %v; want no better", i, key, rv.Verdict, ref.Verdict)
			}
		}
	}
	// The property must be exercised: most rigs judged, and some stricter thresholds changing a verdict.
	if judged < n/2 || worsened == 0 {
		t.Errorf("got %d of %d rigs judged and %d reviews made stricter, want most judged and some stricter", judged, n, worsened)
	}
	t.Logf("%d rigs judged, %d reviews made stricter by one threshold", judged, worsened)
}

// demands counts must-fix findings and findings that demand something (must-fix or controls).
func demands(rv *Review) (mustFix, demanding int) {
	for _, f := range rv.Findings {
		switch f.Disposition {
		case MustFix:
			mustFix++
			demanding++
		case Controls:
			demanding++
		}
	}
	return mustFix, demanding
}

func checkInvariants(t *testing.T, i int, rv *Review) {
	t.Helper()
	if got := verdict(rv.Findings); got != rv.Verdict {
		t.Errorf("rig %d: got verdict %v, findings give %v", i, rv.Verdict, got)
	}
	for _, f := range rv.Findings {
		if f.Basis == "" || f.Severity == SeverityInvalid || f.Disposition == DispositionInvalid || strings.ContainsAny(f.Message, "{}") {
			t.Errorf("rig %d: got finding %+v, want basis, severity, disposition and a filled message", i, f)
		}
	}
	for j := 1; j < len(rv.Checklist); j++ {
		p, q := rv.Checklist[j-1], rv.Checklist[j]
		if p.Phase > q.Phase || (p.Phase == q.Phase && p.Step > q.Step) {
			t.Errorf("rig %d: checklist item %q before %q, want phase and step order", i, p.Text, q.Text)
		}
	}
}
