package rules

import (
	"fmt"
	"strings"
)

// Diagnostic is one problem found while loading a rulebook or a policy, with its position in the file.
// It follows the project's diagnostic model (stable code, summary, detail with the fix, 1-based line and
// column); when package schema's model is available the loader converts to it.
type Diagnostic struct {
	File    string // file name as given; "<default rulebook>" or "<default policy>" for the embedded files
	Line    int    // 1-based; 0 when the problem concerns the whole file
	Column  int    // 1-based
	Code    string // stable code, e.g. "rules.unknown-name"
	Summary string // terse statement of the problem
	Detail  string // how to fix it
}

func (d Diagnostic) String() string {
	var b strings.Builder
	b.WriteString(d.File)
	if d.Line > 0 {
		fmt.Fprintf(&b, ":%d:%d", d.Line, d.Column)
	}
	fmt.Fprintf(&b, ": error[%s]: %s", d.Code, d.Summary)
	if d.Detail != "" {
		b.WriteString("\n    ")
		b.WriteString(d.Detail)
	}
	return b.String()
}

// Diagnostics is every problem found in one load; a non-empty slice is the error Load returns.
type Diagnostics []Diagnostic

func (ds Diagnostics) Error() string {
	s := make([]string, len(ds))
	for i, d := range ds {
		s[i] = d.String()
	}
	return strings.Join(s, "\n")
}

// Diagnostic codes.
const (
	CodeParse       = "rules.parse"        // the file is not valid YAML, or has more than one document
	CodeSchema      = "rules.schema"       // the file does not match its JSON Schema
	CodeExpr        = "rules.expression"   // a condition or message placeholder does not compile
	CodeUnknownName = "rules.unknown-name" // a condition names a quantity, rig field or policy key that does not exist
	CodeDuplicate   = "rules.duplicate"    // a rule id or policy key given twice
	CodeUnknownRule = "rules.unknown-rule" // a site rulebook disables a rule that does not exist
	CodeUnknownKey  = "policy.unknown-key" // a site policy overrides a key the reference policy does not have
	CodeUnit        = "policy.unit"        // a site value's unit differs from the reference unit
	CodeBasis       = "rules.basis"        // a rule or policy entry has no basis
	CodeTooLarge    = "rules.too-large"    // the file is over the size limit
)

// suggest returns ` (did you mean "x"?)` for the closest candidate within edit distance 3, or "".
func suggest(s string, candidates []string) string {
	best, bd := "", 4
	for _, c := range candidates {
		if d := editDistance(s, c); d < bd {
			best, bd = c, d
		}
	}
	if best == "" {
		return ""
	}
	return fmt.Sprintf(" (did you mean %q?)", best)
}

func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	prev := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur := make([]int, len(rb)+1)
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			cost := 1
			if ra[i-1] == rb[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev = cur
	}
	return prev[len(rb)]
}
