// Package rules judges an assessment against a rulebook and a threshold policy, both data: an embedded default
// rulebook and policy in YAML, optionally overridden by a site's own files. It yields a Review: findings with
// their basis, a verdict, and the procedure checklist.
package rules

import "chargeward/hazards"

// Severity uses the trade's signal words (ANSI Z535.4 / ISO 3864-2 usage), most severe first.
type Severity int

// Severities; the zero value is invalid so a missing severity never passes for a mild one.
const (
	SeverityInvalid Severity = iota
	Notice
	Caution
	Warning
	Danger
)

func (s Severity) String() string {
	switch s {
	case Danger:
		return "DANGER"
	case Warning:
		return "WARNING"
	case Caution:
		return "CAUTION"
	case Notice:
		return "NOTICE"
	}
	return "INVALID"
}

// Disposition says what a finding requires.
type Disposition int

// Dispositions; the zero value is invalid.
const (
	DispositionInvalid Disposition = iota
	Advisory                       // "advisory": worth knowing, no condition on operation
	Controls                       // "controls": operate only with the listed controls in place
	MustFix                        // "must-fix": do not operate until resolved
)

func (d Disposition) String() string {
	switch d {
	case MustFix:
		return "must-fix"
	case Controls:
		return "controls"
	case Advisory:
		return "advisory"
	}
	return "invalid"
}

// Verdict is the overall judgement of a review.
type Verdict int

// Verdicts; the zero value is invalid.
const (
	VerdictInvalid    Verdict = iota
	Ready                     // "ready"
	ReadyWithControls         // "ready with controls"
	NotReady                  // "not ready"
)

func (v Verdict) String() string {
	switch v {
	case NotReady:
		return "not ready"
	case ReadyWithControls:
		return "ready with controls"
	case Ready:
		return "ready"
	}
	return "invalid"
}

// Phase is a procedure phase of the checklist, in the order it is carried out.
type Phase int

// Phases.
const (
	PhaseInvalid Phase = iota
	SetUp              // "set-up"
	Firing             // "charging and firing"
	AfterFiring        // "after firing and shutdown"
	Storage            // "storage"
)

func (p Phase) String() string {
	switch p {
	case SetUp:
		return "set-up"
	case Firing:
		return "charging and firing"
	case AfterFiring:
		return "after firing and shutdown"
	case Storage:
		return "storage"
	}
	return "invalid"
}

// Finding is one rule that fired for a rig.
type Finding struct {
	Rule        string // rule id, e.g. "SHK-01"
	Hazard      string // hazard class, e.g. "shock"
	Title       string // short title of the rule
	Severity    Severity
	Disposition Disposition
	Message     string   // the rule's template filled with the computed numbers
	Basis       string   // published source with clause, "common practice" or "from memory"
	Controls    []string // checklist lines this finding requires
	Quantities  []string // names of the quantities the condition used
	Fields      []string // rig field paths involved (for the rig file's line numbers)
}

// ChecklistItem is one line of the procedure checklist.
type ChecklistItem struct {
	Phase    Phase
	Text     string
	Measured string   // non-empty: a value to record here, with its unit ("bank voltage before touching, V")
	From     []string // rule ids that require it; empty for always-present items
	Step     int      // order within the phase (lower first; items of equal step keep the rulebook's order)
}

// Override is one policy value that a site policy changed.
type Override struct {
	Key       string
	Reference float64 // the default policy's value, SI
	Site      float64 // the site's value, SI
	Unit      string
	Basis     string // the site's stated basis for the change
	Looser    bool   // true when the site value is less strict than the reference
}

// Threshold is one policy entry as used by the review (for listing in outputs).
type Threshold struct {
	Key        string
	Value      float64
	Unit       string
	Basis      string
	Confidence string // "found", "partial", "memory", "common practice"
}

// Review is the judged result for one rig: what the report renders. Renderers compute nothing new.
type Review struct {
	Assessment *hazards.Assessment
	Findings   []Finding // ordered by hazard class, then severity (most severe first), then rule id
	Verdict    Verdict
	Checklist  []ChecklistItem // ordered by phase
	Overrides  []Override
	Thresholds []Threshold // every policy entry in force
	// RulebookDigest and PolicyDigest are SHA-256 hex digests of the canonical rulebook and policy in force,
	// for the report's fingerprint.
	RulebookDigest string
	PolicyDigest   string
	RuleCount      int // rules in force
	// HazardClasses are the rulebook's hazard classes in the order findings are grouped, with their titles
	// (for headings: Finding.Hazard is the class id).
	HazardClasses []HazardClass
	// Disabled lists the default rules a site rulebook switched off, with its reasons; outputs list them
	// beside the policy overrides.
	Disabled []DisabledRule
}

// Counts returns the number of findings by severity and by disposition.
func (r *Review) Counts() (bySeverity map[Severity]int, byDisposition map[Disposition]int) {
	bySeverity = map[Severity]int{}
	byDisposition = map[Disposition]int{}
	for _, f := range r.Findings {
		bySeverity[f.Severity]++
		byDisposition[f.Disposition]++
	}
	return bySeverity, byDisposition
}
