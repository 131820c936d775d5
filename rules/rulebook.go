package rules

import (
	"fmt"
	"strings"

	"github.com/expr-lang/expr/vm"
	"gopkg.in/yaml.v3"
)

// Control is one checklist line a rule requires.
type Control struct {
	Phase    Phase  `json:"phase"`
	Text     string `json:"text"`
	Measured string `json:"measured,omitempty"` // a value to record, with its unit
	Step     int    `json:"step"`               // order within the phase; defaultStep when not given
}

// defaultStep is the order within its phase of a checklist line that states none.
const defaultStep = 50

// Rule is one compiled rule of the rulebook.
type Rule struct {
	ID          string      `json:"id"`
	Hazard      string      `json:"hazard"`
	Title       string      `json:"title"`
	Severity    Severity    `json:"severity"`
	Disposition Disposition `json:"disposition"`
	Applies     string      `json:"applies,omitempty"`  // condition under which the rule is relevant at all
	When        string      `json:"when,omitempty"`     // condition under which it fires
	Gaps        bool        `json:"gaps,omitempty"`     // fires once for each gap of the assessment
	Loosened    bool        `json:"loosened,omitempty"` // fires once for each site threshold less strict than the reference
	// Covers lists gap fields this rule's finding already reports; such gaps get no finding of their own.
	Covers   []string  `json:"covers,omitempty"`
	Message  string    `json:"message"`
	Controls []Control `json:"controls,omitempty"`
	Basis    string    `json:"basis"`
	// UnknownSeverity and UnknownDisposition apply when the condition cannot be checked because an input is
	// absent; by default the rule's own (missing information is never safe).
	UnknownSeverity    Severity    `json:"unknown_severity"`
	UnknownDisposition Disposition `json:"unknown_disposition"`
	// UnknownQuiet: report nothing when the rule cannot be checked (a companion rule reports it).
	UnknownQuiet bool   `json:"unknown_quiet,omitempty"`
	Origin       string `json:"origin"` // file the rule came from

	applies, when *vm.Program
	message       []segment
	// whenAt is where the rule's condition is written (its id when it has none), for evaluation errors.
	whenAt struct{ line, col int }
}

// HazardClass is one hazard class, in the order findings are grouped.
type HazardClass struct {
	ID    string `json:"id"`
	Title string `json:"title"`
}

// segment is literal text or one placeholder of a message template.
type segment struct {
	text     string
	prog     *vm.Program
	unit     string
	fallback string // shown when a value is absent; "(not stated)" by default
}

// splitPlaceholder splits "EXPRESSION | UNIT | FALLBACK" at its last single pipes ("||" is the expression's
// or); UNIT and FALLBACK are optional.
func splitPlaceholder(body string) (expression, unit, fallback string) {
	var pipes []int
	for i := 0; i < len(body); i++ {
		if body[i] == '|' {
			if i+1 < len(body) && body[i+1] == '|' {
				i++
				continue
			}
			pipes = append(pipes, i)
		}
	}
	switch {
	case len(pipes) >= 2:
		a, b := pipes[len(pipes)-2], pipes[len(pipes)-1]
		return body[:a], strings.TrimSpace(body[a+1 : b]), strings.TrimSpace(body[b+1:])
	case len(pipes) == 1:
		return body[:pipes[0]], strings.TrimSpace(body[pipes[0]+1:]), ""
	}
	return body, "", ""
}

// DisabledRule is a default rule a site rulebook switched off, with its reason.
type DisabledRule struct {
	ID     string `json:"id"`
	Reason string `json:"reason"`
	Origin string `json:"origin"` // the site rulebook that disabled it
}

type rulebookFile struct {
	Hazards   []HazardClass `yaml:"hazards"`
	Rules     []yaml.Node   `yaml:"rules"`
	Checklist []yaml.Node   `yaml:"checklist"`
	Disable   []struct {
		ID     string `yaml:"id"`
		Reason string `yaml:"reason"`
	} `yaml:"disable"`
}

type ruleYAML struct {
	ID          string    `yaml:"id"`
	Hazard      string    `yaml:"hazard"`
	Title       string    `yaml:"title"`
	Severity    string    `yaml:"severity"`
	Disposition string    `yaml:"disposition"`
	Applies     yaml.Node `yaml:"applies"`
	When        yaml.Node `yaml:"when"`
	Gaps        bool      `yaml:"gaps"`
	Loosened    bool      `yaml:"loosened"`
	Covers      []string  `yaml:"covers"`
	Message     yaml.Node `yaml:"message"`
	Controls    []struct {
		Phase    string `yaml:"phase"`
		Text     string `yaml:"text"`
		Measured string `yaml:"measured"`
		Step     int    `yaml:"step"`
	} `yaml:"controls"`
	Basis   string `yaml:"basis"`
	Unknown struct {
		Severity    string `yaml:"severity"`
		Disposition string `yaml:"disposition"`
		Quiet       bool   `yaml:"quiet"`
	} `yaml:"unknown"`
}

func parseSeverity(s string) Severity {
	switch s {
	case "DANGER":
		return Danger
	case "WARNING":
		return Warning
	case "CAUTION":
		return Caution
	case "NOTICE":
		return Notice
	}
	return SeverityInvalid
}

func parseDisposition(s string) Disposition {
	switch s {
	case "must-fix":
		return MustFix
	case "controls":
		return Controls
	case "advisory":
		return Advisory
	}
	return DispositionInvalid
}

func stepOr(step int) int {
	if step == 0 {
		return defaultStep
	}
	return step
}

func parsePhase(s string) Phase {
	switch s {
	case "set-up":
		return SetUp
	case "charging and firing":
		return Firing
	case "after firing and shutdown":
		return AfterFiring
	case "storage":
		return Storage
	}
	return PhaseInvalid
}

// ParseSeverityOrDisposition reads a --fail-on value: a severity word (any case) or a disposition.
func ParseSeverityOrDisposition(s string) (Severity, Disposition, bool) {
	if sv := parseSeverity(strings.ToUpper(s)); sv != SeverityInvalid {
		return sv, DispositionInvalid, true
	}
	if d := parseDisposition(strings.ToLower(s)); d != DispositionInvalid {
		return SeverityInvalid, d, true
	}
	return SeverityInvalid, DispositionInvalid, false
}

// ruleCompiler compiles the rules of one file.
type ruleCompiler struct {
	name string
	raw  []string
	ns   *namespace
	ds   Diagnostics
}

func (c *ruleCompiler) diag(n *yaml.Node, code, summary, detail string) {
	line, col := 0, 0
	if n != nil {
		line, col = n.Line, n.Column
	}
	c.ds = append(c.ds, errAt(c.name, line, col, code, summary, detail))
}

func nodeStyle(n *yaml.Node) string {
	switch {
	case n.Style&yaml.LiteralStyle != 0:
		return "literal"
	case n.Style&yaml.FoldedStyle != 0:
		return "folded"
	case n.Style&(yaml.DoubleQuotedStyle|yaml.SingleQuotedStyle) != 0:
		return "quoted"
	}
	return "plain"
}

func (c *ruleCompiler) exprDiags(n *yaml.Node, errs []posErr, base int) {
	for _, e := range errs {
		line, col := scalarPosition(c.raw, n.Line, n.Column, nodeStyle(n), n.Value, base+e.offset)
		c.ds = append(c.ds, errAt(c.name, line, col, e.code, e.msg, e.detail))
	}
}

// compileRule turns one rule node into a Rule, or records diagnostics.
func (c *ruleCompiler) compileRule(node *yaml.Node) *Rule {
	var ry ruleYAML
	if err := node.Decode(&ry); err != nil {
		c.diag(node, CodeRuleSchema, err.Error(), "")
		return nil
	}
	r := &Rule{ID: ry.ID, Hazard: ry.Hazard, Title: ry.Title, Severity: parseSeverity(ry.Severity), Disposition: parseDisposition(ry.Disposition),
		Gaps: ry.Gaps, Loosened: ry.Loosened, Covers: ry.Covers, Message: ry.Message.Value, Basis: strings.TrimSpace(ry.Basis), Origin: c.name,
		Applies: strings.TrimSpace(ry.Applies.Value), When: strings.TrimSpace(ry.When.Value)}
	if n, _ := nodeAt(node, "/when"); n != nil {
		r.whenAt.line, r.whenAt.col = n.Line, n.Column
	} else if n, _ := nodeAt(node, "/id"); n != nil {
		r.whenAt.line, r.whenAt.col = n.Line, n.Column
	}
	if r.Basis == "" {
		n, k := nodeAt(node, "/basis")
		if k == nil {
			n, _ = nodeAt(node, "/id")
		}
		c.diag(n, CodeBasis, fmt.Sprintf("rule %s has no basis", r.ID), "state the published source with its clause, \"common practice\" or \"from memory\"; a rule without a basis does not load")
		return nil
	}
	r.UnknownSeverity, r.UnknownDisposition = r.Severity, r.Disposition
	if ry.Unknown.Severity != "" {
		r.UnknownSeverity = parseSeverity(ry.Unknown.Severity)
	}
	r.UnknownQuiet = ry.Unknown.Quiet
	if ry.Unknown.Disposition != "" {
		r.UnknownDisposition = parseDisposition(ry.Unknown.Disposition)
	}
	for _, ctl := range ry.Controls {
		r.Controls = append(r.Controls, Control{Phase: parsePhase(ctl.Phase), Text: strings.TrimSpace(ctl.Text), Measured: ctl.Measured, Step: stepOr(ctl.Step)})
	}
	ok := true
	if r.Applies != "" {
		prog, errs := compileExpr(c.ns, ry.Applies.Value, true)
		c.exprDiags(&ry.Applies, errs, 0)
		ok = ok && errs == nil
		r.applies = prog
	}
	perItem := r.Gaps || r.Loosened // fires once per gap or per loosened threshold, with no condition
	switch {
	case r.Gaps && r.Loosened:
		n, _ := nodeAt(node, "/id")
		c.diag(n, CodeRuleSchema, fmt.Sprintf("rule %s: a rule is either 'gaps' or 'loosened', not both", r.ID), "split it into two rules")
		ok = false
	case perItem && r.When != "":
		c.diag(&ry.When, CodeRuleSchema, fmt.Sprintf("rule %s: a gaps or loosened rule has no condition", r.ID), "remove 'when', or 'gaps' / 'loosened'")
		ok = false
	case !perItem && r.When == "":
		n, _ := nodeAt(node, "/id")
		c.diag(n, CodeRuleSchema, fmt.Sprintf("rule %s has no condition", r.ID), "add 'when: CONDITION' (or 'gaps: true' for the missing-information rule)")
		ok = false
	case !perItem:
		prog, errs := compileExpr(c.ns, ry.When.Value, true)
		c.exprDiags(&ry.When, errs, 0)
		ok = ok && errs == nil
		r.when = prog
	}
	segs, good := c.compileTemplate(&ry.Message)
	r.message = segs
	if !ok || !good {
		return nil
	}
	return r
}

// compileTemplate splits a message into text and {placeholder} segments; a placeholder is an expression,
// optionally followed by "| UNIT" to say how to show a computed number.
func (c *ruleCompiler) compileTemplate(n *yaml.Node) ([]segment, bool) {
	s := n.Value
	var segs []segment
	good := true
	runes := []rune(s)
	i := 0
	for i < len(runes) {
		j := indexRune(runes, '{', i)
		if j < 0 {
			segs = append(segs, segment{text: string(runes[i:])})
			break
		}
		if j > i {
			segs = append(segs, segment{text: string(runes[i:j])})
		}
		k := indexRune(runes, '}', j)
		if k < 0 {
			c.exprDiags(n, []posErr{{offset: j, code: CodeExpr, msg: "unclosed '{' in message", detail: "placeholders are written {NAME} or {EXPRESSION | UNIT}"}}, 0)
			return nil, false
		}
		body := string(runes[j+1 : k])
		body, unit, fallback := splitPlaceholder(body)
		prog, errs := compileExpr(c.ns, body, false)
		if errs != nil {
			c.exprDiags(n, errs, j+1)
			good = false
		}
		if unit == "" {
			if info, ok := c.ns.leaves[strings.TrimSpace(body)]; ok {
				unit = info.unit
			}
		}
		segs = append(segs, segment{prog: prog, unit: unit, fallback: fallback})
		i = k + 1
	}
	return segs, good
}

func indexRune(r []rune, c rune, from int) int {
	for i := from; i < len(r); i++ {
		if r[i] == c {
			return i
		}
	}
	return -1
}

// render fills a template in env.
func render(segs []segment, env *evalEnv) string {
	var b strings.Builder
	for _, s := range segs {
		if s.prog == nil {
			b.WriteString(s.text)
			continue
		}
		saved := append([]string(nil), env.read...)
		savedMissing := append([]string(nil), env.missing...)
		env.reset()
		out, err := vm.Run(s.prog, env)
		absent := len(env.missing) > 0
		env.read, env.missing = saved, savedMissing
		if err != nil || absent {
			if s.fallback != "" {
				b.WriteString(s.fallback)
			} else {
				b.WriteString("(not stated)")
			}
			continue
		}
		switch v := out.(type) {
		case float64:
			b.WriteString(FormatQuantity(v, s.unit))
		case int:
			b.WriteString(FormatQuantity(float64(v), s.unit))
		case bool:
			if v {
				b.WriteString("yes")
			} else {
				b.WriteString("no")
			}
		case string:
			b.WriteString(v)
		default:
			fmt.Fprint(&b, v)
		}
	}
	return strings.Join(strings.Fields(b.String()), " ")
}
