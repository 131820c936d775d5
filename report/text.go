package report

import (
	"bufio"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"
	"unicode/utf8"

	"chargeward/rules"
)

// textWidth is the line width of the terminal output, in characters.
const textWidth = 100

// Text writes the review for a terminal: the verdict in words, the counts by severity and disposition, the
// findings grouped by hazard class with their numbers, required controls and basis, the key quantities with
// nominal and worst case in SI prefixes, and the information the rig does not state. An Options value may be
// passed for the program version, which adds the fingerprint line.
func Text(w io.Writer, r *rules.Review, opt ...Options) error {
	if err := check(r); err != nil {
		return err
	}
	var o Options
	if len(opt) > 0 {
		o = opt[0]
	}
	b := bufio.NewWriter(w)
	info := r.Assessment.Rig.Rig
	fmt.Fprintf(b, "Hazard review: %s, revision %s\n", orDash(info.Name), orDash(info.Revision))
	fmt.Fprintf(b, "Verdict: %s\n", strings.ToUpper(r.Verdict.String()))
	wrapTo(b, verdictWords(r.Verdict), "  ", "  ")
	fmt.Fprintf(b, "Findings: %s\n", countsLine(r))
	if o.Version != "" {
		fmt.Fprintf(b, "Fingerprint: %s (chargeward %s)\n", Fingerprint(r, o.Version), o.Version)
	}

	fmt.Fprintf(b, "\nFindings by hazard class\n")
	if len(r.Findings) == 0 {
		fmt.Fprintf(b, "  none\n")
	}
	for _, g := range groupFindings(r) {
		fmt.Fprintf(b, "\n%s (%d)\n", g.title, len(g.findings))
		for _, f := range g.findings {
			head := fmt.Sprintf("%-8s %s, %s", f.Rule, f.Severity, f.Disposition)
			if f.Title != "" {
				head += ": " + f.Title
			}
			wrapTo(b, head, "  ", "           ")
			const ind = "           "
			wrapTo(b, f.Message, ind, ind)
			if len(f.Controls) > 0 {
				fmt.Fprintf(b, "%sRequired controls:\n", ind)
				for _, c := range f.Controls {
					wrapTo(b, c, ind+"  - ", ind+"    ")
				}
			}
			wrapTo(b, "Basis: "+orDash(f.Basis), ind, ind+"  ")
		}
	}

	fmt.Fprintf(b, "\nKey quantities\n")
	tw := tabwriter.NewWriter(b, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "  quantity\tmeaning\tnominal\tworst case\n")
	shown := 0
	for _, k := range keyQuantities {
		q, ok := r.Assessment.Q(k.name)
		if !ok {
			continue
		}
		shown++
		worst := "—"
		if q.Worst != nil {
			worst = SI(*q.Worst, q.Unit)
		}
		fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\n", q.Name, k.meaning, SI(q.Value, q.Unit), worst)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	if shown == 0 {
		fmt.Fprintf(b, "  none computed\n")
	}
	if n := len(r.Assessment.Quantities) - shown; n > 0 {
		fmt.Fprintf(b, "  (%d further quantities in the JSON output and the PDF review)\n", n)
	}

	if len(r.Assessment.Gaps) > 0 {
		fmt.Fprintf(b, "\nNot stated in the rig description (never read as safe)\n")
		for _, g := range r.Assessment.Gaps {
			wrapTo(b, g.Field+": "+g.Effect, "  ", "    ")
		}
	}
	if len(r.Overrides) > 0 {
		fmt.Fprintf(b, "\nSite policy overrides\n")
		for _, ov := range r.Overrides {
			wrapTo(b, overrideLine(ov), "  ", "    ")
		}
	}
	if len(r.Disabled) > 0 {
		fmt.Fprintf(b, "\nDefault rules switched off by a site rulebook\n")
		for _, d := range r.Disabled {
			wrapTo(b, disabledLine(d), "  ", "    ")
		}
	}
	fmt.Fprintf(b, "\nThis review is an engineering aid. It does not replace local codes, the institution's electrical\n"+
		"safety program, or the judgement of qualified and licensed persons. Verify the rig description by\n"+
		"measurement before sign-off.\n")
	return b.Flush()
}

// disabledLine describes one default rule that a site rulebook switched off, with its stated reason.
func disabledLine(d rules.DisabledRule) string {
	s := fmt.Sprintf("%s: switched off by %s", d.ID, orDash(d.Origin))
	if d.Reason != "" {
		s += "; reason given: " + d.Reason
	}
	return s
}

// overrideLine describes one site override beside the reference value.
func overrideLine(ov rules.Override) string {
	s := fmt.Sprintf("%s: site %s, reference %s", ov.Key, SI(ov.Site, ov.Unit), SI(ov.Reference, ov.Unit))
	if ov.Looser {
		s += " (less strict than the reference)"
	}
	if ov.Basis != "" {
		s += "; basis: " + ov.Basis
	}
	return s
}

// wrapTo writes s word-wrapped to textWidth, the first line after first and the others after rest.
func wrapTo(w io.Writer, s, first, rest string) {
	for i, line := range wrapWords(s, textWidth-utf8.RuneCountInString(rest)) {
		if i == 0 {
			fmt.Fprintf(w, "%s%s\n", first, line)
		} else {
			fmt.Fprintf(w, "%s%s\n", rest, line)
		}
	}
}

// wrapWords splits s into lines of at most width runes at spaces; a word longer than width is split.
// Explicit newlines in s are kept.
func wrapWords(s string, width int) []string {
	width = max(width, 20)
	var out []string
	for _, para := range strings.Split(s, "\n") {
		line := ""
		for _, word := range strings.Fields(para) {
			for utf8.RuneCountInString(word) > width {
				if line != "" {
					out = append(out, line)
					line = ""
				}
				r := []rune(word)
				out = append(out, string(r[:width]))
				word = string(r[width:])
			}
			switch {
			case line == "":
				line = word
			case utf8.RuneCountInString(line)+1+utf8.RuneCountInString(word) <= width:
				line += " " + word
			default:
				out = append(out, line)
				line = word
			}
		}
		out = append(out, line)
	}
	return out
}
