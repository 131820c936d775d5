package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"chargeward/rules"
	"chargeward/schema"
)

var rulesCommand = command{name: "rules", summary: "list the rulebook and the threshold policy with their bases", run: runRules}

const rulesUsage = `Usage: chargeward rules [options]

Lists every rule in force with its hazard class, severity, disposition and basis. With --policy, lists
every threshold instead, with its value, unit, confidence and basis; values a site policy changed are shown
beside the reference value. --names lists the names a rule condition may read, --conditions shows each
rule's conditions, and --schema prints the JSON Schema of a site rulebook or policy for editors.

Site files are checked as 'chargeward check' would use them: every problem is reported at its line and
column, and the exit status is 2.
`

func runRules(args []string, e *env) error {
	fs := newFlags("rules", rulesUsage, e)
	listPolicy := fs.Bool("policy", false, "list the thresholds instead of the rules")
	names := fs.Bool("names", false, "list the names a condition may read, with their kind and unit")
	conditions := fs.Bool("conditions", false, "show each rule's conditions under it")
	sitePolicy := fs.String("site-policy", "", "site policy `FILE` to apply before listing")
	siteRules := fs.String("site-rules", "", "site rulebook `FILE` to apply before listing")
	format := fs.String("format", "text", "output format: text or json")
	schemaOf := fs.String("schema", "", "print the JSON Schema of a site file: rulebook or policy")
	if done, err := parseFlags(fs, args, e); done {
		return err
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(e.stderr, "chargeward rules: unexpected argument %q\n", fs.Arg(0))
		return exitError{exitBadInput}
	}
	switch *schemaOf {
	case "":
	case "rulebook":
		_, err := e.stdout.Write(rules.RulebookSchema)
		return err
	case "policy":
		_, err := e.stdout.Write(rules.PolicySchema)
		return err
	default:
		fmt.Fprintf(e.stderr, "chargeward rules: --schema takes rulebook or policy, not %q\n", *schemaOf)
		return exitError{exitBadInput}
	}
	if *format != "text" && *format != "json" {
		fmt.Fprintf(e.stderr, "chargeward rules: --format takes text or json, not %q\n", *format)
		return exitError{exitBadInput}
	}
	set, err := loadRuleSet(*sitePolicy, *siteRules, e)
	if err != nil {
		return err
	}
	switch {
	case *names:
		return listNames(e.stdout, set, *format)
	case *listPolicy:
		return listThresholds(e.stdout, set, *format)
	}
	return listRules(e.stdout, set, *format, *conditions)
}

// loadRuleSet compiles the default rulebook and policy with the site files named (either may be ""). On bad
// input it prints every diagnostic with source excerpts to stderr and returns an exit-2 error.
func loadRuleSet(policyFile, rulesFile string, e *env) (*rules.Set, error) {
	var pd, rd []byte
	src := map[string][]byte{}
	for _, f := range []struct {
		name string
		into *[]byte
	}{{policyFile, &pd}, {rulesFile, &rd}} {
		if f.name == "" {
			continue
		}
		data, err := readInput(f.name, e)
		if err != nil {
			fmt.Fprintln(e.stderr, "chargeward:", err)
			return nil, exitError{exitBadInput}
		}
		if data == nil {
			data = []byte{}
		}
		*f.into = data
		src[f.name] = data
	}
	set, err := rules.Load(policyFile, pd, rulesFile, rd)
	if err != nil {
		var ds schema.Diagnostics
		if errors.As(err, &ds) {
			ds.Render(e.stderr, src)
			fmt.Fprintf(e.stderr, "site files: %s\n", plural(len(ds), "problem"))
		} else {
			fmt.Fprintln(e.stderr, "chargeward:", err)
		}
		return nil, exitError{exitBadInput}
	}
	return set, nil
}

func listRules(w io.Writer, set *rules.Set, format string, conditions bool) error {
	rs := set.Rules()
	if format == "json" {
		type ruleJSON struct {
			ID          string `json:"id"`
			Hazard      string `json:"hazard"`
			Title       string `json:"title"`
			Severity    string `json:"severity"`
			Disposition string `json:"disposition"`
			Applies     string `json:"applies,omitempty"`
			When        string `json:"when,omitempty"`
			Basis       string `json:"basis"`
			Origin      string `json:"origin"`
		}
		out := struct {
			Rules    []ruleJSON           `json:"rules"`
			Disabled []rules.DisabledRule `json:"disabled"`
		}{Rules: []ruleJSON{}, Disabled: append([]rules.DisabledRule{}, set.Disabled()...)}
		for _, r := range rs {
			when := r.When
			if r.Gaps {
				when = "each piece of missing information"
			}
			if r.Loosened {
				when = "each site threshold less strict than the reference"
			}
			out.Rules = append(out.Rules, ruleJSON{r.ID, r.Hazard, r.Title, r.Severity.String(), r.Disposition.String(), r.Applies, when, r.Basis, r.Origin})
		}
		return writeJSON(w, out)
	}
	var b strings.Builder
	titles := map[string]string{}
	for _, h := range set.HazardClasses() {
		titles[h.ID] = h.Title
	}
	fmt.Fprintf(&b, "%d rules in force\n", len(rs))
	for _, h := range set.HazardClasses() {
		first := true
		for _, r := range rs {
			if r.Hazard != h.ID {
				continue
			}
			if first {
				fmt.Fprintf(&b, "\n%s (%s)\n", h.Title, h.ID)
				first = false
			}
			origin := ""
			if r.Origin != rules.DefaultRulebookName {
				origin = "  [" + r.Origin + "]"
			}
			fmt.Fprintf(&b, "  %-7s %-7s  %-8s  %s%s\n", r.ID, r.Severity, r.Disposition, r.Title, origin)
			fmt.Fprintf(&b, "          basis: %s\n", r.Basis)
			if conditions {
				if r.Applies != "" {
					fmt.Fprintf(&b, "          applies: %s\n", oneLine(r.Applies))
				}
				if r.Gaps {
					fmt.Fprintf(&b, "          when: each piece of missing information the physics records\n")
				} else if r.Loosened {
					fmt.Fprintf(&b, "          when: each site threshold less strict than the reference policy\n")
				} else {
					fmt.Fprintf(&b, "          when: %s\n", oneLine(r.When))
				}
			}
		}
	}
	if d := set.Disabled(); len(d) > 0 {
		fmt.Fprintf(&b, "\nDisabled by the site rulebook\n")
		for _, x := range d {
			fmt.Fprintf(&b, "  %-7s %s  [%s]\n", x.ID, x.Reason, x.Origin)
		}
	}
	_, err := io.WriteString(w, b.String())
	return err
}

func listThresholds(w io.Writer, set *rules.Set, format string) error {
	es := set.Policy().Entries()
	if format == "json" {
		return writeJSON(w, struct {
			Thresholds []rules.PolicyEntry `json:"thresholds"`
			Overrides  []rules.Override    `json:"overrides"`
		}{es, append([]rules.Override{}, set.Overrides()...)})
	}
	var b strings.Builder
	fmt.Fprintf(&b, "%d thresholds in force\n\n", len(es))
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "KEY\tVALUE\tCONFIDENCE\tBASIS")
	for _, p := range es {
		v := rules.FormatQuantity(p.Value, p.Unit)
		if p.Overridden {
			v += " (reference " + rules.FormatQuantity(p.Reference, p.Unit) + ")"
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\n", p.Key, v, p.Confidence, p.Basis)
	}
	tw.Flush()
	if ov := set.Overrides(); len(ov) > 0 {
		fmt.Fprintf(&b, "\nSite overrides\n")
		for _, o := range ov {
			dir := "stricter"
			if o.Looser {
				dir = "LOOSER"
			}
			fmt.Fprintf(&b, "  %s: %s, reference %s (%s); basis: %s\n", o.Key, rules.FormatQuantity(o.Site, o.Unit), rules.FormatQuantity(o.Reference, o.Unit), dir, o.Basis)
		}
	}
	_, err := io.WriteString(w, b.String())
	return err
}

func listNames(w io.Writer, set *rules.Set, format string) error {
	ns := set.Names()
	if format == "json" {
		type nameJSON struct {
			Name string `json:"name"`
			Kind string `json:"kind"`
			Unit string `json:"unit,omitempty"`
		}
		out := []nameJSON{}
		for _, n := range ns {
			out = append(out, nameJSON{n[0], n[1], n[2]})
		}
		return writeJSON(w, out)
	}
	var b strings.Builder
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "NAME\tKIND\tUNIT")
	for _, n := range ns {
		fmt.Fprintf(tw, "%s\t%s\t%s\n", n[0], n[1], n[2])
	}
	tw.Flush()
	fmt.Fprintln(&b, "\nEvery quantity also exists as worst.NAME (its worst case); stated(\"NAME\") tests presence.")
	_, err := io.WriteString(w, b.String())
	return err
}

func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }

func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(v)
}
