package rules

import (
	"strings"
	"testing"

	chargeward "chargeward"
	"chargeward/hazards"
	"chargeward/schema"
)

// demoReview judges one shipped demo rig (an invented scenario) with the full physics.
func demoReview(t *testing.T, s *Set, name string) *Review {
	t.Helper()
	data, err := chargeward.Demos.ReadFile("testdata/rigs/" + name + ".yaml")
	if err != nil {
		t.Fatal(err)
	}
	rig, err := schema.LoadRig(name, data)
	if err != nil {
		t.Fatalf("demo rig does not load: %v", err)
	}
	a, err := hazards.Assess(rig, s.Targets())
	if err != nil {
		t.Fatalf("Assess: %v", err)
	}
	rv, err := s.Evaluate(a)
	if err != nil {
		t.Fatalf("Evaluate: %v", err)
	}
	return rv
}

// TestDemoDiscThrower: the disc thrower's real problems are each found and judged (not merely unknown).
func TestDemoDiscThrower(t *testing.T) {
	rv := demoReview(t, mustDefault(t), "disc-thrower")
	if rv.Verdict != NotReady {
		t.Errorf("got verdict %v, want not ready", rv.Verdict)
	}
	for _, id := range []string{
		"BNK-04", // series electrolytics without balancing resistors
		"BNK-03", // so one cell exceeds its rating
		"DIS-01", // the 100 kΩ bleeder takes minutes, not one
		"BLD-01", // and dissipates more than its 2 W rating
		"BLD-03", // and sees more than its element voltage
		"SUP-03", // the doubler runs straight from the mains
		"SUP-04", // with no RCD
		"DIS-06", // discharged with a screwdriver
		"DIS-08", // no grounding hook
		"GRD-01", // no enclosure
		"GRD-03", // no interlock
		"GRD-04", // no charged indicator
		"PRJ-01", // the disc flies far above the 2.7 m ceiling
		"EYE-01", // spectacles against a disc carrying tens of joules
		"BNK-06", // the unidirectional ringing discharge reverses the electrolytics
	} {
		f, ok := findRule(rv, id)
		if !ok {
			t.Errorf("got no %s finding, want one", id)
			continue
		}
		if strings.Contains(f.Title, "could not be checked") {
			t.Errorf("%s: got %q, want it judged on the computed numbers", id, f.Message)
		}
	}
}

func TestDemoRingJumper(t *testing.T) {
	rv := demoReview(t, mustDefault(t), "ring-jumper")
	if rv.Verdict != ReadyWithControls {
		t.Errorf("got verdict %v, want ready with controls; findings:", rv.Verdict)
		for _, f := range rv.Findings {
			t.Logf("  %s %v %v: %s", f.Rule, f.Severity, f.Disposition, f.Message)
		}
	}
	if _, ok := findRule(rv, "SHK-01"); !ok {
		t.Errorf("got no SHK-01 for a 48 J bank at 400 V, want the shock class noted")
	}
}

func TestDemoFlashBank(t *testing.T) {
	rv := demoReview(t, mustDefault(t), "flash-bank")
	if rv.Verdict == NotReady {
		t.Errorf("got verdict not ready, want ready or ready with controls")
	}
	for _, f := range rv.Findings {
		if f.Severity == Danger || f.Disposition == MustFix {
			t.Errorf("got %s %v %v: %s; want only minor findings", f.Rule, f.Severity, f.Disposition, f.Message)
		}
	}
	if _, ok := findRule(rv, "SHK-01"); ok {
		t.Errorf("got SHK-01 for a bank below 10 J, want none")
	}
}

// TestDemoSitePolicy: lowering a threshold changes the ring jumper's findings, and the review lists it. The
// ring's worst-case kinetic energy is a few tenths of a joule, below the 3.06 J of the goggles' reference
// impact; a site that accepts only 0.1 J for goggles gets an eye finding.
func TestDemoSitePolicy(t *testing.T) {
	site := []byte("thresholds:\n  eye.goggles_energy:\n    value: 100 mJ\n    unit: J\n    basis: \"test site rule (invented)\"\n")
	s, err := Load("site.yaml", site, "", nil)
	if err != nil {
		t.Fatal(err)
	}
	def := demoReview(t, mustDefault(t), "ring-jumper")
	rv := demoReview(t, s, "ring-jumper")
	if _, ok := findRule(def, "EYE-01"); ok {
		t.Fatalf("default policy: got EYE-01, want none")
	}
	if f, ok := findRule(rv, "EYE-01"); !ok || strings.Contains(f.Title, "could not be checked") {
		t.Errorf("site policy (0.1 J): got EYE-01 %v %+v, want it judged", ok, f)
	}
	if rv.Verdict != NotReady {
		t.Errorf("site policy: got verdict %v, want not ready", rv.Verdict)
	}
	if len(rv.Overrides) != 1 || rv.Overrides[0].Key != "eye.goggles_energy" || rv.Overrides[0].Reference != 3.055 || rv.Overrides[0].Site != 0.1 || rv.Overrides[0].Looser {
		t.Errorf("got overrides %+v, want eye.goggles_energy 0.1 J beside 3.055 J, stricter", rv.Overrides)
	}
}
