package rules

import (
	"errors"
	"fmt"
	"sort"
	"strings"

	"github.com/expr-lang/expr/vm"

	"chargeward/hazards"
)

// Evaluate judges one assessment: every rule in force is applied, each gap of the assessment becomes a
// finding, and the verdict and checklist follow. A rule whose condition reads an input the rig does not
// state (or the physics could not compute) yields a finding that it could not be checked, naming what to
// add: missing information is never safe. The error is non-nil only for a defect of the rule set (a
// condition that fails at run time), never for the rig.
func (s *Set) Evaluate(a *hazards.Assessment) (rv *Review, err error) {
	if a == nil {
		return nil, errors.New("rules: nil assessment")
	}
	defer func() {
		if p := recover(); p != nil { // a panic never crosses the package boundary
			rv, err = nil, fmt.Errorf("rules: evaluation failed: %v", p)
		}
	}()
	env := newEnv(a, s.policy)
	var findings []Finding
	named := map[string]bool{} // rig fields already named by a could-not-be-checked finding
	var gapRule, loosenedRule *Rule
	for _, r := range s.rules {
		if r.Gaps {
			gapRule = r
			continue
		}
		if r.Loosened {
			loosenedRule = r
			continue
		}
		if r.applies != nil {
			env.reset()
			out, err := vm.Run(r.applies, env)
			if err != nil {
				return nil, evalError(r, fmt.Errorf("rules: %s (%s): applies: %w", r.ID, r.Origin, err))
			}
			if len(env.missing) == 0 && out == false {
				continue
			}
		}
		env.reset()
		out, err := vm.Run(r.when, env)
		if err != nil {
			return nil, evalError(r, fmt.Errorf("rules: %s (%s): %w", r.ID, r.Origin, err))
		}
		read := append([]string(nil), env.read...)
		missing := append([]string(nil), env.missing...)
		if len(missing) > 0 {
			if r.UnknownQuiet {
				continue
			}
			f := s.unknownFinding(r, missing, read)
			for _, m := range missing {
				named[strings.TrimPrefix(m, "rig.")] = true
			}
			for _, c := range r.Covers {
				named[c] = true
			}
			findings = append(findings, f)
			continue
		}
		if out != true {
			continue
		}
		f := s.finding(r, read)
		f.Message = render(r.message, env)
		findings = append(findings, f)
		for _, c := range r.Covers {
			named[c] = true
		}
	}
	if gapRule != nil {
		for _, g := range a.Gaps {
			if named[g.Field] {
				continue // already named by a rule that could not be checked
			}
			g := g
			env.gap = &g
			f := s.finding(gapRule, nil)
			f.Fields = []string{g.Field}
			f.Message = render(gapRule.message, env)
			findings = append(findings, f)
		}
		env.gap = nil
	}
	overrides := s.policy.overrides()
	if loosenedRule != nil {
		for _, ov := range overrides {
			if !ov.Looser {
				continue
			}
			ov := ov
			env.override = &ov
			f := s.finding(loosenedRule, nil)
			f.Message = render(loosenedRule.message, env)
			findings = append(findings, f)
		}
		env.override = nil
	}
	s.sortFindings(findings)
	rv = &Review{
		Assessment:     a,
		Findings:       findings,
		Verdict:        verdict(findings),
		Checklist:      s.buildChecklist(findings),
		Overrides:      overrides,
		Thresholds:     s.policy.thresholds(),
		RulebookDigest: s.rulebookDigest,
		PolicyDigest:   s.policyDigest,
		RuleCount:      len(s.rules),
		HazardClasses:  s.HazardClasses(),
		Disabled:       s.Disabled(),
	}
	return rv, nil
}

// evalError is a condition that compiled but failed when run (expr's memory budget, a runtime type error):
// a diagnostic at the rule's condition in its rulebook, so a site can find it like a load error.
func evalError(r *Rule, err error) error {
	return Diagnostics{errAt(r.Origin, max(r.whenAt.line, 1), max(r.whenAt.col, 1), CodeEval, err.Error(),
		"the condition compiled but failed on this rig; keep conditions to comparisons of the listed names")}
}

func (s *Set) finding(r *Rule, read []string) Finding {
	f := Finding{Rule: r.ID, Hazard: r.Hazard, Title: r.Title, Severity: r.Severity, Disposition: r.Disposition, Basis: r.Basis}
	for _, c := range r.Controls {
		f.Controls = append(f.Controls, c.Text)
	}
	f.Quantities, f.Fields = splitRead(read)
	return f
}

func splitRead(read []string) (quantities, fields []string) {
	for _, p := range read {
		switch {
		case strings.HasPrefix(p, "rig."):
			fields = append(fields, strings.TrimPrefix(p, "rig."))
		case strings.HasPrefix(p, "policy."), strings.HasPrefix(p, "limit."), strings.HasPrefix(p, "gap."):
		default:
			q := strings.TrimPrefix(p, "worst.")
			if !contains(quantities, q) {
				quantities = append(quantities, q)
			}
		}
	}
	return quantities, fields
}

func contains(s []string, x string) bool {
	for _, v := range s {
		if v == x {
			return true
		}
	}
	return false
}

// unknownFinding reports a rule that could not be checked, naming what to add.
func (s *Set) unknownFinding(r *Rule, missing, read []string) Finding {
	f := s.finding(r, read)
	f.Severity, f.Disposition = r.UnknownSeverity, r.UnknownDisposition
	var facts, qs []string
	for _, m := range missing {
		switch {
		case strings.HasPrefix(m, "rig."):
			facts = append(facts, strings.TrimPrefix(m, "rig."))
		case m == "limit.eye_speed" || m == "limit.eye_energy":
			if !contains(facts, "controls.eye_protection") {
				facts = append(facts, "controls.eye_protection")
			}
		case m == "limit.projectile_range":
			qs = append(qs, "launch.speed")
		case m == "limit.peak_current":
			qs = append(qs, "pulse.peak_current")
		case m == "limit.decay_predicted":
			qs = append(qs, "discharge.decay_time_predicted")
		case strings.HasPrefix(m, "limit."):
			qs = append(qs, m)
		default:
			q := strings.TrimPrefix(m, "worst.")
			if !contains(qs, q) {
				qs = append(qs, q)
			}
		}
	}
	var parts []string
	if len(facts) > 0 {
		parts = append(parts, "the rig does not state "+strings.Join(facts, ", ")+"; add it to the rig file")
	}
	if len(qs) > 0 {
		parts = append(parts, "the assessment has no "+strings.Join(qs, ", ")+" (see the missing information listed in the review)")
	}
	f.Title = r.Title + " (could not be checked)"
	f.Message = fmt.Sprintf("Could not be checked: %s. Until it is, treat the rig as if this rule applied.", strings.Join(parts, "; "))
	return f
}

func verdict(fs []Finding) Verdict {
	v := Ready
	for _, f := range fs {
		switch f.Disposition {
		case MustFix:
			return NotReady
		case Controls:
			v = ReadyWithControls
		}
	}
	return v
}

// sortFindings orders by hazard class (rulebook order), then severity (most severe first), then rule id,
// then message (gap findings share a rule id).
func (s *Set) sortFindings(fs []Finding) {
	order := map[string]int{}
	for i, h := range s.hazards {
		order[h.ID] = i
	}
	sort.SliceStable(fs, func(i, j int) bool {
		a, b := fs[i], fs[j]
		if order[a.Hazard] != order[b.Hazard] {
			return order[a.Hazard] < order[b.Hazard]
		}
		if a.Severity != b.Severity {
			return a.Severity > b.Severity
		}
		if a.Rule != b.Rule {
			return a.Rule < b.Rule
		}
		return a.Message < b.Message
	})
}

// buildChecklist merges the always-present items with the controls of every finding, de-duplicated by
// text (the first phase, step and measured field win; the rule ids are collected), ordered by phase, then
// by step within the phase, then always-present items before the findings' in the order they are listed.
func (s *Set) buildChecklist(fs []Finding) []ChecklistItem {
	var items []ChecklistItem
	index := map[string]int{}
	add := func(it ChecklistItem, from string) {
		key := strings.ToLower(strings.Join(strings.Fields(it.Text), " "))
		if i, ok := index[key]; ok {
			if from != "" && !contains(items[i].From, from) {
				items[i].From = append(items[i].From, from)
			}
			if items[i].Measured == "" {
				items[i].Measured = it.Measured
			}
			return
		}
		index[key] = len(items)
		if from != "" {
			it.From = []string{from}
		}
		items = append(items, it)
	}
	for _, it := range s.checklist {
		add(it, "")
	}
	rules := map[string]*Rule{}
	for _, r := range s.rules {
		rules[r.ID] = r
	}
	for _, f := range fs {
		r := rules[f.Rule]
		if r == nil {
			continue
		}
		for _, c := range r.Controls {
			add(ChecklistItem{Phase: c.Phase, Text: c.Text, Measured: c.Measured, Step: c.Step}, f.Rule)
		}
	}
	sort.SliceStable(items, func(i, j int) bool {
		if items[i].Phase != items[j].Phase {
			return items[i].Phase < items[j].Phase
		}
		return items[i].Step < items[j].Step
	})
	return items
}
