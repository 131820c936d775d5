package rules

import (
	"fmt"
	"math"
	"strings"

	"gopkg.in/yaml.v3"

	"chargeward/schema"
)

// PolicyEntry is one threshold of the policy.
type PolicyEntry struct {
	Key        string  `json:"key"`
	Value      float64 `json:"value"` // in force, SI
	Unit       string  `json:"unit"`
	Basis      string  `json:"basis"`
	Confidence string  `json:"confidence"` // found, partial, memory, common practice, site
	// Stricter says which direction makes the review stricter: "lower" (a lower value fires more rules or
	// demands more) or "higher".
	Stricter string `json:"stricter"`
	Note     string `json:"note,omitempty"`

	Reference      float64 `json:"reference"`                 // the default policy's value
	ReferenceBasis string  `json:"reference_basis,omitempty"` // the default policy's basis, when overridden
	Overridden     bool    `json:"overridden,omitempty"`
}

// Policy is the set of thresholds in force.
type Policy struct {
	entries map[string]*PolicyEntry
}

// Value returns the threshold in force for key (SI) and whether it exists.
func (p *Policy) Value(key string) (float64, bool) {
	e, ok := p.entries[key]
	if !ok {
		return 0, false
	}
	return e.Value, true
}

// clone returns an independent copy.
func (p *Policy) clone() *Policy {
	c := &Policy{entries: make(map[string]*PolicyEntry, len(p.entries))}
	for k, e := range p.entries {
		x := *e
		c.entries[k] = &x
	}
	return c
}

// Entries returns every threshold in key order.
func (p *Policy) Entries() []PolicyEntry {
	out := make([]PolicyEntry, 0, len(p.entries))
	for _, k := range sortedKeys(p.entries) {
		out = append(out, *p.entries[k])
	}
	return out
}

type policyFile struct {
	Thresholds yaml.Node `yaml:"thresholds"`
}

type policyItem struct {
	Value      yaml.Node `yaml:"value"`
	Unit       string    `yaml:"unit"`
	Basis      string    `yaml:"basis"`
	Confidence string    `yaml:"confidence"`
	Stricter   string    `yaml:"stricter"`
	Note       string    `yaml:"note"`
}

// itemValue reads an entry's value: a number in the entry's SI unit, or a string with a unit ("30 V",
// "2 min") read by schema.ParseQuantity against that unit.
func itemValue(name, key string, it *policyItem) (float64, *Diagnostic) {
	n := &it.Value
	var v float64
	if n.Tag == "!!str" {
		x, err := schema.ParseQuantity(n.Value, it.Unit)
		if err != nil {
			d := errAt(name, n.Line, n.Column, CodeUnit, fmt.Sprintf("%s: %v", key, err), fmt.Sprintf("give a number in %s, or a value with a unit of that dimension", it.Unit))
			return 0, &d
		}
		v = x
	} else if err := n.Decode(&v); err != nil {
		d := errAt(name, n.Line, n.Column, CodeRuleSchema, fmt.Sprintf("%s: value is not a number", key), "give a number in the entry's SI unit")
		return 0, &d
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		d := errAt(name, n.Line, n.Column, CodeRuleSchema, fmt.Sprintf("%s: value is not a finite number", key), "give a finite number in the entry's SI unit")
		return 0, &d
	}
	return v, nil
}

// parsePolicy reads a policy file already validated against its schema. reference is nil for the
// default policy; for a site policy it is the default, and each key must exist in it with the same unit.
func parsePolicy(name string, root *yaml.Node, reference *Policy) (*Policy, Diagnostics) {
	var pf policyFile
	if err := root.Decode(&pf); err != nil {
		return nil, Diagnostics{errAt(name, root.Line, root.Column, CodeRuleSchema, err.Error(), "")}
	}
	p := &Policy{entries: map[string]*PolicyEntry{}}
	if reference != nil {
		for k, e := range reference.entries {
			c := *e
			p.entries[k] = &c
		}
	}
	var ds Diagnostics
	th := &pf.Thresholds
	for i := 0; i+1 < len(th.Content); i += 2 {
		k, v := th.Content[i], th.Content[i+1]
		var it policyItem
		if err := v.Decode(&it); err != nil {
			ds = append(ds, errAt(name, v.Line, v.Column, CodeRuleSchema, err.Error(), ""))
			continue
		}
		if strings.TrimSpace(it.Basis) == "" {
			ds = append(ds, errAt(name, k.Line, k.Column, CodeBasis, fmt.Sprintf("%s has no basis", k.Value), "state the published source with its clause, \"common practice\" or \"from memory\""))
			continue
		}
		if reference == nil {
			val, d := itemValue(name, k.Value, &it)
			if d != nil {
				ds = append(ds, *d)
				continue
			}
			p.entries[k.Value] = &PolicyEntry{Key: k.Value, Value: val, Unit: it.Unit, Basis: it.Basis, Confidence: it.Confidence, Stricter: it.Stricter, Note: it.Note, Reference: val}
			continue
		}
		ref, ok := reference.entries[k.Value]
		if !ok {
			ds = append(ds, errAt(name, k.Line, k.Column, CodeUnknownKey, fmt.Sprintf("the reference policy has no threshold %q%s", k.Value, suggest(k.Value, sortedKeys(reference.entries))), "a site policy overrides existing keys; list them with 'chargeward rules --policy'"))
			continue
		}
		if it.Unit != ref.Unit {
			un, _ := nodeAt(v, "/unit")
			ds = append(ds, errAt(name, un.Line, un.Column, CodeUnit, fmt.Sprintf("%s: unit %q, the reference unit is %q", k.Value, it.Unit, ref.Unit), "give the unit as the reference policy does (SI); a string value may carry a prefix, \"30 V\""))
			continue
		}
		val, d := itemValue(name, k.Value, &it)
		if d != nil {
			ds = append(ds, *d)
			continue
		}
		if val <= 0 && ref.Value > 0 {
			// Every threshold is a magnitude (a voltage, an energy, a time, a fraction of a rating): zero or
			// less would make its rules always or never fire.
			ds = append(ds, errAt(name, it.Value.Line, it.Value.Column, CodeRange, fmt.Sprintf("%s: %g %s is not positive", k.Value, val, it.Unit), "give a positive value in the entry's unit"))
			continue
		}
		conf := it.Confidence
		if conf == "" {
			conf = "site"
		}
		p.entries[k.Value] = &PolicyEntry{Key: k.Value, Value: val, Unit: ref.Unit, Basis: it.Basis, Confidence: conf, Stricter: ref.Stricter, Note: it.Note,
			Reference: ref.Reference, ReferenceBasis: ref.Basis, Overridden: true}
	}
	if len(ds) > 0 {
		return nil, ds
	}
	return p, nil
}

// overrides lists the site's changes to the reference policy, in key order.
func (p *Policy) overrides() []Override {
	var out []Override
	for _, k := range sortedKeys(p.entries) {
		e := p.entries[k]
		if !e.Overridden {
			continue
		}
		looser := e.Value > e.Reference
		if e.Stricter == "higher" {
			looser = e.Value < e.Reference
		}
		out = append(out, Override{Key: k, Reference: e.Reference, Site: e.Value, Unit: e.Unit, Basis: e.Basis, Looser: looser && e.Value != e.Reference})
	}
	return out
}

// thresholds lists every entry in force for the review.
func (p *Policy) thresholds() []Threshold {
	var out []Threshold
	for _, e := range p.Entries() {
		out = append(out, Threshold{Key: e.Key, Value: e.Value, Unit: e.Unit, Basis: e.Basis, Confidence: e.Confidence})
	}
	return out
}
