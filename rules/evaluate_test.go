package rules

import (
	"reflect"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"chargeward/hazards"
)

func loadSite(t *testing.T, policyFile, rulesFile string) *Set {
	t.Helper()
	var pd, rd []byte
	if policyFile != "" {
		pd = readTestdata(t, policyFile)
	}
	if rulesFile != "" {
		rd = readTestdata(t, rulesFile)
	}
	s, err := Load(policyFile, pd, rulesFile, rd)
	if err != nil {
		t.Fatalf("site files do not load: %v", err)
	}
	return s
}

// TestSitePolicyOverrides: a site policy that lowers thresholds changes the findings, and the review lists
// every override beside the reference value.
func TestSitePolicyOverrides(t *testing.T) {
	def := mustDefault(t)
	site := loadSite(t, "policy/site-stricter.yaml", "")
	f := func() *fixture {
		f := baseFixture()
		f.set("bank.energy", 5)
		f.rig.Controls.ChargedIndicator = bptr(false)
		return f
	}
	if _, ok := findRule(evaluate(t, def, f()), "GRD-04"); ok {
		t.Errorf("default policy: got GRD-04 for a 5 J bank, want none (indicator from 10 J)")
	}
	rv := evaluate(t, site, f())
	if _, ok := findRule(rv, "GRD-04"); !ok {
		t.Errorf("site policy (indicator from 1 J): got no GRD-04, want one")
	}
	want := []Override{
		{Key: "controls.indicator_energy", Reference: 10, Site: 1, Unit: "J", Basis: "Example site rule: indicator lamps on every teaching bank (invented example)"},
		{Key: "residual.safe_voltage", Reference: 50, Site: 30, Unit: "V", Basis: "Example site rule: department electrical safety program, capacitor work, item 4 (invented example)"},
	}
	if !reflect.DeepEqual(rv.Overrides, want) {
		t.Errorf("got overrides %+v, want %+v", rv.Overrides, want)
	}
	if got := site.Targets().SafeVoltage; got != 30 {
		t.Errorf("got target safe voltage %g V, want 30 V", got)
	}
	found := false
	for _, th := range rv.Thresholds {
		if th.Key == "residual.safe_voltage" {
			found = th.Value == 30 && th.Confidence == "site"
		}
	}
	if !found {
		t.Errorf("got thresholds without the site's residual.safe_voltage of 30 V (confidence site)")
	}
	if rv.PolicyDigest == evaluate(t, def, f()).PolicyDigest {
		t.Errorf("got the same policy digest for the site policy as for the default, want them to differ")
	}
	if len(evaluate(t, def, f()).Overrides) != 0 {
		t.Errorf("default policy: got overrides, want none")
	}
}

func TestSitePolicyLooser(t *testing.T) {
	s := loadSite(t, "policy/site-looser.yaml", "")
	ov := s.Overrides()
	// "2 min" is 120 s (schema.ParseQuantity); 120 s allowed against the reference 60 s is looser.
	if len(ov) != 1 || ov[0].Key != "residual.time_low" || ov[0].Site != 120 || ov[0].Reference != 60 || !ov[0].Looser {
		t.Fatalf("got overrides %+v, want residual.time_low 120 s, reference 60 s, looser", ov)
	}
	f := baseFixture()
	f.set("discharge.time_to_safe", 90)
	if _, ok := findRule(evaluate(t, s, f), "DIS-01"); ok {
		t.Errorf("got DIS-01 at 90 s with 120 s allowed, want none")
	}
	if _, ok := findRule(evaluate(t, mustDefault(t), f), "DIS-01"); !ok {
		t.Errorf("got no DIS-01 at 90 s with the reference 60 s, want one")
	}
}

func TestSiteRulebook(t *testing.T) {
	def := mustDefault(t)
	s := loadSite(t, "", "rulebook/site-key-switch.yaml")
	if got, want := len(s.Rules()), len(def.Rules()); got != want { // one added, one disabled
		t.Errorf("got %d rules, want %d", got, want)
	}
	if d := s.Disabled(); len(d) != 1 || d[0].ID != "DIS-10" || d[0].Reason == "" {
		t.Errorf("got disabled %+v, want DIS-10 with its reason", d)
	}
	f := baseFixture()
	f.shockClass()
	f.set("bank.voltage", 300)
	f.set("discharge.time_constant", 60) // fires DIS-10 under the default rulebook
	f.rig.Controls.KeySwitch = bptr(false)
	rv := evaluate(t, s, f)
	if _, ok := findRule(rv, "DIS-10"); ok {
		t.Errorf("got DIS-10, want it disabled")
	}
	if _, ok := findRule(evaluate(t, def, f), "DIS-10"); !ok {
		t.Fatalf("default rulebook: got no DIS-10, want one (the fixture must exercise it)")
	}
	got, ok := findRule(rv, "KEY-01")
	if !ok || got.Disposition != Controls || got.Message != "The 50 J bank can be charged without the key held by the named operator." {
		t.Errorf("got KEY-01 %v %+v, want a controls finding with its message", ok, got)
	}
	if len(rv.Disabled) != 1 || rv.Disabled[0].ID != "DIS-10" || len(rv.HazardClasses) == 0 {
		t.Errorf("got review disabled %+v, %d hazard classes; want DIS-10 listed and the classes", rv.Disabled, len(rv.HazardClasses))
	}
	if rv.RulebookDigest == evaluate(t, def, f).RulebookDigest || len(rv.RulebookDigest) != 64 {
		t.Errorf("got rulebook digest %q, want a SHA-256 hex digest differing from the default's", rv.RulebookDigest)
	}
	f.rig.Controls.KeySwitch = bptr(true)
	if _, ok := findRule(evaluate(t, s, f), "KEY-01"); ok {
		t.Errorf("got KEY-01 with the key switch fitted, want none")
	}
}

// TestCouldNotBeChecked: an absent input is never read as safe.
func TestCouldNotBeChecked(t *testing.T) {
	s := mustDefault(t)
	cases := []struct {
		name    string
		change  func(f *fixture)
		rule    string
		disp    Disposition
		mention string
	}{
		{"no launch height", func(f *fixture) { delete(f.q, "launch.height") }, "PRJ-01", MustFix, "launch.height"},
		{"no ceiling height", func(f *fixture) { f.rig.Room.CeilingHeight = nil }, "PRJ-01", MustFix, "room.ceiling_height"},
		{"no room at all", func(f *fixture) { f.rig.Room = nil }, "PRJ-01", MustFix, "room.ceiling_height"},
		{"no eye protection entry", func(f *fixture) { f.rig.Controls.EyeProtection = "" }, "EYE-01", MustFix, "controls.eye_protection"},
		{"no switch ratings", func(f *fixture) { f.rig.Switch.Surge = nil }, "SWT-03", MustFix, "switch.surge_current"},
		{"no insulation class", func(f *fixture) { f.rig.Coil.InsulationClass = nil }, "COL-01", MustFix, "coil.insulation_class"},
		{"no reversal figure", func(f *fixture) { f.rig.Bank.Dielectric = "aluminium-electrolytic"; delete(f.q, "pulse.reversal") }, "BNK-06", Controls, "pulse.reversal"},
		{"no isolation stated", func(f *fixture) { f.rig.Supply.Isolation = "" }, "SUP-01", MustFix, "supply.isolation"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := baseFixture()
			c.change(f)
			rv := evaluate(t, s, f)
			got, ok := findRule(rv, c.rule)
			if !ok {
				t.Fatalf("got no %s finding, want a could-not-be-checked one; findings %v", c.rule, ids(rv))
			}
			if !strings.Contains(got.Title, "could not be checked") || got.Disposition != c.disp || !strings.Contains(got.Message, c.mention) {
				t.Errorf("got %q %v %q, want could not be checked, %v, naming %s", got.Title, got.Disposition, got.Message, c.disp, c.mention)
			}
			if rv.Verdict == Ready {
				t.Errorf("got verdict ready with information missing, want not ready or ready with controls")
			}
		})
	}
}

// TestQuietCompanions: a margin rule whose input is absent stays silent; its companion reports the gap.
func TestQuietCompanions(t *testing.T) {
	f := baseFixture()
	delete(f.q, "bank.voltage_rating")
	rv := evaluate(t, mustDefault(t), f)
	if _, ok := findRule(rv, "BNK-01"); !ok {
		t.Errorf("got no BNK-01 (could not be checked), want one")
	}
	if got, ok := findRule(rv, "BNK-02"); ok {
		t.Errorf("got companion %s %q, want it quiet", got.Rule, got.Title)
	}
}

func TestGapFindings(t *testing.T) {
	s := mustDefault(t)
	t.Run("each gap once", func(t *testing.T) {
		f := baseFixture()
		f.gaps = []hazards.Gap{{Field: "wiring.stray_inductance", Effect: "di/dt cannot be computed"}, {Field: "bank.esr", Effect: "the loop resistance is a lower bound"}}
		rv := evaluate(t, s, f)
		n := 0
		for _, x := range rv.Findings {
			if x.Rule == "INF-04" {
				n++
				if len(x.Fields) != 1 || !strings.HasPrefix(x.Message, x.Fields[0]+" is not stated: ") {
					t.Errorf("got %q fields %v, want the field named first", x.Message, x.Fields)
				}
			}
		}
		if n != 2 {
			t.Errorf("got %d gap findings, want 2", n)
		}
	})
	t.Run("named by a rule already", func(t *testing.T) {
		f := baseFixture()
		f.rig.Coil.InsulationClass = nil
		f.gaps = []hazards.Gap{{Field: "coil.insulation_class", Effect: "the class limit is unknown"}}
		if _, ok := findRule(evaluate(t, s, f), "INF-04"); ok {
			t.Errorf("got a separate gap finding for a field COL-01 already names, want none")
		}
	})
	t.Run("covered", func(t *testing.T) {
		f := baseFixture()
		f.rig.Bleeder = nil
		f.gaps = []hazards.Gap{{Field: "bleeder", Effect: "no bleeder is stated"}}
		rv := evaluate(t, s, f)
		if _, ok := findRule(rv, "INF-04"); ok {
			t.Errorf("got a separate gap finding for the bleeder, want it covered by INF-01/DIS-04")
		}
		if _, ok := findRule(rv, "DIS-04"); !ok {
			t.Errorf("got no DIS-04, want one")
		}
	})
}

func TestVerdict(t *testing.T) {
	cases := []struct {
		disps []Disposition
		want  Verdict
	}{
		{nil, Ready},
		{[]Disposition{Advisory}, Ready},
		{[]Disposition{Advisory, Controls}, ReadyWithControls},
		{[]Disposition{Controls, MustFix, Advisory}, NotReady},
		{[]Disposition{MustFix}, NotReady},
	}
	for _, c := range cases {
		var fs []Finding
		for _, d := range c.disps {
			fs = append(fs, Finding{Disposition: d})
		}
		if got := verdict(fs); got != c.want {
			t.Errorf("verdict(%v): got %v, want %v", c.disps, got, c.want)
		}
	}
}

func TestChecklist(t *testing.T) {
	f := baseFixture()
	f.shockClass()
	f.rig.Controls.VerifyBeforeTouch = bptr(false)
	rv := evaluate(t, mustDefault(t), f)
	const measure = "Measure the bank voltage at its terminals with a meter rated for it before touching any conductor"
	n := 0
	for i, it := range rv.Checklist {
		if i > 0 && it.Phase < rv.Checklist[i-1].Phase {
			t.Errorf("item %d (%v) after %v: want phase order", i, it.Phase, rv.Checklist[i-1].Phase)
		}
		if it.Text == measure {
			n++
			if it.Measured != "bank voltage before touching, V" || !reflect.DeepEqual(it.From, []string{"SHK-01", "DIS-09"}) {
				t.Errorf("got %+v, want the measured field and From [SHK-01 DIS-09]", it)
			}
		}
	}
	if n != 1 {
		t.Errorf("got the measuring step %d times, want once (de-duplicated)", n)
	}
	var timed, storage bool
	for _, it := range rv.Checklist {
		timed = timed || it.Measured == "time to safe voltage, s"
		storage = storage || it.Phase == Storage
	}
	// Procedure order within the after-firing phase: disconnect, measure, then short.
	pos := map[string]int{}
	for i, it := range rv.Checklist {
		pos[it.Text] = i
	}
	if !(pos["Switch off and disconnect the charger"] < pos[measure] && pos[measure] < pos["Apply the grounding hook across the bank terminals and leave it on while handling"]) {
		t.Errorf("got after-firing order %v, want disconnect, measure, then short", pos)
	}
	if !timed || !storage {
		t.Errorf("got time-to-safe field %v, storage items %v; want both always present", timed, storage)
	}
}

func TestDeterministic(t *testing.T) {
	s := mustDefault(t)
	f := baseFixture()
	f.shockClass()
	f.rig.Controls.Enclosure = "none"
	a, b := evaluate(t, s, f), evaluate(t, s, f)
	if !reflect.DeepEqual(a.Findings, b.Findings) || !reflect.DeepEqual(a.Checklist, b.Checklist) || a.RulebookDigest != b.RulebookDigest {
		t.Errorf("got different reviews for the same input, want identical")
	}
	s2 := mustDefault(t)
	if s2.rulebookDigest != s.rulebookDigest || s2.policyDigest != s.policyDigest {
		t.Errorf("got different digests for two loads of the defaults, want identical")
	}
}

func TestFindingOrder(t *testing.T) {
	f := baseFixture()
	f.shockClass()
	f.rig.Controls.Enclosure = "none"
	f.rig.Controls.Discharge = "screwdriver"
	f.rig.Controls.VerifyBeforeTouch = bptr(false)
	s := mustDefault(t)
	rv := evaluate(t, s, f)
	order := map[string]int{}
	for i, h := range s.HazardClasses() {
		order[h.ID] = i
	}
	for i := 1; i < len(rv.Findings); i++ {
		p, q := rv.Findings[i-1], rv.Findings[i]
		if order[p.Hazard] > order[q.Hazard] || (p.Hazard == q.Hazard && p.Severity < q.Severity) {
			t.Errorf("finding %s (%s %v) before %s (%s %v): want hazard order, then most severe first", p.Rule, p.Hazard, p.Severity, q.Rule, q.Hazard, q.Severity)
		}
	}
}

func TestPolicyEntries(t *testing.T) {
	conf := map[string]bool{"found": true, "partial": true, "memory": true, "common practice": true}
	for _, e := range mustDefault(t).Policy().Entries() {
		if e.Basis == "" || !conf[e.Confidence] || (e.Stricter != "lower" && e.Stricter != "higher") || e.Unit == "" {
			t.Errorf("%s: got basis %q confidence %q stricter %q unit %q, want all stated", e.Key, e.Basis, e.Confidence, e.Stricter, e.Unit)
		}
	}
}

// TestEyeImpactEnergies: the policy's impact energies follow from the ANSI/ISEA Z87.1 test ball, a 6.35 mm
// steel ball (density 7850 kg/m³, common practice) at the class speed: E = ½·ρ·(π/6)d³·v².
func TestEyeImpactEnergies(t *testing.T) {
	p := mustDefault(t).Policy()
	const d, rho = 6.35e-3, 7850.0
	m := rho * 3.141592653589793 / 6 * d * d * d
	for _, k := range []string{"spectacles", "goggles", "faceshield"} {
		v, _ := p.Value("eye." + k + "_speed")
		e, _ := p.Value("eye." + k + "_energy")
		// 1e-3 relative: the policy states the energies to four figures.
		if want := 0.5 * m * v * v; !scalar.EqualWithinRel(e, want, 1e-3) {
			t.Errorf("%s: got %g J, want %g J", k, e, want)
		}
	}
}

// TestTargetsByVoltageClass: NEC 460.6(A) allows 1 min up to 1000 V, 460.28(A) 5 min above.
func TestTargetsByVoltageClass(t *testing.T) {
	s := mustDefault(t)
	for _, c := range []struct{ v, want float64 }{{400, 60}, {1000, 60}, {1200, 300}} {
		if got := s.TargetsFor(c.v).TimeAllowed; got != c.want {
			t.Errorf("TargetsFor(%g V): got %g s, want %g s", c.v, got, c.want)
		}
	}
	if got := s.Targets(); got.SafeVoltage != 50 || got.ImplantFluxLimit != 0.5e-3 || got.Derating != 0.5 {
		t.Errorf("got targets %+v, want 50 V, 0.5 mT, 0.5", got)
	}
}

func TestFormatQuantity(t *testing.T) {
	cases := []struct {
		v    float64
		unit string
		want string
	}{
		{0.0022, "F", "2.20 mF"},
		{2200e-6, "F", "2.20 mF"},
		{1.5e8, "A/s", "150 A/µs"},
		{0.25, "%", "25 %"},
		{403.15, "°C", "130 °C"},
		{3.2, "x", "3.20×"},
		{999.6, "V", "1.00 kV"},
		{50, "V", "50 V"},
		{0.5e-3, "T", "500 µT"},
		{51e3, "A²s", "51 kA²s"},
		{0.0873, "°", "5.00°"},
		{0.012, "kg", "12 g"},
		{2, "1", "2"},
		{293.15, "K", "293 K"},
	}
	for _, c := range cases {
		if got := FormatQuantity(c.v, c.unit); got != c.want {
			t.Errorf("FormatQuantity(%g, %q): got %q, want %q", c.v, c.unit, got, c.want)
		}
	}
}

// TestSiteChecklistAndUnknownControls: a site rulebook's checklist items join the always-present ones, and a
// rule that could not be checked still puts its controls on the checklist (treated as if it applied).
func TestSiteChecklistAndUnknownControls(t *testing.T) {
	site := []byte("checklist:\n  - {phase: storage, text: \"Log the bank's state in the lab book\", step: 5}\n")
	s, err := Load("", nil, "site.yaml", site)
	if err != nil {
		t.Fatal(err)
	}
	f := baseFixture()
	f.rig.Room.CeilingHeight = nil // PRJ-01 cannot be checked
	rv := evaluate(t, s, f)
	var logged, lowered bool
	for _, it := range rv.Checklist {
		logged = logged || (it.Text == "Log the bank's state in the lab book" && it.Phase == Storage && len(it.From) == 0)
		lowered = lowered || (len(it.From) == 1 && it.From[0] == "PRJ-01")
	}
	if !logged || !lowered {
		t.Errorf("got site item %v, PRJ-01 control %v; want both on the checklist", logged, lowered)
	}
}

// TestConcurrentEvaluate: one Set judges several assessments at once (run with -race to check sharing).
func TestConcurrentEvaluate(t *testing.T) {
	s := mustDefault(t)
	want := evaluate(t, s, baseFixture())
	done := make(chan *Review, 8)
	for i := 0; i < 8; i++ {
		a := baseFixture().assessment(t)
		go func() {
			rv, err := s.Evaluate(a)
			if err != nil {
				rv = nil
			}
			done <- rv
		}()
	}
	for i := 0; i < 8; i++ {
		if rv := <-done; rv == nil || !reflect.DeepEqual(rv.Findings, want.Findings) || !reflect.DeepEqual(rv.Checklist, want.Checklist) {
			t.Errorf("got a different review from a concurrent evaluation, want identical")
		}
	}
}
