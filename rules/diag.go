package rules

import (
	"fmt"

	"chargeward/schema"
)

// Diagnostic and Diagnostics are the project's one diagnostic model (package schema): rulebook and policy
// problems are reported exactly like rig problems, with file, line and column.
type (
	Diagnostic  = schema.Diagnostic
	Diagnostics = schema.Diagnostics
)

// Diagnostic codes of the rulebook and policy loaders (YAML-* and SCHEMA-* come from package schema).
const (
	CodeExpr        = "RULE-EXPR"        // a condition or message placeholder does not compile
	CodeUnknownName = "RULE-NAME"        // a condition names a quantity, rig field or policy key that does not exist
	CodeDuplicate   = "RULE-DUPLICATE"   // a rule id given twice
	CodeUnknownRule = "RULE-UNKNOWN"     // a site rulebook disables a rule that does not exist
	CodeDisableAll  = "RULE-DISABLE-ALL" // a site rulebook disables every default rule
	CodeEval        = "RULE-EVAL"        // a condition compiled but failed when evaluated
	CodeRange       = "POLICY-RANGE"     // a site threshold is zero or negative
	CodeHazard      = "RULE-HAZARD"      // a rule names a hazard class the rulebook does not define
	CodeRuleSchema  = "RULE-SCHEMA"      // a rule is structurally incomplete (no condition, both condition and gaps)
	CodeBasis       = "RULE-BASIS"       // a rule or policy entry has no basis
	CodeUnknownKey  = "POLICY-KEY"       // a site policy overrides a key the reference policy does not have
	CodeUnit        = "POLICY-UNIT"      // a site value's unit differs from the reference unit, or does not parse
)

func errAt(file string, line, col int, code, summary, detail string) Diagnostic {
	return Diagnostic{Severity: schema.SeverityError, Code: code, Summary: summary, Detail: detail, File: file, Line: line, Column: col}
}

// suggest returns ` (did you mean "x"?)` for the closest candidate that is a plausible typo of s, or "";
// closeness is the one the rig loader uses (schema.Suggest).
func suggest(s string, candidates []string) string {
	best := schema.Suggest(s, candidates)
	if best == "" {
		return ""
	}
	return fmt.Sprintf(" (did you mean %q?)", best)
}
