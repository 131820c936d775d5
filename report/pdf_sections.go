package report

import (
	"fmt"
	"strings"

	"chargeward/hazards"
	"chargeward/rules"
)

// cautions are the usual cautions, printed on the cover and again above the sign-off.
var cautions = []string{
	"This review is an engineering aid. It does not replace local codes, the institution's electrical safety " +
		"program, or the judgement of qualified and licensed persons, who decide whether and how the rig is operated.",
	"Every value rests on the rig description as given (appendix A). Before sign-off, verify the description " +
		"by measurement on the real rig: charge voltage, capacitance, bleeder resistance and decay time, and the " +
		"ratings of the parts as marked.",
	"A stored charge can remain or return after discharge (dielectric absorption). Treat every capacitor as " +
		"charged until it has been measured at a safe voltage and shorted.",
}

func (d *doc) cover() {
	d.newPage()
	info := d.r.Assessment.Rig.Rig
	d.flow(d.spans("Hazard review of a charged-capacitor rig", marginL, contentW, sans, "", 12), nil)
	d.y += 1
	name := d.spans(orDash(info.Name), marginL, contentW, sans, "B", 20)
	if len(name) > 4 { // a very long name is cut on the cover; it is printed in full in the identity table
		name = name[:4]
		d.setFont(sans, "B", 20)
		name[3].text = d.fit(name[3].text+" …", contentW)
	}
	d.flow(name, nil)
	d.y += 3

	reviewer := d.opt.Reviewer
	rows := [][]string{
		{"Rig", orDash(info.Name)},
		{"Owner", orDash(info.Owner)},
		{"Location", orDash(info.Location)},
		{"Purpose", orDash(info.Purpose)},
		{"Revision", orDash(info.Revision)},
		{"Review date", dateString(d.opt.Date)},
		{"Prepared by", orDash(reviewer)},
		{"Program", "chargeward " + orDash(d.opt.Version)},
		{"Rulebook", fmt.Sprintf("%d rules in force, digest %s", d.r.RuleCount, short(d.r.RulebookDigest))},
		{"Policy", fmt.Sprintf("digest %s, %d site overrides (appendix B)", short(d.r.PolicyDigest), len(d.r.Overrides))},
	}
	if src := d.r.Assessment.Rig.Source.File; src != "" {
		rows = append(rows, []string{"Rig file", src})
	}
	d.table([]column{{"", 34, sans, "B", 9}, {"", contentW - 34, sans, "", 9}}, rows, tableOpt{noHeader: true})

	// Verdict panel.
	d.y += 2
	words := d.spans(verdictWords(d.r.Verdict), marginL+5, contentW-10, sans, "", 10)
	title := d.spans("Verdict: "+strings.ToUpper(d.r.Verdict.String()), marginL+5, contentW-10, sans, "B", 16)
	all := append(title, words...)
	h := spansHeight(all) + 6
	d.ensure(h)
	rgb := verdictRGB(d.r.Verdict)
	d.pdf.SetDrawColor(rgb[0], rgb[1], rgb[2])
	d.pdf.SetLineWidth(0.8)
	d.pdf.Rect(marginL, d.y, contentW, h, "D")
	d.y += 3
	d.flow(all, nil)
	d.y += 5

	// Counts by severity and disposition.
	bySev := map[[2]int]int{}
	for _, f := range d.r.Findings {
		bySev[[2]int{int(f.Severity), int(f.Disposition)}]++
	}
	cols := []column{{"findings", 40, sans, "B", 9}}
	for _, dp := range dispositions {
		cols = append(cols, column{dp.String(), 30, sans, "", 9})
	}
	cols = append(cols, column{"total", contentW - 40 - 30*float64(len(dispositions)), sans, "B", 9})
	var crows [][]string
	sevTotal, dispTotal := d.r.Counts()
	for _, sv := range severities {
		row := []string{sv.String()}
		for _, dp := range dispositions {
			row = append(row, fmt.Sprint(bySev[[2]int{int(sv), int(dp)}]))
		}
		crows = append(crows, append(row, fmt.Sprint(sevTotal[sv])))
	}
	row := []string{"total"}
	for _, dp := range dispositions {
		row = append(row, fmt.Sprint(dispTotal[dp]))
	}
	crows = append(crows, append(row, fmt.Sprint(len(d.r.Findings))))
	d.table(cols, crows, tableOpt{})

	// Fingerprint.
	d.subheading("Fingerprint (SHA-256)", 12)
	d.flow(d.spans(orDash(d.fp), marginL, contentW, mono, "B", 9), nil)
	d.y += 1
	d.paragraph("Over the rig description (as typed values in SI units), the rulebook, the policy and the program "+
		"version. The command “chargeward verify REVIEW.pdf RIG” recomputes it; a different value means this review does not "+
		"belong to that rig description.", "", 8.5)

	d.subheading("Before you rely on this review", 20)
	for _, c := range cautions {
		d.flow(d.spans("• "+c, marginL, contentW, sans, "", 9), nil)
		d.y += 1
	}
}

// short is the first 16 hex digits of a digest.
func short(s string) string {
	if s == "" {
		return "not stated"
	}
	if len(s) > 16 {
		return s[:16] + "…"
	}
	return s
}

func verdictRGB(v rules.Verdict) [3]int {
	switch v {
	case rules.Ready:
		return [3]int{0, 130, 60}
	case rules.ReadyWithControls:
		return [3]int{230, 150, 0}
	}
	return [3]int{200, 16, 46}
}

func (d *doc) summary() {
	d.section("1  Key quantities")
	d.paragraph("Nominal values at the stated part values; the worst case is the corner of the stated tolerances "+
		"that makes each quantity worse (an em dash where tolerances do not apply). Formulas, inputs and bases "+
		"are in section 3.", "", 9)
	var rows [][]string
	for _, k := range keyQuantities {
		q, ok := d.r.Assessment.Q(k.name)
		if !ok {
			continue
		}
		worst := "—"
		if q.Worst != nil {
			worst = SI(*q.Worst, q.Unit)
		}
		rows = append(rows, []string{q.Name, k.meaning, SI(q.Value, q.Unit), worst})
	}
	if len(rows) == 0 {
		d.paragraph("No key quantity could be computed from the rig description.", "I", 9)
	} else {
		d.table([]column{{"quantity", 62, mono, "", 7.5}, {"meaning", 60, sans, "", 8.5},
			{"nominal", 26, sans, "B", 8.5}, {"worst case", contentW - 148, sans, "B", 8.5}}, rows, tableOpt{title: "Key quantities"})
	}
	gaps := d.r.Assessment.Gaps
	d.subheading("Not stated in the rig description", 15)
	if len(gaps) == 0 {
		d.paragraph("Nothing the models need is missing.", "", 9)
		return
	}
	d.paragraph("Missing information is never read as safe; each item below is also a finding.", "", 9)
	var g [][]string
	for _, x := range gaps {
		g = append(g, []string{x.Field, x.Effect})
	}
	d.table([]column{{"rig field", 62, mono, "", 7.5}, {"what cannot be checked", contentW - 62, sans, "", 8.5}}, g, tableOpt{})
}

func (d *doc) findings() {
	d.section("2  Findings by hazard class")
	if len(d.r.Findings) == 0 {
		d.paragraph("No rule fired for this rig description.", "", 10)
		return
	}
	d.paragraph(fmt.Sprintf("%d findings from %d rules in force: %s. Disposition must-fix: do not operate until "+
		"resolved; controls: operate only with the listed controls in place; advisory: no condition on operation.",
		len(d.r.Findings), d.r.RuleCount, countsLine(d.r)), "", 9)
	for _, g := range groupFindings(d.r) {
		d.subheading(fmt.Sprintf("%s (%d)", capital(g.title), len(g.findings)), spansHeight(d.findingSpans(g.findings[0])))
		for _, f := range g.findings {
			bar := severityRGB(f.Severity)
			d.flow(d.findingSpans(f), &bar)
			d.y += 3
		}
	}
}

// findingSpans lays out one finding: rule, severity, disposition and title; message; required controls;
// basis; the rig fields involved.
func (d *doc) findingSpans(f rules.Finding) []span {
	x, w := marginL+4, contentW-4
	head := fmt.Sprintf("%s   %s · %s", f.Rule, f.Severity, f.Disposition)
	if f.Title != "" {
		head += " · " + f.Title
	}
	ss := d.spans(head, x, w, sans, "B", 9.5)
	ss = append(ss, d.spans(f.Message, x, w, sans, "", 9)...)
	if len(f.Controls) > 0 {
		c := d.spans("Required controls:", x, w, sans, "B", 8.5)
		c[0].gap = 0.8
		ss = append(ss, c...)
		for _, ctl := range f.Controls {
			l := d.spans("– "+ctl, x+3, w-3, sans, "", 8.5)
			ss = append(ss, l...)
		}
	}
	b := d.spans("Basis: "+orDash(f.Basis), x, w, sans, "I", 8)
	b[0].gap = 0.8
	ss = append(ss, b...)
	if len(f.Fields) > 0 {
		ss = append(ss, d.spans("Rig fields: "+strings.Join(f.Fields, ", ")+fieldLines(d.r, f.Fields), x, w, sans, "I", 8)...)
	}
	return ss
}

// fieldLines gives the rig file's line numbers of the fields, where the loader recorded them.
func fieldLines(r *rules.Review, fields []string) string {
	pos := r.Assessment.Rig.Source.Pos
	var ls []string
	for _, f := range fields {
		if p, ok := pos[f]; ok {
			ls = append(ls, fmt.Sprint(p.Line))
		}
	}
	if len(ls) == 0 {
		return ""
	}
	return " (appendix A, lines " + strings.Join(ls, ", ") + ")"
}

func capital(s string) string {
	if s == "" {
		return s
	}
	r := []rune(s)
	return strings.ToUpper(string(r[0])) + string(r[1:])
}

func (d *doc) calculations() {
	d.section("3  Calculations")
	d.paragraph("Every quantity computed for this rig, in the order computed: formula, inputs, result (nominal "+
		"and worst case) and the published basis of the method.", "", 9)
	if len(d.r.Assessment.Quantities) == 0 {
		d.paragraph("No quantity could be computed from the rig description.", "I", 9)
	}
	for _, q := range d.r.Assessment.Quantities {
		x, w := marginL, contentW
		res := q.Name + " = " + SI(q.Value, q.Unit)
		if q.Worst != nil {
			res += "   (worst case " + SI(*q.Worst, q.Unit) + ")"
		}
		ss := d.spans(res, x, w, sans, "B", 9.5)
		ss = append(ss, d.spans("Formula: "+orDash(q.Formula), x+4, w-4, sans, "", 8.5)...)
		if len(q.Inputs) > 0 {
			var in []string
			for _, i := range q.Inputs {
				s := i.Symbol + " = " + SI(i.Value, i.Unit)
				if i.Name != "" && i.Name != i.Symbol {
					s += " (" + i.Name + ")"
				}
				in = append(in, s)
			}
			ss = append(ss, d.spans("Inputs: "+strings.Join(in, "; "), x+4, w-4, sans, "", 8.5)...)
		}
		ss = append(ss, d.spans("Basis: "+orDash(q.Basis), x+4, w-4, sans, "I", 8)...)
		if q.Note != "" {
			ss = append(ss, d.spans("Note: "+q.Note, x+4, w-4, sans, "I", 8)...)
		}
		d.flow(ss, nil)
		d.y += 2.2
	}
}

// phases in the order they are carried out.
var phases = []rules.Phase{rules.SetUp, rules.Firing, rules.AfterFiring, rules.Storage}

func (d *doc) checklist() {
	d.section("5  Procedure checklist")
	d.paragraph("Tick each step as it is done, record the measured values and initial the step. Steps marked with "+
		"rule ids are required by those findings.", "", 9)
	byPhase := map[rules.Phase][]rules.ChecklistItem{}
	var other []rules.ChecklistItem
	for _, c := range d.r.Checklist {
		known := false
		for _, p := range phases {
			if c.Phase == p {
				known = true
			}
		}
		if known {
			byPhase[c.Phase] = append(byPhase[c.Phase], c)
		} else {
			other = append(other, c)
		}
	}
	const boxW, measW, initW = 12.0, 46.0, 20.0
	cols := []column{{"done", boxW, sans, "", 9}, {"step", contentW - boxW - measW - initW, sans, "", 9},
		{"measured value", measW, sans, "", 7.5}, {"initials", initW, sans, "", 9}}
	draw := func(title string, items []rules.ChecklistItem) {
		d.subheading(capital(title), 25)
		if len(items) == 0 {
			d.paragraph("No steps for this phase.", "I", 9)
			return
		}
		var rows [][]string
		for _, it := range items {
			step := it.Text
			if len(it.From) > 0 {
				step += "\n(required by " + strings.Join(it.From, ", ") + ")"
			}
			rows = append(rows, []string{"", step, it.Measured, ""})
		}
		d.table(cols, rows, tableOpt{title: capital(title), minRowH: 10, decorate: func(i int, x, y, h float64) {
			d.pdf.SetDrawColor(0, 0, 0)
			d.pdf.SetLineWidth(0.3)
			d.pdf.Rect(x+2, y+1.6, 4.2, 4.2, "D")
			d.mark(x+2, y+1.6, 4.2, 4.2, "checkbox")
			mx := x + boxW + cols[1].w
			if items[i].Measured != "" {
				d.pdf.SetLineWidth(0.2)
				d.pdf.Line(mx+1.2, y+h-1.2, mx+measW-3, y+h-1.2)
			}
			ix := mx + measW
			d.pdf.SetLineWidth(0.2)
			d.pdf.Rect(ix+2, y+1.2, initW-4, h-2.4, "D")
		}})
	}
	for _, p := range phases {
		draw(p.String(), byPhase[p])
	}
	if len(other) > 0 {
		draw("other steps", other)
	}
}

func (d *doc) signOff() {
	d.section("6  Cautions and sign-off")
	for _, c := range cautions {
		d.flow(d.spans("• "+c, marginL, contentW, sans, "", 9.5), nil)
		d.y += 1.2
	}
	info := d.r.Assessment.Rig.Rig
	d.y += 2
	d.paragraph(fmt.Sprintf("Verdict of this review: %s. %s", strings.ToUpper(d.r.Verdict.String()), verdictWords(d.r.Verdict)), "B", 9.5)

	field := func(label, value string, h float64) {
		d.ensure(h)
		d.pdf.SetDrawColor(0, 0, 0)
		d.pdf.SetLineWidth(0.25)
		d.pdf.Rect(marginL, d.y, contentW, h, "D")
		d.setFont(sans, "B", 8)
		d.cell(marginL+1.5, d.y+1, 60, lineH(8), label, "L", "text")
		if value != "" {
			d.setFont(sans, "", 10)
			d.cell(marginL+1.5, d.y+1+lineH(8), contentW-3, lineH(10), d.fit(value, contentW-3), "L", "text")
		}
		d.y += h
	}
	pair := func(a, b string) {
		const h = 14.0
		d.ensure(h)
		d.pdf.SetDrawColor(0, 0, 0)
		d.pdf.SetLineWidth(0.25)
		w := contentW / 2
		for i, l := range []string{a, b} {
			d.pdf.Rect(marginL+float64(i)*w, d.y, w, h, "D")
			d.setFont(sans, "B", 8)
			d.cell(marginL+float64(i)*w+1.5, d.y+1, w-3, lineH(8), l, "L", "text")
		}
		d.y += h
	}
	d.subheading("Prepared by", 30)
	field("Name", d.opt.Reviewer, 12)
	pair("Signature", "Date")
	d.subheading("Reviewed by the department safety officer", 30)
	field("Name", "", 12)
	pair("Signature", "Date")
	d.subheading("Conditions of approval", 40)
	field("Conditions (or “none”)", "", 40)
	d.y += 3
	d.flow(d.spans(fmt.Sprintf("This review is valid only for revision %s of the rig above; any change to the "+
		"rig requires a new review. Fingerprint %s.", orDash(info.Revision), orDash(d.fp)),
		marginL, contentW, sans, "B", 9), nil)
}

func (d *doc) appendix() {
	d.section("Appendix A  Rig description as given")
	src := d.r.Assessment.Rig.Source
	if src.File != "" {
		d.paragraph("File: "+src.File, "", 9)
	}
	if len(src.Raw) == 0 {
		d.paragraph("The source text of the rig description is not available.", "I", 9)
	} else {
		text := strings.ReplaceAll(string(src.Raw), "\r\n", "\n")
		text = strings.TrimSuffix(text, "\n")
		lines := strings.Split(text, "\n")
		size := 7.5
		numW := 11.0
		lh := lineH(size)
		for i, l := range lines {
			l = strings.ReplaceAll(l, "\t", "    ")
			parts := d.wrapCode(l, size, contentW-numW)
			for j, p := range parts {
				d.ensure(lh)
				d.setFont(mono, "", size)
				if j == 0 {
					d.pdf.SetTextColor(120, 120, 120)
					d.cell(marginL, d.y, numW-2, lh, fmt.Sprint(i+1), "R", "code")
					d.pdf.SetTextColor(0, 0, 0)
				}
				if p != "" {
					d.cell(marginL+numW, d.y, contentW-numW, lh, p, "L", "code")
				}
				d.y += lh
			}
		}
	}
	d.y += 3
	d.subheading("Appendix B  Policy in force", 20)
	d.paragraph(fmt.Sprintf("Rulebook digest %s (%d rules). Policy digest %s.", orDash(d.r.RulebookDigest), d.r.RuleCount,
		orDash(d.r.PolicyDigest)), "", 8.5)
	d.subheading("Site overrides", 15)
	if len(d.r.Overrides) == 0 {
		d.paragraph("None: every threshold is the reference value of the default policy.", "", 9)
	} else {
		var rows [][]string
		for _, ov := range d.r.Overrides {
			looser := "no"
			if ov.Looser {
				looser = "yes"
			}
			rows = append(rows, []string{ov.Key, SI(ov.Site, ov.Unit), SI(ov.Reference, ov.Unit), looser, orDash(ov.Basis)})
		}
		d.table([]column{{"policy key", 50, mono, "", 7.5}, {"site value", 22, sans, "B", 8.5}, {"reference", 22, sans, "", 8.5},
			{"less strict", 18, sans, "", 8.5}, {"site's basis", contentW - 112, sans, "", 8}}, rows, tableOpt{})
	}
	if len(d.r.Disabled) > 0 {
		d.subheading("Default rules switched off by a site rulebook", 15)
		var rows [][]string
		for _, x := range d.r.Disabled {
			rows = append(rows, []string{x.ID, orDash(x.Origin), orDash(x.Reason)})
		}
		d.table([]column{{"rule", 22, mono, "", 7.5}, {"site rulebook", 50, sans, "", 8.5},
			{"reason given", contentW - 72, sans, "", 8.5}}, rows, tableOpt{})
	}
	if len(d.r.Thresholds) > 0 {
		d.subheading("Thresholds in force", 15)
		var rows [][]string
		for _, t := range d.r.Thresholds {
			rows = append(rows, []string{t.Key, SI(t.Value, t.Unit), orDash(t.Basis), orDash(t.Confidence)})
		}
		d.table([]column{{"policy key", 50, mono, "", 7.5}, {"value", 22, sans, "B", 8.5}, {"basis", contentW - 96, sans, "", 8},
			{"source status", 24, sans, "", 8}}, rows, tableOpt{title: "Thresholds in force"})
	}
}

// wrapCode splits a source line into pieces that fit w in the monospaced font, breaking at any character
// (source text keeps its spacing).
func (d *doc) wrapCode(l string, size, w float64) []string {
	d.setFont(mono, "", size)
	l = d.clean(l)
	if d.width(l) <= w {
		return []string{l}
	}
	var out []string
	r := []rune(l)
	for len(r) > 0 {
		n := len(r)
		for n > 1 && d.width(string(r[:n])) > w {
			n--
		}
		out = append(out, string(r[:n]))
		r = r[n:]
	}
	return out
}

// quantityOr returns the named quantity's value, if computed.
func quantityOr(a *hazards.Assessment, name string) (float64, bool) {
	q, ok := a.Q(name)
	return q.Value, ok
}
