package rules

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/expr-lang/expr"
	"github.com/expr-lang/expr/ast"
	"github.com/expr-lang/expr/file"
	"github.com/expr-lang/expr/vm"
)

// namespace is every name a condition may read, with its kind and unit.
type namespace struct {
	leaves   map[string]nameInfo
	prefixes map[string]bool // sections and partial paths ("rig.controls", "policy.shock")
	roots    map[string]bool // first segments
}

// newNamespace builds the names for one policy: quantities (nominal and "worst."), rig facts ("rig."),
// policy keys ("policy."), derived limits ("limit.") and, for gap rules, "gap.field" and "gap.effect".
func newNamespace(p *Policy) *namespace {
	ns := &namespace{leaves: map[string]nameInfo{}, prefixes: map[string]bool{}, roots: map[string]bool{}}
	for n, u := range quantityCatalog {
		ns.add(n, nameInfo{kindNum, u})
		ns.add("worst."+n, nameInfo{kindNum, u})
	}
	facts, sections := rigFacts()
	for n, info := range facts {
		ns.add(n, info)
	}
	for s := range sections {
		ns.prefixes[s] = true
	}
	for _, e := range p.entries {
		ns.add("policy."+e.Key, nameInfo{kindNum, e.Unit})
	}
	for n, info := range limitCatalog {
		ns.add(n, info)
	}
	ns.add("gap.field", nameInfo{kindStr, ""})
	ns.add("gap.effect", nameInfo{kindStr, ""})
	for _, n := range []string{"override.key", "override.site", "override.reference", "override.basis"} {
		ns.add(n, nameInfo{kindStr, ""})
	}
	return ns
}

func (ns *namespace) add(path string, info nameInfo) {
	ns.leaves[path] = info
	parts := strings.Split(path, ".")
	ns.roots[parts[0]] = true
	for i := 1; i < len(parts); i++ {
		ns.prefixes[strings.Join(parts[:i], ".")] = true
	}
}

// posErr is a problem at a rune offset of an expression.
type posErr struct {
	offset int
	msg    string
	detail string
	code   string
}

// patcher rewrites every name of the namespace into a call of the evaluation environment's typed getter,
// so that absent inputs are recorded rather than read as zero, and reports names that do not exist.
type patcher struct {
	ns   *namespace
	errs []posErr
}

func chainPath(n ast.Node) (string, bool) {
	switch n := n.(type) {
	case *ast.IdentifierNode:
		return n.Value, true
	case *ast.MemberNode:
		s, ok := n.Property.(*ast.StringNode)
		if !ok {
			return "", false
		}
		head, ok := chainPath(n.Node)
		if !ok {
			return "", false
		}
		return head + "." + s.Value, true
	}
	return "", false
}

// chainStart returns the offset where a member chain begins (its root identifier), so a diagnostic marks
// the whole name rather than its last dot.
func chainStart(n ast.Node) int {
	for {
		m, ok := n.(*ast.MemberNode)
		if !ok {
			return n.Location().From
		}
		n = m.Node
	}
}

func getterName(k kind) string {
	switch k {
	case kindBool:
		return "Bool"
	case kindStr:
		return "Str"
	}
	return "Num"
}

func (p *patcher) Visit(node *ast.Node) {
	switch n := (*node).(type) {
	case *ast.MemberNode:
		path, ok := chainPath(n)
		if !ok || !p.ns.roots[strings.SplitN(path, ".", 2)[0]] {
			return
		}
		if info, ok := p.ns.leaves[path]; ok {
			ast.Patch(node, &ast.CallNode{Callee: &ast.IdentifierNode{Value: getterName(info.kind)}, Arguments: []ast.Node{&ast.StringNode{Value: path}}})
			return
		}
		if !p.ns.prefixes[path] {
			p.errs = append(p.errs, posErr{offset: chainStart(n), code: CodeUnknownName,
				msg:    fmt.Sprintf("unknown name %q%s", path, suggest(path, p.candidates(path))),
				detail: "conditions name assessment quantities (DESIGN.md §9), rig fields as rig.SECTION.FIELD, policy.KEY, limit.NAME; see 'chargeward rules --names'"})
		}
	case *ast.CallNode:
		id, ok := n.Callee.(*ast.IdentifierNode)
		if !ok || id.Value != "stated" {
			return
		}
		if len(n.Arguments) != 1 {
			p.errs = append(p.errs, posErr{offset: n.Location().From, code: CodeExpr, msg: "stated() takes one name"})
			return
		}
		var path string
		switch a := n.Arguments[0].(type) {
		case *ast.StringNode:
			path = a.Value
		case *ast.CallNode: // a name already rewritten into a getter call
			if s, ok := a.Arguments[0].(*ast.StringNode); ok && len(a.Arguments) == 1 {
				path = s.Value
			}
		default:
			if s, ok := chainPath(a); ok {
				path = s
			}
		}
		if path == "" {
			p.errs = append(p.errs, posErr{offset: n.Arguments[0].Location().From, code: CodeExpr, msg: "stated() takes a name, e.g. stated(\"rig.bleeder\")"})
			return
		}
		if _, ok := p.ns.leaves[path]; !ok && !p.ns.prefixes[path] {
			p.errs = append(p.errs, posErr{offset: n.Arguments[0].Location().From, code: CodeUnknownName, msg: fmt.Sprintf("unknown name %q%s", path, suggest(path, p.candidates(path)))})
			return
		}
		ast.Patch(node, &ast.CallNode{Callee: &ast.IdentifierNode{Value: "Stated"}, Arguments: []ast.Node{&ast.StringNode{Value: path}}})
	}
}

// candidates returns the names sharing path's first segment, for suggestions.
func (p *patcher) candidates(path string) []string {
	root := strings.SplitN(path, ".", 2)[0] + "."
	var c []string
	for n := range p.ns.leaves {
		if strings.HasPrefix(n, root) {
			c = append(c, n)
		}
	}
	for n := range p.ns.prefixes {
		if strings.HasPrefix(n, root) {
			c = append(c, n)
		}
	}
	return c
}

// leftover finds namespace roots or sections that remain unrewritten (a section used as a value).
type leftover struct {
	ns   *namespace
	errs []posErr
}

func (l *leftover) Visit(node *ast.Node) {
	if len(l.errs) > 0 {
		return
	}
	if path, ok := chainPath(*node); ok && l.ns.roots[strings.SplitN(path, ".", 2)[0]] {
		if _, isLeaf := l.ns.leaves[path]; !isLeaf {
			l.errs = append(l.errs, posErr{offset: chainStart(*node), code: CodeUnknownName,
				msg:    fmt.Sprintf("%q is a group of names, not a value", path),
				detail: "name one of its fields, or test stated(\"" + path + "\")"})
		}
	}
}

// mathFuncs are the functions conditions may use beyond expr's builtins. Each returns an error rather than
// a non-finite value.
var mathFuncs = []expr.Option{
	expr.Function("ln", func(a ...any) (any, error) {
		x := a[0].(float64)
		if !(x > 0) || math.IsInf(x, 0) {
			return nil, fmt.Errorf("ln of %g", x)
		}
		return math.Log(x), nil
	}, new(func(float64) float64)),
	// si(value, unit) formats a number as messages do (three figures, SI prefix), for text built inside a
	// placeholder: {stated("x") ? "at " + si(x, "m/s") : ""}.
	expr.Function("si", func(a ...any) (any, error) {
		return FormatQuantity(a[0].(float64), a[1].(string)), nil
	}, new(func(float64, string) string)),
	expr.Function("sqrt", func(a ...any) (any, error) {
		x := a[0].(float64)
		if !(x >= 0) || math.IsInf(x, 0) {
			return nil, fmt.Errorf("sqrt of %g", x)
		}
		return math.Sqrt(x), nil
	}, new(func(float64) float64)),
}

// compileExpr compiles one condition or placeholder against the namespace. asBool demands a boolean.
func compileExpr(ns *namespace, src string, asBool bool) (*vm.Program, []posErr) {
	p := &patcher{ns: ns}
	l := &leftover{ns: ns}
	opts := []expr.Option{expr.Env(&evalEnv{}), expr.Patch(p), expr.Patch(l), expr.Optimize(false)}
	opts = append(opts, mathFuncs...)
	if asBool {
		opts = append(opts, expr.AsBool())
	}
	prog, err := expr.Compile(src, opts...)
	if len(p.errs) > 0 {
		return nil, p.errs
	}
	if len(l.errs) > 0 {
		return nil, l.errs
	}
	if err != nil {
		var fe *file.Error
		if errors.As(err, &fe) {
			return nil, []posErr{{offset: fe.From, code: CodeExpr, msg: fe.Message, detail: "conditions use expr-lang syntax: && || ! == != < <= > >= in [..] ? : and names as listed by 'chargeward rules --names'"}}
		}
		return nil, []posErr{{code: CodeExpr, msg: err.Error()}}
	}
	return prog, nil
}

// scalarPosition maps a rune offset inside a scalar node's value to a 1-based line and column of the file.
// raw is the file's lines. Plain and quoted scalars are mapped on their line; literal and folded block
// scalars line by line (folded joins lines with one space, as YAML does for simple text).
func scalarPosition(raw []string, line, column int, style string, value string, offset int) (int, int) {
	runes := []rune(value)
	if offset < 0 {
		offset = 0
	}
	if offset > len(runes) {
		offset = len(runes)
	}
	switch style {
	case "literal", "folded":
		// The block's indentation is that of its first non-blank line; deeper indentation is content.
		indent := -1
		for l := line + 1; l <= len(raw) && indent < 0; l++ {
			if t := strings.TrimLeft(raw[l-1], " "); t != "" {
				indent = len(raw[l-1]) - len(t)
			}
		}
		if indent < 0 {
			return line, column
		}
		rem := offset
		for l := line + 1; l <= len(raw); l++ {
			content := []rune(raw[l-1])
			if len(content) > indent {
				content = content[indent:]
			} else {
				content = nil
			}
			if rem <= len(content) {
				return l, indent + rem + 1
			}
			rem -= len(content) + 1 // the newline or folding space
		}
		return line, column
	case "quoted":
		return line, column + 1 + offset
	}
	// a plain scalar may itself continue on following lines; keep it on its first line
	return line, column + offset
}
