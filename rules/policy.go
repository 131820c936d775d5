package rules

import (
	"fmt"
	"math"
	"sort"

	"gopkg.in/yaml.v3"
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
	Value      float64 `yaml:"value"`
	Unit       string  `yaml:"unit"`
	Basis      string  `yaml:"basis"`
	Confidence string  `yaml:"confidence"`
	Stricter   string  `yaml:"stricter"`
	Note       string  `yaml:"note"`
}

// parsePolicy reads a policy file already validated against its schema. reference is nil for the
// default policy; for a site policy it is the default, and each key must exist in it with the same unit.
func parsePolicy(name string, root *yaml.Node, reference *Policy) (*Policy, Diagnostics) {
	var pf policyFile
	if err := root.Decode(&pf); err != nil {
		return nil, Diagnostics{{File: name, Line: root.Line, Column: root.Column, Code: CodeSchema, Summary: err.Error()}}
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
			ds = append(ds, Diagnostic{File: name, Line: v.Line, Column: v.Column, Code: CodeSchema, Summary: err.Error()})
			continue
		}
		valNode, _ := nodeAt(v, "/value")
		if math.IsNaN(it.Value) || math.IsInf(it.Value, 0) {
			ds = append(ds, Diagnostic{File: name, Line: valNode.Line, Column: valNode.Column, Code: CodeSchema, Summary: fmt.Sprintf("%s: value is not a finite number", k.Value), Detail: "give a finite number in the entry's SI unit"})
			continue
		}
		if it.Basis == "" {
			ds = append(ds, Diagnostic{File: name, Line: k.Line, Column: k.Column, Code: CodeBasis, Summary: fmt.Sprintf("%s has no basis", k.Value), Detail: "state the published source with its clause, \"common practice\" or \"from memory\""})
			continue
		}
		if reference == nil {
			p.entries[k.Value] = &PolicyEntry{Key: k.Value, Value: it.Value, Unit: it.Unit, Basis: it.Basis, Confidence: it.Confidence, Stricter: it.Stricter, Note: it.Note, Reference: it.Value}
			continue
		}
		ref, ok := reference.entries[k.Value]
		if !ok {
			ds = append(ds, Diagnostic{File: name, Line: k.Line, Column: k.Column, Code: CodeUnknownKey, Summary: fmt.Sprintf("the reference policy has no threshold %q%s", k.Value, suggest(k.Value, sortedKeys(reference.entries))), Detail: "a site policy overrides existing keys; list them with 'chargeward rules --policy'"})
			continue
		}
		if it.Unit != ref.Unit {
			un, _ := nodeAt(v, "/unit")
			ds = append(ds, Diagnostic{File: name, Line: un.Line, Column: un.Column, Code: CodeUnit, Summary: fmt.Sprintf("%s: unit %q, the reference unit is %q", k.Value, it.Unit, ref.Unit), Detail: "give the value in the reference unit (SI)"})
			continue
		}
		conf := it.Confidence
		if conf == "" {
			conf = "site"
		}
		p.entries[k.Value] = &PolicyEntry{Key: k.Value, Value: it.Value, Unit: ref.Unit, Basis: it.Basis, Confidence: conf, Stricter: ref.Stricter, Note: it.Note,
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
	keys := sortedKeys(p.entries)
	sort.Strings(keys)
	for _, k := range keys {
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
