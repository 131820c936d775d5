package report

import (
	"encoding/json"
	"io"

	"chargeward/rules"
)

// The JSON document (DESIGN.md §9). Field names are a stable contract for scripts; values are SI, unprefixed.
type jsonReview struct {
	// Rig is the canonical rig (the bytes the fingerprint hashes), so a script can recompute the fingerprint.
	Rig         json.RawMessage         `json:"rig"`
	Verdict     string                  `json:"verdict"`
	Counts      jsonCounts              `json:"counts"`
	Quantities  map[string]jsonQuantity `json:"quantities"`
	Findings    []jsonFinding           `json:"findings"`
	Gaps        []jsonGap               `json:"gaps"`
	Checklist   []jsonChecklistItem     `json:"checklist"`
	Overrides   []jsonOverride          `json:"overrides"`
	Disabled    []rules.DisabledRule    `json:"disabled_rules"`
	Thresholds  []jsonThreshold         `json:"thresholds"`
	Rulebook    string                  `json:"rulebook_digest"`
	Policy      string                  `json:"policy_digest"`
	RuleCount   int                     `json:"rule_count"`
	Version     string                  `json:"version,omitempty"`
	Fingerprint string                  `json:"fingerprint,omitempty"`
}

type jsonCounts struct {
	Severity    map[string]int `json:"severity"`
	Disposition map[string]int `json:"disposition"`
}

type jsonQuantity struct {
	Value   float64     `json:"value"`
	Worst   *float64    `json:"worst"` // null when tolerances do not apply
	Unit    string      `json:"unit"`
	Formula string      `json:"formula"`
	Inputs  []jsonInput `json:"inputs"`
	Basis   string      `json:"basis"`
	Note    string      `json:"note,omitempty"`
}

type jsonInput struct {
	Symbol string  `json:"symbol"`
	Name   string  `json:"name"`
	Value  float64 `json:"value"`
	Unit   string  `json:"unit"`
}

type jsonFinding struct {
	Rule        string   `json:"rule"`
	Hazard      string   `json:"hazard"`
	Title       string   `json:"title,omitempty"`
	Severity    string   `json:"severity"`
	Disposition string   `json:"disposition"`
	Message     string   `json:"message"`
	Basis       string   `json:"basis"`
	Controls    []string `json:"controls"`
	Quantities  []string `json:"quantities"`
	Fields      []string `json:"fields"`
}

type jsonGap struct {
	Field  string `json:"field"`
	Effect string `json:"effect"`
}

type jsonChecklistItem struct {
	Phase    string   `json:"phase"`
	Text     string   `json:"text"`
	Measured string   `json:"measured,omitempty"`
	From     []string `json:"from"`
}

type jsonOverride struct {
	Key       string  `json:"key"`
	Reference float64 `json:"reference"`
	Site      float64 `json:"site"`
	Unit      string  `json:"unit"`
	Basis     string  `json:"basis"`
	Looser    bool    `json:"looser"`
}

type jsonThreshold struct {
	Key        string  `json:"key"`
	Value      float64 `json:"value"`
	Unit       string  `json:"unit"`
	Basis      string  `json:"basis"`
	Confidence string  `json:"confidence,omitempty"`
}

// nonNil returns s, or an empty slice, so that JSON shows [] rather than null for an empty list.
func nonNil[T any](s []T) []T {
	if s == nil {
		return []T{}
	}
	return s
}

// JSON writes the review as one indented JSON object (DESIGN.md §9): the canonical rig, the verdict, counts,
// every quantity by name with value, worst (null where tolerances do not apply), unit, formula, inputs and
// basis, the findings, the gaps, the checklist, the policy overrides and thresholds, and the digests. Pass
// Options with the program version to include the fingerprint. Keys of objects are sorted by encoding/json,
// so the output is deterministic.
func JSON(w io.Writer, r *rules.Review, opt ...Options) error {
	if err := check(r); err != nil {
		return err
	}
	var o Options
	if len(opt) > 0 {
		o = opt[0]
	}
	rig, err := CanonicalRig(r.Assessment.Rig)
	if err != nil {
		return err
	}
	doc := jsonReview{
		Rig:        rig,
		Verdict:    r.Verdict.String(),
		Quantities: map[string]jsonQuantity{},
		Findings:   []jsonFinding{},
		Gaps:       []jsonGap{},
		Checklist:  []jsonChecklistItem{},
		Overrides:  []jsonOverride{},
		Disabled:   append([]rules.DisabledRule{}, r.Disabled...),
		Thresholds: []jsonThreshold{},
		Rulebook:   r.RulebookDigest,
		Policy:     r.PolicyDigest,
		RuleCount:  r.RuleCount,
		Version:    o.Version,
	}
	if o.Version != "" {
		doc.Fingerprint = Fingerprint(r, o.Version)
	}
	bySev, byDisp := r.Counts()
	doc.Counts = jsonCounts{Severity: map[string]int{}, Disposition: map[string]int{}}
	for _, s := range severities {
		doc.Counts.Severity[s.String()] = bySev[s]
	}
	for _, d := range dispositions {
		doc.Counts.Disposition[d.String()] = byDisp[d]
	}
	for _, q := range r.Assessment.Quantities {
		jq := jsonQuantity{Value: q.Value, Worst: q.Worst, Unit: q.Unit, Formula: q.Formula, Basis: q.Basis,
			Note: q.Note, Inputs: []jsonInput{}}
		for _, in := range q.Inputs {
			jq.Inputs = append(jq.Inputs, jsonInput{Symbol: in.Symbol, Name: in.Name, Value: in.Value, Unit: in.Unit})
		}
		doc.Quantities[q.Name] = jq
	}
	for _, f := range r.Findings {
		doc.Findings = append(doc.Findings, jsonFinding{Rule: f.Rule, Hazard: f.Hazard, Title: f.Title,
			Severity: f.Severity.String(), Disposition: f.Disposition.String(), Message: f.Message, Basis: f.Basis,
			Controls: nonNil(f.Controls), Quantities: nonNil(f.Quantities), Fields: nonNil(f.Fields)})
	}
	for _, g := range r.Assessment.Gaps {
		doc.Gaps = append(doc.Gaps, jsonGap{Field: g.Field, Effect: g.Effect})
	}
	for _, c := range r.Checklist {
		doc.Checklist = append(doc.Checklist, jsonChecklistItem{Phase: c.Phase.String(), Text: c.Text,
			Measured: c.Measured, From: nonNil(c.From)})
	}
	for _, ov := range r.Overrides {
		doc.Overrides = append(doc.Overrides, jsonOverride{Key: ov.Key, Reference: ov.Reference, Site: ov.Site,
			Unit: ov.Unit, Basis: ov.Basis, Looser: ov.Looser})
	}
	for _, t := range r.Thresholds {
		doc.Thresholds = append(doc.Thresholds, jsonThreshold{Key: t.Key, Value: t.Value, Unit: t.Unit,
			Basis: t.Basis, Confidence: t.Confidence})
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(doc)
}
