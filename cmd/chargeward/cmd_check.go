package main

import (
	"fmt"
	"io"
	"strings"

	"chargeward/report"
	"chargeward/schema"
)

var checkCommand = command{name: "check", summary: "validate rig descriptions and summarise them", run: runCheck}

const checkUsage = `Usage: chargeward check [options] RIG...

Reads each rig description (a YAML file, or - for standard input), validates it against the rig schema and
prints a short summary. Every problem in a file is reported at its line and column.

Exit status: 0 when every rig is valid, 2 on bad input (nothing is printed on standard output for a rig
that does not load).
`

func runCheck(args []string, e *env) error {
	fs := newFlags("check", checkUsage, e)
	if done, err := parseFlags(fs, args, e); done {
		return err
	}
	if fs.NArg() == 0 {
		fmt.Fprintln(e.stderr, "chargeward check: name at least one rig file (or - for standard input)")
		fs.Usage()
		return exitError{exitBadInput}
	}
	worst := exitOK
	for _, name := range fs.Args() {
		if err := checkOne(name, e); err != nil {
			worst = max(worst, code(err, e.stderr))
		}
	}
	if worst != exitOK {
		return exitError{worst}
	}
	return nil
}

// checkOne runs the stages for one rig: load → assess → evaluate → render. Assessment (hazards.Assess) and
// evaluation (rules.Evaluate) slot in between loading and rendering.
func checkOne(name string, e *env) error {
	rig, err := loadRig(name, e)
	if err != nil {
		return err
	}
	return renderRigSummary(e.stdout, name, rig)
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
