package rules

import (
	"crypto/sha256"
	_ "embed"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"slices"
	"strings"
	"sync"

	"chargeward/hazards"
)

// The embedded defaults and their schemas.
var (
	//go:embed rulebook.yaml
	defaultRulebook []byte
	//go:embed policy.yaml
	defaultPolicy []byte
	//go:embed rulebook.schema.json
	RulebookSchema []byte
	//go:embed policy.schema.json
	PolicySchema []byte
)

// Names under which the embedded defaults appear in diagnostics.
const (
	DefaultRulebookName = "<default rulebook>"
	DefaultPolicyName   = "<default policy>"
)

// Schema identifiers.
const (
	RulebookSchemaID = "https://chargeward.example/schema/rulebook.schema.json"
	PolicySchemaID   = "https://chargeward.example/schema/policy.schema.json"
)

var (
	defaultOnce  sync.Once
	defaultSet   *Set
	defaultNS    *namespace
	defaultDiags Diagnostics
)

// Set is a compiled rulebook and policy, ready to evaluate assessments. It is safe for concurrent use.
type Set struct {
	policy    *Policy
	rules     []*Rule
	hazards   []HazardClass
	checklist []ChecklistItem // always-present items
	disabled  []DisabledRule

	rulebookDigest, policyDigest string
}

// Default returns the embedded rulebook and policy.
func Default() (*Set, error) { return Load("", nil, "", nil) }

// Load compiles a rulebook and policy: the embedded defaults, overridden by the site policy (policyData,
// entries by key, each with its basis) and extended by the site rulebook (rulesData: added rules, rules
// disabled by id, checklist items). Nil data means no site file. Every problem found is returned together
// as Diagnostics with file, line and column.
func Load(policyName string, policyData []byte, rulesName string, rulesData []byte) (*Set, error) {
	// The embedded defaults are parsed and compiled once: a site policy changes values, never the keys a
	// condition may name, so the namespace and the compiled default rules are the same for every load, and
	// compiled programs are read-only and safe to share.
	defaultOnce.Do(loadDefaults)
	if defaultDiags != nil {
		return nil, defaultDiags // the embedded files are tested; a failure here is a build defect
	}
	pol := defaultSet.policy.clone()
	var all Diagnostics
	if policyData != nil {
		if policyName == "" {
			policyName = "<site policy>"
		}
		root, ds := readFile(policyName, policyData, PolicySchemaID, PolicySchema)
		if ds == nil {
			var site *Policy
			site, ds = parsePolicy(policyName, root, defaultSet.policy)
			if ds == nil {
				pol = site
			}
		}
		all = append(all, ds...)
	}
	s := &Set{policy: pol}
	s.rules = append([]*Rule(nil), defaultSet.rules...)
	s.hazards = defaultSet.hazards
	s.checklist = append([]ChecklistItem(nil), defaultSet.checklist...)
	if rulesData != nil {
		if rulesName == "" {
			rulesName = "<site rulebook>"
		}
		all = append(all, s.addRulebook(rulesName, rulesData, defaultNS, true)...)
	}
	if len(all) > 0 {
		return nil, all
	}
	s.digest()
	return s, nil
}

// loadDefaults parses the embedded policy and compiles the embedded rulebook.
func loadDefaults() {
	root, ds := readFile(DefaultPolicyName, defaultPolicy, PolicySchemaID, PolicySchema)
	if ds != nil {
		defaultDiags = ds
		return
	}
	pol, ds := parsePolicy(DefaultPolicyName, root, nil)
	if ds != nil {
		defaultDiags = ds
		return
	}
	defaultNS = newNamespace(pol)
	d := &Set{policy: pol}
	if ds := d.addRulebook(DefaultRulebookName, defaultRulebook, defaultNS, false); ds != nil {
		defaultDiags = ds
		return
	}
	defaultSet = d
}

// addRulebook reads one rulebook file into the set.
func (s *Set) addRulebook(name string, data []byte, ns *namespace, site bool) Diagnostics {
	root, ds := readFile(name, data, RulebookSchemaID, RulebookSchema)
	if ds != nil {
		return ds
	}
	var rf rulebookFile
	if err := root.Decode(&rf); err != nil {
		return Diagnostics{errAt(name, root.Line, root.Column, CodeRuleSchema, err.Error(), "")}
	}
	c := &ruleCompiler{name: name, raw: strings.Split(string(data), "\n"), ns: ns}
	if site && len(rf.Hazards) > 0 {
		n, _ := nodeAt(root, "/hazards")
		c.diag(n, CodeHazard, "a site rulebook cannot define hazard classes", "use one of the classes listed by 'chargeward rules'")
	}
	if !site {
		s.hazards = rf.Hazards
	}
	known := map[string]bool{}
	for _, h := range s.hazards {
		known[h.ID] = true
	}
	ids := map[string]bool{}
	for _, r := range s.rules {
		ids[r.ID] = true
	}
	// Disabling first, so that a site can replace a rule by disabling it and adding its own under a new id.
	for i, d := range rf.Disable {
		n, _ := nodeAt(root, fmt.Sprintf("/disable/%d/id", i))
		if !ids[d.ID] {
			c.diag(n, CodeUnknownRule, fmt.Sprintf("no rule %q to disable%s", d.ID, suggest(d.ID, sortedKeys(ids))), "list the rules with 'chargeward rules'")
			continue
		}
		var kept []*Rule // a new slice: the compiled defaults are shared between sets
		for _, r := range s.rules {
			if r.ID != d.ID {
				kept = append(kept, r)
			}
		}
		s.rules = kept
		s.disabled = append(s.disabled, DisabledRule{ID: d.ID, Reason: d.Reason, Origin: name})
	}
	if site && len(rf.Disable) > 0 && !slices.ContainsFunc(s.rules, func(r *Rule) bool { return r.Origin == DefaultRulebookName }) {
		// A review that judges nothing would read "ready" for any rig: refused, not passed.
		n, key := nodeAt(root, "/disable")
		if key != nil {
			n = key
		}
		c.diag(n, CodeDisableAll, "the site rulebook disables every rule of the default rulebook",
			"a review with no default rules would call any rig ready; disable only the rules your site replaces, each with its reason")
	}
	for i := range rf.Rules {
		node := &rf.Rules[i]
		idNode, _ := nodeAt(node, "/id")
		id := idNode.Value
		if ids[id] {
			c.diag(idNode, CodeDuplicate, fmt.Sprintf("rule id %q is already in use", id), "give the rule an id of its own, or disable the existing rule first")
			continue
		}
		if hn, _ := nodeAt(node, "/hazard"); !known[hn.Value] {
			c.diag(hn, CodeHazard, fmt.Sprintf("unknown hazard class %q%s", hn.Value, suggest(hn.Value, sortedKeys(known))), "use one of the classes listed by 'chargeward rules'")
			continue
		}
		ids[id] = true
		if r := c.compileRule(node); r != nil {
			s.rules = append(s.rules, r)
		}
	}
	for i := range rf.Checklist {
		var it struct {
			Phase    string `yaml:"phase"`
			Text     string `yaml:"text"`
			Measured string `yaml:"measured"`
			Step     int    `yaml:"step"`
		}
		if err := rf.Checklist[i].Decode(&it); err != nil {
			c.diag(&rf.Checklist[i], CodeRuleSchema, err.Error(), "")
			continue
		}
		s.checklist = append(s.checklist, ChecklistItem{Phase: parsePhase(it.Phase), Text: strings.TrimSpace(it.Text), Measured: it.Measured, Step: stepOr(it.Step)})
	}
	return c.ds
}

// digest computes the SHA-256 of the canonical rulebook and policy in force.
func (s *Set) digest() {
	rb, _ := json.Marshal(struct {
		Hazards   []HazardClass
		Rules     []*Rule
		Checklist []ChecklistItem
		Disabled  []DisabledRule
	}{s.hazards, s.rules, s.checklist, s.disabled})
	h := sha256.Sum256(rb)
	s.rulebookDigest = hex.EncodeToString(h[:])
	pb, _ := json.Marshal(s.policy.Entries())
	h = sha256.Sum256(pb)
	s.policyDigest = hex.EncodeToString(h[:])
}

// Rules returns the rules in force, in rulebook order.
func (s *Set) Rules() []Rule {
	out := make([]Rule, len(s.rules))
	for i, r := range s.rules {
		out[i] = *r
	}
	return out
}

// HazardClasses returns the hazard classes in the order findings are grouped.
func (s *Set) HazardClasses() []HazardClass { return append([]HazardClass(nil), s.hazards...) }

// Disabled returns the default rules a site rulebook disabled.
func (s *Set) Disabled() []DisabledRule { return append([]DisabledRule(nil), s.disabled...) }

// Policy returns the thresholds in force.
func (s *Set) Policy() *Policy { return s.policy }

// Overrides lists the site policy's changes beside the reference values.
func (s *Set) Overrides() []Override { return s.policy.overrides() }

// Names lists every name a condition may use with its kind and unit, for 'chargeward rules --names'.
func (s *Set) Names() [][3]string {
	ns := newNamespace(s.policy)
	var out [][3]string
	for _, n := range sortedKeys(ns.leaves) {
		if strings.HasPrefix(n, "worst.") || strings.HasPrefix(n, "gap.") {
			continue
		}
		out = append(out, [3]string{n, ns.leaves[n].kind.String(), ns.leaves[n].unit})
	}
	return out
}

// Targets returns the policy values the physics computes against. TimeAllowed is the limit for banks of
// up to residual.class_boundary (1000 V); TargetsFor picks it by the bank voltage.
func (s *Set) Targets() hazards.Targets {
	t := hazards.DefaultTargets()
	v := func(k string, into *float64) {
		if x, ok := s.policy.Value(k); ok {
			*into = x
		}
	}
	v("residual.safe_voltage", &t.SafeVoltage)
	v("residual.time_low", &t.TimeAllowed)
	v("field.implant_limit", &t.ImplantFluxLimit)
	v("derating.resistor_power", &t.Derating)
	v("ambient.reference", &t.ReferenceAmbient)
	v("launch.default_tilt", &t.LaunchTilt)
	return t
}

// TargetsFor is Targets with TimeAllowed chosen by the voltage class of a bank charged to bankVoltage:
// up to residual.class_boundary, residual.time_low (NEC 460.6(A)); above it residual.time_high (460.28(A)).
func (s *Set) TargetsFor(bankVoltage float64) hazards.Targets {
	t := s.Targets()
	if b, ok := s.policy.Value("residual.class_boundary"); ok && bankVoltage > b {
		if h, ok := s.policy.Value("residual.time_high"); ok {
			t.TimeAllowed = h
		}
	}
	return t
}
