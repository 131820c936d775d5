package schema

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"regexp"
	"strconv"
	"strings"
	"unicode/utf8"

	"gopkg.in/yaml.v3"
)

// Limits of the hardened YAML reader. They are far above what a real rig, policy or rulebook needs and far
// below what would let a hostile file exhaust memory or time.
const (
	MaxFileSize      = 1 << 20 // bytes (1 MiB)
	MaxDepth         = 32      // nesting of mappings and sequences
	MaxAliasExpanded = 1000    // nodes reached through aliases, counted with repetition
)

// ReadYAML parses one YAML document and returns its root node, refusing what chargeward's input files never
// need and a hostile file could abuse: more than MaxFileSize bytes, invalid UTF-8, more than one document,
// duplicate mapping keys, explicit tags (!!binary, !custom), merge keys (<<), aliases that expand to more
// than MaxAliasExpanded nodes, and nesting deeper than MaxDepth. Aliases within the limit are resolved by
// the caller following Node.Alias. Every problem found is returned; the node is nil if the document could
// not be parsed at all.
func ReadYAML(name string, data []byte) (root *yaml.Node, diags Diagnostics) {
	at := func(line, col int, code, summary, detail string) Diagnostic {
		return Diagnostic{Severity: SeverityError, Code: code, Summary: summary, Detail: detail, File: name, Line: line, Column: col}
	}
	if len(data) > MaxFileSize {
		return nil, Diagnostics{at(1, 1, "YAML-SIZE", fmt.Sprintf("file is %d bytes, more than the %d-byte limit", len(data), MaxFileSize),
			"A rig, policy or rulebook file is a few kilobytes; check that this is the file you meant.")}
	}
	if !utf8.Valid(data) {
		off := firstInvalidUTF8(data)
		line, col := lineCol(data, off)
		return nil, Diagnostics{at(line, col, "YAML-ENCODING", "file is not valid UTF-8",
			"Save the file as UTF-8 (the usual default); this byte cannot be read as text.")}
	}
	if off := firstControl(data); off >= 0 {
		line, col := lineCol(data, off)
		r, _ := utf8.DecodeRune(data[off:])
		return nil, Diagnostics{at(line, col, "YAML-ENCODING", fmt.Sprintf("control or line-separator character U+%04X in the file", r),
			"Remove it; only tab, line feed and carriage return may appear in a text file.")}
	}
	defer func() {
		if r := recover(); r != nil { // the YAML library must never take the program down
			root = nil
			diags = Diagnostics{at(1, 1, "YAML-SYNTAX", "the YAML parser could not read this file", fmt.Sprint(r))}
		}
	}()
	dec := yaml.NewDecoder(bytes.NewReader(data))
	var doc yaml.Node
	if err := dec.Decode(&doc); err != nil {
		if errors.Is(err, io.EOF) {
			return nil, Diagnostics{at(1, 1, "YAML-EMPTY", "file holds no YAML document", "Write the description as YAML mappings; run 'chargeward example' for a complete one.")}
		}
		return nil, Diagnostics{syntaxDiag(name, data, err)}
	}
	var extra yaml.Node
	if err := dec.Decode(&extra); !errors.Is(err, io.EOF) {
		line := secondDocLine(data, doc.Line)
		if err == nil && extra.Line > 0 {
			line = extra.Line
		}
		diags = append(diags, at(line, 1, "YAML-MULTIDOC", "file holds more than one YAML document",
			"Put one description in each file; remove the '---' separator and what follows, or split the file."))
	}
	if len(doc.Content) == 0 {
		return nil, append(diags, at(1, 1, "YAML-EMPTY", "file holds no YAML document", "Write the description as YAML mappings; run 'chargeward example' for a complete one."))
	}
	root = doc.Content[0]
	if root.Kind == yaml.ScalarNode && root.Tag == "!!null" && root.Value == "" {
		// "---" alone (or with comments) is an empty document; yaml.v3 places its null after the marker,
		// on a line the file may not have.
		return nil, append(diags, at(1, 1, "YAML-EMPTY", "file holds no YAML document", "Write the description as YAML mappings; run 'chargeward example' for a complete one."))
	}
	w := walker{name: name, memo: map[*yaml.Node]int{}}
	w.check(root, 1)
	diags = append(diags, w.diags...)
	if w.deep {
		root = nil // too deep to walk safely
	}
	if expanded := w.expanded(root, 0); !w.deep && expanded > MaxAliasExpanded+w.plain {
		diags = append(diags, at(root.Line, root.Column, "YAML-ALIAS", fmt.Sprintf("aliases expand to more than %d nodes", MaxAliasExpanded),
			"Write the values out instead of repeating large anchored blocks with aliases (*name)."))
		root = nil
	}
	return root, diags
}

// walker checks a node tree for refused features.
type walker struct {
	name  string
	diags Diagnostics
	memo  map[*yaml.Node]int
	plain int // nodes in the tree not counting alias expansion
	deep  bool
}

func (w *walker) add(n *yaml.Node, code, summary, detail string) {
	w.diags = append(w.diags, Diagnostic{Severity: SeverityError, Code: code, Summary: summary, Detail: detail, File: w.name, Line: n.Line, Column: n.Column})
}

func (w *walker) check(n *yaml.Node, depth int) {
	w.plain++
	if depth > MaxDepth {
		if !w.deep {
			w.add(n, "YAML-DEPTH", fmt.Sprintf("nesting deeper than %d levels", MaxDepth), "Chargeward's files nest a few levels; flatten this structure.")
			w.deep = true
		}
		return
	}
	if n.Style&yaml.TaggedStyle != 0 {
		w.add(n, "YAML-TAG", fmt.Sprintf("explicit YAML tag %q is not accepted", n.Tag), "Remove the tag; write the value plainly (quote it if it must stay text).")
	}
	switch n.Kind {
	case yaml.MappingNode:
		seen := map[string]*yaml.Node{}
		for i := 0; i+1 < len(n.Content); i += 2 {
			k := n.Content[i]
			if k.Kind == yaml.ScalarNode && k.Tag == "!!merge" {
				w.add(k, "YAML-MERGE", "merge keys (<<) are not accepted", "Write the keys out in this mapping instead of merging another one in.")
			} else if k.Kind == yaml.ScalarNode {
				if first, dup := seen[k.Value]; dup {
					w.add(k, "YAML-DUPKEY", fmt.Sprintf("key %q appears twice in this mapping", k.Value),
						fmt.Sprintf("It was first given at line %d; keep one of them (later values would silently win in other tools).", first.Line))
				} else {
					seen[k.Value] = k
				}
			}
			w.check(k, depth+1)
			w.check(n.Content[i+1], depth+1)
		}
	case yaml.SequenceNode:
		for _, c := range n.Content {
			w.check(c, depth+1)
		}
	}
}

// expanded counts the nodes of n with every alias replaced by its target, stopping early once the count is
// far over the limit (the count is memoized per node, so a billion-laughs file costs linear time).
func (w *walker) expanded(n *yaml.Node, depth int) int {
	if n == nil || depth > 4*MaxDepth {
		return MaxAliasExpanded * 2
	}
	if v, ok := w.memo[n]; ok {
		return v
	}
	w.memo[n] = MaxAliasExpanded * 2 // a cycle counts as over the limit
	total := 1
	if n.Kind == yaml.AliasNode {
		total += w.expanded(n.Alias, depth+1)
	}
	for _, c := range n.Content {
		total += w.expanded(c, depth+1)
		if total > 1<<40 {
			break
		}
	}
	w.memo[n] = total
	return total
}

var yamlLineRE = regexp.MustCompile(`line (\d+)`)

// syntaxDiag converts a yaml.v3 error into a diagnostic. yaml.v3 names a line but no column, and for
// parser errors the line it names is where the enclosing structure began, not where it broke. So the
// first line at which a prefix of the file stops parsing with the same message is searched for (by
// bisection; prefixes cut at line ends), and the diagnostic is placed on that line's first non-blank
// character — or on a tab in its indentation, the commonest cause.
func syntaxDiag(name string, data []byte, err error) Diagnostic {
	msg := strings.TrimPrefix(err.Error(), "yaml: ")
	line := 1
	if m := yamlLineRE.FindStringSubmatch(msg); m != nil {
		if n, e := strconv.Atoi(m[1]); e == nil && n > 0 {
			line = n
		}
		msg = strings.TrimSpace(strings.Replace(msg, m[0]+":", "", 1))
	}
	if l := failingLine(data, msg); l > 0 {
		line = l
	}
	col := 1
	detail := "Check the indentation (spaces only, no tabs) and that each key is followed by ': ' and a value; quote values that contain ': ' or start with a special character."
	if l, ok := sourceLine(data, line); ok {
		indent := l[:len(l)-len(strings.TrimLeft(l, " \t"))]
		if i := strings.IndexByte(indent, '\t'); i >= 0 {
			col = i + 1
			detail = "Indent with spaces: YAML does not allow tabs in indentation."
		} else if strings.TrimSpace(l) != "" {
			col = 1 + utf8.RuneCountInString(indent)
		}
	} else {
		line = len(lineStarts(data))
	}
	return Diagnostic{Severity: SeverityError, Code: "YAML-SYNTAX", Summary: "YAML syntax: " + msg, Detail: detail, File: name, Line: line, Column: col}
}

// failingLine returns the smallest k such that the first k lines of data fail to parse with an error whose
// text (without its line number) is msg, or 0 if bisection finds none.
func failingLine(data []byte, msg string) int {
	ends := append(lineStarts(data)[1:], len(data))
	fails := func(k int) bool {
		var n yaml.Node
		err := yaml.Unmarshal(data[:ends[k-1]], &n)
		if err == nil {
			return false
		}
		m := strings.TrimPrefix(err.Error(), "yaml: ")
		if lm := yamlLineRE.FindString(m); lm != "" {
			m = strings.TrimSpace(strings.Replace(m, lm+":", "", 1))
		}
		return m == msg
	}
	lo, hi := 1, len(ends)
	if !fails(hi) {
		return 0
	}
	for lo < hi {
		mid := (lo + hi) / 2
		if fails(mid) {
			hi = mid
		} else {
			lo = mid + 1
		}
	}
	return lo
}

// secondDocLine finds the line of the document separator after the first document's start.
func secondDocLine(data []byte, after int) int {
	for i, st := range lineStarts(data) {
		if l := data[st:]; i+1 > after && (bytes.HasPrefix(l, []byte("---")) || bytes.HasPrefix(l, []byte("..."))) {
			return i + 1
		}
	}
	return max(after, 1)
}

// firstControl returns the byte offset of the first C0 control character other than tab, LF and CR (or
// DEL), C1 control character, or U+2028/U+2029 line or paragraph separator, or -1.
func firstControl(data []byte) int {
	for i, c := range data {
		if (c < 0x20 && c != '\t' && c != '\n' && c != '\r') || c == 0x7f {
			return i
		}
		// C1 controls (U+0080–U+009F) and the Unicode line and paragraph separators (U+2028, U+2029): the
		// YAML parser breaks lines at NEL, LS and PS where editors do not, so positions would disagree.
		if c == 0xc2 && i+1 < len(data) && data[i+1] >= 0x80 && data[i+1] <= 0x9f {
			return i
		}
		if c == 0xe2 && i+2 < len(data) && data[i+1] == 0x80 && (data[i+2] == 0xa8 || data[i+2] == 0xa9) {
			return i
		}
	}
	return -1
}

func firstInvalidUTF8(data []byte) int {
	for i := 0; i < len(data); {
		r, size := utf8.DecodeRune(data[i:])
		if r == utf8.RuneError && size <= 1 {
			return i
		}
		i += size
	}
	return len(data)
}

// lineCol converts a byte offset into a 1-based line and rune column.
func lineCol(data []byte, off int) (int, int) {
	off = min(off, len(data))
	starts := lineStarts(data[:off])
	return len(starts), utf8.RuneCount(data[starts[len(starts)-1]:off]) + 1
}
