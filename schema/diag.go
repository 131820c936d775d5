// Package schema reads chargeward's input files — the rig description, and the building blocks that the
// policy and rulebook loaders share — into typed values in SI units, and reports every problem it finds as a
// positioned diagnostic.
//
// Input is YAML 1.2 (read with gopkg.in/yaml.v3 so that every value keeps its line and column), checked
// against a JSON Schema (draft 2020-12, validated with github.com/santhosh-tekuri/jsonschema/v5). Physical
// values are numbers in SI base units or strings with an SI unit ("2200 uF", "0.75 kV"); see ParseQuantity.
//
// Problems are Diagnostics: a stable code, a severity, a terse summary, a detail that says how to fix it,
// and the file, line and column (both 1-based) of the offending value. Loading collects every problem in one
// pass; a slice of diagnostics is an error, usable with errors.Is against the sentinel errors below.
package schema

import (
	"errors"
	"fmt"
	"io"
	"strings"
	"unicode/utf8"
)

// Severity of a diagnostic. The zero value is invalid, so a diagnostic built without one is caught.
type Severity int

// Severities.
const (
	SeverityInvalid Severity = iota
	SeverityError            // the input cannot be used
	SeverityWarning          // the input is used, but something in it is probably not what was meant
)

func (s Severity) String() string {
	switch s {
	case SeverityError:
		return "error"
	case SeverityWarning:
		return "warning"
	}
	return "invalid-severity"
}

// Sentinel errors: every diagnostic unwraps to one of these, by the family of its code, so callers can ask
// errors.Is(err, schema.ErrUnit) without matching codes.
var (
	ErrSyntax   = errors.New("malformed YAML")                         // YAML-SYNTAX, YAML-ENCODING, YAML-EMPTY
	ErrLimit    = errors.New("input exceeds a reader limit")           // YAML-SIZE, YAML-DEPTH, YAML-ALIAS, YAML-MULTIDOC
	ErrRefused  = errors.New("YAML feature not accepted")              // YAML-TAG, YAML-MERGE, YAML-DUPKEY
	ErrField    = errors.New("unknown, missing or mistyped field")     // FIELD-*
	ErrUnit     = errors.New("bad quantity or unit")                   // UNIT-*
	ErrRange    = errors.New("value outside its allowed range")        // *-RANGE
	ErrSchema   = errors.New("input does not satisfy its JSON Schema") // SCHEMA-*
	ErrConflict = errors.New("values contradict each other")           // RIG-CONFLICT
)

// codeSentinels maps code prefixes (longest first wins) to sentinels.
var codeSentinels = []struct {
	prefix string
	err    error
}{
	{"UNIT-RANGE", ErrRange},
	{"FIELD-RANGE", ErrRange},
	{"YAML-SIZE", ErrLimit},
	{"YAML-DEPTH", ErrLimit},
	{"YAML-ALIAS", ErrLimit},
	{"YAML-MULTIDOC", ErrLimit},
	{"YAML-TAG", ErrRefused},
	{"YAML-MERGE", ErrRefused},
	{"YAML-DUPKEY", ErrRefused},
	{"YAML-", ErrSyntax},
	{"FIELD-", ErrField},
	{"UNIT-", ErrUnit},
	{"SCHEMA-", ErrSchema},
	{"RIG-CONFLICT", ErrConflict},
}

// Diagnostic is one problem in an input file.
type Diagnostic struct {
	Severity Severity
	Code     string // stable, e.g. "UNIT-DIMENSION"; documented in DEVELOPERS.md
	Summary  string // one line, no trailing period
	Detail   string // how to fix it
	File     string
	Line     int    // 1-based; 0 when the problem has no position (then Column is 0 too)
	Column   int    // 1-based, counted in characters (runes)
	Path     string // dotted field path, e.g. "bank.capacitance"; "" for the whole file
	// Length is how many characters the renderer marks from Column; 0 marks the scalar token found there.
	Length int
}

// Error formats the diagnostic on one line: "file:line:col: error[CODE]: summary".
func (d Diagnostic) Error() string {
	var b strings.Builder
	b.WriteString(d.File)
	if d.Line > 0 {
		fmt.Fprintf(&b, ":%d:%d", d.Line, d.Column)
	}
	fmt.Fprintf(&b, ": %s[%s]: %s", d.Severity, d.Code, d.Summary)
	return b.String()
}

// Unwrap returns the sentinel error of the diagnostic's code family (nil if none).
func (d Diagnostic) Unwrap() error {
	for _, cs := range codeSentinels {
		if strings.HasPrefix(d.Code, cs.prefix) {
			return cs.err
		}
	}
	return nil
}

// Diagnostics is every problem found in one load. A non-empty Diagnostics is an error.
type Diagnostics []Diagnostic

// Error lists the diagnostics one per line (without source excerpts; see Render).
func (ds Diagnostics) Error() string {
	lines := make([]string, len(ds))
	for i, d := range ds {
		lines[i] = d.Error()
	}
	return strings.Join(lines, "\n")
}

// Unwrap exposes each diagnostic to errors.Is and errors.As.
func (ds Diagnostics) Unwrap() []error {
	errs := make([]error, len(ds))
	for i, d := range ds {
		errs[i] = d
	}
	return errs
}

// HasErrors reports whether any diagnostic has error severity (or an invalid severity, treated as an error).
func (ds Diagnostics) HasErrors() bool {
	for _, d := range ds {
		if d.Severity != SeverityWarning {
			return true
		}
	}
	return false
}

// Err returns ds as an error if it holds an error-severity diagnostic, and nil otherwise.
func (ds Diagnostics) Err() error {
	if ds.HasErrors() {
		return ds
	}
	return nil
}

// Render writes each diagnostic as
//
//	file:line:col: error[CODE]: summary
//	   12 |   capacitance: 400 V
//	      |                ^^^^^
//	   = detail
//
// src maps a file name to its bytes; a diagnostic whose file is not in src (or has no position) is printed
// without the excerpt.
func (ds Diagnostics) Render(w io.Writer, src map[string][]byte) error {
	var b strings.Builder
	for _, d := range ds {
		b.WriteString(d.Error())
		b.WriteByte('\n')
		if line, ok := sourceLine(src[d.File], d.Line); ok && d.Column > 0 {
			num := fmt.Sprintf("%d", d.Line)
			pad := strings.Repeat(" ", len(num))
			fmt.Fprintf(&b, " %s | %s\n", num, line)
			fmt.Fprintf(&b, " %s | %s\n", pad, marker(line, d.Column, d.Length))
		}
		if d.Detail != "" {
			for i, l := range strings.Split(d.Detail, "\n") {
				if i == 0 {
					fmt.Fprintf(&b, "  = %s\n", l)
				} else {
					fmt.Fprintf(&b, "    %s\n", l)
				}
			}
		}
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// lineStarts returns the byte offset at which each line of data begins. Line breaks are counted as the YAML
// parser counts them (libyaml's rules, which yaml.v3 keeps): LF, CR, CR LF, and the Unicode NEL, LS and PS.
func lineStarts(data []byte) []int {
	starts := []int{0}
	for i := 0; i < len(data); i++ {
		switch {
		case data[i] == '\n':
			starts = append(starts, i+1)
		case data[i] == '\r':
			if i+1 < len(data) && data[i+1] == '\n' {
				i++
			}
			starts = append(starts, i+1)
		case data[i] == 0xc2 && i+1 < len(data) && data[i+1] == 0x85: // NEL
			i++
			starts = append(starts, i+1)
		case data[i] == 0xe2 && i+2 < len(data) && data[i+1] == 0x80 && (data[i+2] == 0xa8 || data[i+2] == 0xa9): // LS, PS
			i += 2
			starts = append(starts, i+1)
		}
	}
	return starts
}

// lineEnd returns the offset where the line starting at start ends (before its line break).
func lineEnd(data []byte, starts []int, n int) int {
	end := len(data)
	if n < len(starts) {
		end = starts[n]
	}
	s := string(data[starts[n-1]:end])
	for _, br := range []string{"\r\n", "\n", "\r", "\u0085", "\u2028", "\u2029"} {
		if strings.HasSuffix(s, br) {
			return end - len(br)
		}
	}
	return end
}

// sourceLine returns line n (1-based) of data without its line break, with control characters other than
// tab replaced so that the excerpt cannot disturb a terminal.
func sourceLine(data []byte, n int) (string, bool) {
	if data == nil {
		return "", false
	}
	starts := lineStarts(data)
	if n < 1 || n > len(starts) {
		return "", false
	}
	s := string(data[starts[n-1]:lineEnd(data, starts, n)])
	if len(s) > 400 { // a minified or binary line: show its start only
		s = s[:400]
	}
	s = strings.ToValidUTF8(s, "\uFFFD")
	return strings.Map(func(r rune) rune {
		if r != '\t' && (r < 0x20 || r == 0x7f || (r >= 0x80 && r < 0xa0)) {
			return '\uFFFD'
		}
		return r
	}, s), true
}

// marker builds the ^^^ line under the value that starts at column col (1-based, in runes). Tabs before the
// value are kept so the marker lines up in a terminal.
func marker(line string, col, length int) string {
	runes := []rune(line)
	if col > len(runes)+1 {
		col = len(runes) + 1
	}
	var b strings.Builder
	for _, r := range runes[:col-1] {
		if r == '\t' {
			b.WriteByte('\t')
		} else {
			b.WriteByte(' ')
		}
	}
	if length <= 0 {
		length = tokenLength(runes[col-1:])
	}
	b.WriteString(strings.Repeat("^", max(length, 1)))
	return b.String()
}

// tokenLength is the length of the value starting at rest: up to a comment (" #") or the end of the line,
// without trailing blanks; a quoted value ends at its closing quote.
func tokenLength(rest []rune) int {
	if len(rest) == 0 {
		return 1
	}
	if q := rest[0]; q == '"' || q == '\'' {
		for i := 1; i < len(rest); i++ {
			if rest[i] == q && (q == '\'' || rest[i-1] != '\\') {
				return i + 1
			}
		}
		return len(rest)
	}
	n := len(rest)
	for i := 1; i < len(rest); i++ {
		if rest[i] == '#' && (rest[i-1] == ' ' || rest[i-1] == '\t') {
			n = i
			break
		}
		if rest[i] == ':' && (i+1 == len(rest) || rest[i+1] == ' ') { // a key: mark the key only
			n = i
			break
		}
	}
	for n > 1 && (rest[n-1] == ' ' || rest[n-1] == '\t') {
		n--
	}
	return n
}

// Suggest returns the candidate closest to s by edit distance, if it is close enough to be a plausible typo
// (distance at most a third of the longer word, and at most 3), or "" if none is. Case is ignored.
func Suggest(s string, candidates []string) string {
	best, bestD := "", 1<<30
	ls := strings.ToLower(s)
	for _, c := range candidates {
		d := editDistance(ls, strings.ToLower(c))
		if d < bestD {
			best, bestD = c, d
		}
	}
	limit := min(3, max(1, max(utf8.RuneCountInString(s), utf8.RuneCountInString(best))/3))
	if best == "" || bestD > limit {
		return ""
	}
	return best
}

// didYouMean formats a suggestion as a sentence fragment, or "" if there is none.
func didYouMean(s string, candidates []string) string {
	if m := Suggest(s, candidates); m != "" {
		return fmt.Sprintf("did you mean %q? ", m)
	}
	return ""
}

// editDistance is the Levenshtein distance between a and b, in runes.
func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			cost := 1
			if ra[i-1] == rb[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}
