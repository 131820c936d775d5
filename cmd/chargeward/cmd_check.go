package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"strconv"
	"strings"

	"chargeward/report"
	"chargeward/rules"
	"chargeward/schema"
)

var checkCommand = command{name: "check", summary: "validate rigs, compute their hazards and judge them against the rulebook", run: runCheck}

const checkUsage = `Usage: chargeward check [options] RIG...

Reads each rig description (a YAML file, or - for standard input), validates it against the rig schema,
computes the hazard physics and judges it against the rulebook and the threshold policy (the embedded
defaults, changed by --policy and --rules site files). For one rig it prints the verdict, the findings
grouped by hazard class with their numbers and basis, and the key quantities; for several rigs one summary
line each.

Exit status: 0 when no finding reaches --fail-on, 1 when one does (for several rigs, the worst of them),
2 on bad input or a state the models cannot handle (nothing is printed on standard output for a rig that
does not load).

This tool is an engineering aid. It does not replace local codes, your institution's electrical safety
program, or the judgement of qualified, licensed persons.
`

// checkOptions are the flags of the check command.
type checkOptions struct {
	format     string
	failOnSev  rules.Severity
	failOnDisp rules.Disposition
	never      bool
	set        *rules.Set
	many       bool
}

func runCheck(args []string, e *env) error {
	fs := newFlags("check", checkUsage, e)
	format := fs.String("format", "text", "output format: text or json")
	policyFile := fs.String("policy", "", "site policy `FILE` overriding thresholds by key")
	rulesFile := fs.String("rules", "", "site rulebook `FILE` adding or disabling rules by id")
	failOn := fs.String("fail-on", "controls", "exit 1 when a finding reaches this severity (NOTICE, CAUTION, WARNING, DANGER) or disposition (advisory, controls, must-fix); never: only bad input fails")
	names, done, err := parseInterspersed(fs, args, e) // flags may follow the rig files
	if done {
		return err
	}
	if len(names) == 0 {
		fmt.Fprintln(e.stderr, "chargeward check: name at least one rig file (or - for standard input)")
		fs.Usage()
		return exitError{exitBadInput}
	}
	o := checkOptions{format: *format, many: len(names) > 1}
	if o.format != "text" && o.format != "json" {
		fmt.Fprintf(e.stderr, "chargeward check: --format takes text or json, not %q\n", o.format)
		return exitError{exitBadInput}
	}
	if *failOn == "never" {
		o.never = true
	} else {
		var ok bool
		o.failOnSev, o.failOnDisp, ok = rules.ParseSeverityOrDisposition(*failOn)
		if !ok {
			fmt.Fprintf(e.stderr, "chargeward check: --fail-on takes a severity (NOTICE, CAUTION, WARNING, DANGER), a disposition (advisory, controls, must-fix) or never, not %q\n", *failOn)
			return exitError{exitBadInput}
		}
	}
	set, err := loadRuleSet(*policyFile, *rulesFile, e)
	if err != nil {
		return err
	}
	o.set = set
	worst := exitOK
	var docs []json.RawMessage
	pre := judgeAll(names, o.set) // several rigs: loaded and judged on both cores, printed in order
	for i, name := range names {
		rv, err := checkOne(name, e, o, pre[i])
		if err != nil {
			worst = max(worst, code(err, e.stderr))
			continue
		}
		if o.many && o.format == "json" {
			var b bytes.Buffer
			if err := report.JSON(&b, rv, report.Options{Version: Version}); err != nil {
				return err
			}
			docs = append(docs, json.RawMessage(b.Bytes()))
		}
		if o.reaches(rv) {
			worst = max(worst, exitFindings)
		}
	}
	if len(docs) > 0 {
		if err := writeJSON(e.stdout, docs); err != nil {
			return err
		}
	}
	if worst != exitOK {
		return exitError{worst}
	}
	return nil
}

// reaches reports whether any finding of the review is at or above --fail-on.
func (o checkOptions) reaches(rv *rules.Review) bool {
	if o.never {
		return false
	}
	for _, f := range rv.Findings {
		if (o.failOnSev != rules.SeverityInvalid && f.Severity >= o.failOnSev) ||
			(o.failOnDisp != rules.DispositionInvalid && f.Disposition >= o.failOnDisp) {
			return true
		}
	}
	return false
}

// checkOne runs the stages for one rig: load → assess → evaluate → render.
func checkOne(name string, e *env, o checkOptions, pre *judged) (*rules.Review, error) {
	var rig *schema.Rig
	var rv *rules.Review
	var err error
	if pre != nil {
		e.stderr.Write(pre.stderr.Bytes())
		rig, rv, err = pre.rig, pre.rv, pre.err
	} else {
		rig, rv, err = loadAndJudge(name, e, o.set)
	}
	if err != nil {
		return nil, err
	}
	switch {
	case o.many && o.format == "json":
		return rv, nil // written together by runCheck
	case o.many:
		bySev, _ := rv.Counts()
		fmt.Fprintf(e.stdout, "%s: %s — %s (%s; %d DANGER, %d WARNING, %d CAUTION, %d NOTICE)\n", name, strings.ToUpper(rv.Verdict.String()),
			orUnnamed(rig.Rig.Name), plural(len(rv.Findings), "finding"), bySev[rules.Danger], bySev[rules.Warning], bySev[rules.Caution], bySev[rules.Notice])
		return rv, nil
	case o.format == "json":
		return rv, report.JSON(e.stdout, rv, report.Options{Version: Version})
	}
	if err := renderRigSummary(e.stdout, name, rig); err != nil {
		return nil, err
	}
	fmt.Fprintln(e.stdout)
	return rv, report.Text(e.stdout, rv, report.Options{Version: Version})
}

// judge computes a rig's hazards and evaluates the rulebook, with the targets of the bank's voltage class
// (rules.Set.Judge).
func judge(rig *schema.Rig, set *rules.Set) (*rules.Review, error) { return set.Judge(rig) }

func orUnnamed(s string) string {
	if s == "" {
		return "unnamed rig"
	}
	return strconv.Quote(s)
}

// renderRigSummary prints what was loaded: identification, the bank, and which sections are stated.
func renderRigSummary(w io.Writer, name string, r *schema.Rig) error {
	var b strings.Builder
	fmt.Fprintf(&b, "%s: %q, revision %s\n", name, r.Rig.Name, r.Rig.Revision)
	if r.Rig.Kind != "" {
		fmt.Fprintf(&b, "  kind        %s\n", r.Rig.Kind)
	}
	series, parallel := deref(r.Bank.Series, 1), deref(r.Bank.Parallel, 1)
	fmt.Fprintf(&b, "  bank        %d series × %d parallel cells of %s, rated %s each\n",
		series, parallel, report.SI(*r.Bank.Capacitance, "F"), report.SI(*r.Bank.VoltageRating, "V"))
	stated, missing := sections(r)
	fmt.Fprintf(&b, "  stated      %s\n", strings.Join(stated, ", "))
	if len(missing) > 0 {
		fmt.Fprintf(&b, "  not stated  %s\n", strings.Join(missing, ", "))
	}
	_, err := io.WriteString(w, b.String())
	return err
}

func deref(p *int, def int) int {
	if p == nil {
		return def
	}
	return *p
}

// sections lists the optional sections the rig states and those it leaves out.
func sections(r *schema.Rig) (stated, missing []string) {
	for _, s := range []struct {
		name string
		ok   bool
	}{
		{"supply", r.Supply != nil}, {"bank", true}, {"bleeder", r.Bleeder != nil}, {"dump", r.Dump != nil},
		{"switch", r.Switch != nil}, {"coil", r.Coil != nil}, {"wiring", r.Wiring != nil},
		{"projectile", r.Projectile != nil}, {"room", r.Room != nil}, {"controls", r.Controls != nil},
		{"measurements", r.Measurements != nil},
	} {
		if s.ok {
			stated = append(stated, s.name)
		} else {
			missing = append(missing, s.name)
		}
	}
	return stated, missing
}
