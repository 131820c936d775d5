package schema

import (
	"fmt"
	"math"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"unicode/utf8"
)

// QuantityError is a problem with one quantity string. Offset and Length locate the bad part within the
// string, in runes, so a loader can place the diagnostic on the exact character.
type QuantityError struct {
	Code    string // UNIT-SYNTAX, UNIT-UNKNOWN, UNIT-DIMENSION, UNIT-MISSING, UNIT-NONFINITE, UNIT-LOOKALIKE
	Offset  int    // rune offset of the problem within the string
	Length  int    // runes to mark; 0: to the end of the token
	Summary string
	Detail  string
}

func (e *QuantityError) Error() string { return e.Summary }

// Unwrap makes errors.Is(err, ErrUnit) true.
func (e *QuantityError) Unwrap() error { return ErrUnit }

// unitSym is one accepted spelling of a unit, in canonical form (see canonUnit), with its factor to the SI
// unit of its dimension and an additive offset (only °C has one).
type unitSym struct {
	sym      string
	exp      int     // decimal exponent of the factor to SI (mm² is 10^-6)
	mult     float64 // a further non-decimal factor (60 for min, π/180 for deg); 0 means 1
	offset   float64
	prefixed bool   // may take an SI prefix applying to the whole symbol
	prefixes string // "" means the standard set
}

const stdPrefixes = "pnuµmkMG"

var prefixExp = map[rune]int{
	'p': -12, 'n': -9, 'u': -6, '\u00b5': -6, 'm': -3, 'c': -2, 'k': 3, 'M': 6, 'G': 9,
}

// Dimensions: the unit names used in the rig model's `unit` tags, with the spellings accepted for each.
// A prefix on a compound symbol applies to the whole of it, as the trade writes "51 kA²s" for 51 000 A²s
// and "150 A/µs"; squared lengths list their prefixed forms explicitly because there the prefix is squared.
var dimensions = map[string][]unitSym{
	"F":   {{sym: "F", prefixed: true}},
	"V":   {{sym: "V", prefixed: true}},
	"A":   {{sym: "A", prefixed: true}},
	"Ω":   {{sym: "Ω", prefixed: true}},
	"H":   {{sym: "H", prefixed: true}},
	"s":   {{sym: "s", prefixed: true}, {sym: "min", mult: 60}, {sym: "h", mult: 3600}},
	"m":   {{sym: "m", prefixed: true, prefixes: stdPrefixes + "c"}},
	"kg":  {{sym: "g", exp: -3, prefixed: true}},
	"J":   {{sym: "J", prefixed: true}},
	"W":   {{sym: "W", prefixed: true}},
	"Hz":  {{sym: "Hz", prefixed: true}},
	"T":   {{sym: "T", prefixed: true}},
	"K":   {{sym: "K"}, {sym: "°C", offset: 273.15}},
	"1":   {{sym: "%", exp: -2}},
	"A²s": {{sym: "A²s", prefixed: true}},
	"A/s": {{sym: "A/s", prefixed: true}, {sym: "A/ms", exp: 3, prefixed: true},
		{sym: "A/us", exp: 6, prefixed: true}, {sym: "A/µs", exp: 6, prefixed: true}, {sym: "A/ns", exp: 9, prefixed: true}},
	"m/s": {{sym: "m/s", prefixed: true}, {sym: "km/h", mult: 1 / 3.6}},
	"VA":  {{sym: "VA", prefixed: true}},
	"m²": {{sym: "m²"}, {sym: "cm²", exp: -4}, {sym: "mm²", exp: -6},
		{sym: "µm²", exp: -12}, {sym: "um²", exp: -12}},
	"Ω·m":   {{sym: "Ωm", prefixed: true}, {sym: "Ωcm", exp: -2, prefixed: true}, {sym: "Ωmm²/m", exp: -6, prefixed: true}},
	"kg/m³": {{sym: "kg/m³"}, {sym: "g/cm³", exp: 3}, {sym: "g/m³", exp: -3}},
	"":      {}, // a plain number without a unit (for a field with no unit tag)
	"rad":   {{sym: "rad", prefixed: true}, {sym: "°", mult: math.Pi / 180}, {sym: "deg", mult: math.Pi / 180}},
}

// dimensionNames names each dimension for messages.
var dimensionNames = map[string]string{
	"F": "a capacitance", "V": "a voltage", "A": "a current", "Ω": "a resistance", "H": "an inductance",
	"s": "a time", "m": "a length", "kg": "a mass", "J": "an energy", "W": "a power", "Hz": "a frequency",
	"T": "a flux density", "K": "a temperature", "1": "a fraction", "A²s": "an action integral (I²t)",
	"A/s": "a rate of rise of current", "m/s": "a speed", "VA": "an apparent power", "m²": "an area",
	"Ω·m": "a resistivity", "kg/m³": "a density", "rad": "an angle", "": "a plain number",
}

// examples gives one typical value per dimension for the fix-it text.
var examples = map[string]string{
	"F": "2200 uF", "V": "450 V", "A": "3.2 kA", "Ω": "10 kΩ", "H": "1.2 mH", "s": "10 ms", "m": "118 mm",
	"kg": "12 g", "J": "150 J", "W": "5 W", "Hz": "50 Hz", "T": "0.5 mT", "K": "155 °C", "1": "10 %",
	"A²s": "51 kA²s", "A/s": "150 A/us", "m/s": "4 m/s", "VA": "250 VA", "m²": "6 mm²", "Ω·m": "2.8e-8 Ω·m",
	"kg/m³": "2700 kg/m³", "rad": "5 deg", "": "0.5",
}

// Units lists the dimension names ParseQuantity accepts as its unit argument.
func Units() []string {
	out := make([]string, 0, len(dimensions))
	for k := range dimensions {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// UnitName describes a dimension for messages and the JSON Schema ("a capacitance").
func UnitName(unit string) string { return dimensionNames[unit] }

// UnitExample is a typical value with its unit for the dimension ("2200 uF").
func UnitExample(unit string) string { return examples[unit] }

// allowedRunes are the non-ASCII characters a quantity may contain.
var allowedRunes = map[rune]bool{
	'\u00b5': true, '\u03bc': true, '\u03a9': true, '\u2126': true, '°': true, '²': true, '³': true, '·': true, '⋅': true,
	'℃': true, '±': true, '\u00a0': true, '\u2009': true, '\u202f': true,
}

// lookAlikes names what a refused character looks like, for the fix-it text.
var lookAlikes = map[rune]string{
	'−': "-", '‐': "-", '‑': "-", '–': "-", '—': "-", '﹣': "-", '－': "-", '٫': ".", '，': ",", '．': ".",
	'А': "A", 'В': "B", 'Е': "E", 'К': "K", 'М': "M", 'Н': "H", 'О': "O", 'Р': "P", 'С': "C", 'Т': "T", 'Х': "X",
	'а': "a", 'е': "e", 'о': "o", 'р': "p", 'с': "c", 'х': "x", 'к': "k", 'м': "m", 'т': "m",
	'Α': "A", 'Β': "B", 'Ε': "E", 'Η': "H", 'Κ': "K", 'Μ': "M", 'Ν': "N", 'Ο': "O", 'Ρ': "P", 'Τ': "T", 'Χ': "X",
	'ο': "o", 'ν': "v", 'κ': "k", 'ω': "Ω", 'ℓ': "l", 'K': "K", 'º': "°", '˚': "°", '′': "'", '″': "\"",
	'\u200b': "(nothing: a zero-width space)", '\ufeff': "(nothing: a byte-order mark)",
}

var numberRE = regexp.MustCompile(`^[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?`)

var (
	ohmRE   = regexp.MustCompile(`(?i)ohms?`)
	degCRE  = regexp.MustCompile(`^degC$`)
	powerRE = regexp.MustCompile(`\^([23])`)
	digitRE = regexp.MustCompile(`([A-Za-zµ])([23])`)
)

// ParseQuantity reads a value of the given dimension (a unit name from the rig model's `unit` tags: "F",
// "V", "Ω", "A²s", "kg/m³", "1", ...) and returns it in SI base units.
//
// s is a decimal number (an exponent is allowed) with an optional unit: an optional SI prefix (p n u µ m k M
// G; c for lengths; u and µ both mean micro) and a unit symbol. A plain number is already in SI units, except
// where that is ambiguous: a temperature (K or °C?), a fraction above 1 (10 meaning 10 %?), and a
// capacitance or inductance of 1 or more (almost always µF or mH meant) need their unit written. °C is
// converted to kelvin; % to a fraction. NaN and infinities are refused. Unicode look-alikes (a minus sign
// "−" for "-", a Cyrillic "В" for "B") are refused at their position. Range checks (negative, zero) are
// the caller's, because they depend on the field.
func ParseQuantity(s string, unit string) (float64, error) {
	dims, ok := dimensions[unit]
	if !ok {
		return 0, &QuantityError{Code: "UNIT-UNKNOWN", Summary: fmt.Sprintf("no such dimension %q", unit), Detail: "This is a program error: the field's unit tag names no known dimension."}
	}
	if off, r, bad := findRefusedRune(s); bad {
		detail := fmt.Sprintf("Character U+%04X is not accepted in a quantity", r)
		if like, ok := lookAlikes[r]; ok {
			detail += fmt.Sprintf("; it looks like %q — type that instead", like)
		}
		return 0, &QuantityError{Code: "UNIT-LOOKALIKE", Offset: off, Length: 1, Summary: fmt.Sprintf("character %q is not accepted in a quantity", string(r)), Detail: detail + "."}
	}
	lead := leadingSpace(s)
	t := strings.TrimRightFunc(s[lead:], isSpace)
	off := utf8.RuneCountInString(s[:lead])
	if unit == "1" {
		if rest, ok := strings.CutPrefix(t, "±"); ok {
			t, off = strings.TrimLeftFunc(rest, isSpace), off+1+utf8.RuneCountInString(rest)-utf8.RuneCountInString(strings.TrimLeftFunc(rest, isSpace))
		} else if rest, ok := strings.CutPrefix(t, "+/-"); ok {
			t, off = strings.TrimLeftFunc(rest, isSpace), off+3+utf8.RuneCountInString(rest)-utf8.RuneCountInString(strings.TrimLeftFunc(rest, isSpace))
		}
	}
	if t == "" {
		return 0, &QuantityError{Code: "UNIT-SYNTAX", Summary: "empty value", Detail: fmt.Sprintf("Write %s with its unit, e.g. %q, or remove the key if it is not known.", dimensionNames[unit], examples[unit])}
	}
	lt := strings.ToLower(strings.TrimPrefix(strings.TrimPrefix(t, "+"), "-"))
	if x := strings.TrimPrefix(lt, "."); strings.HasPrefix(x, "nan") || strings.HasPrefix(x, "inf") {
		return 0, &QuantityError{Code: "UNIT-NONFINITE", Offset: off, Summary: fmt.Sprintf("%q is not a finite number", t), Detail: "Give a real measured or rated value; remove the key if it is not known (a missing value becomes a finding)."}
	}
	num := numberRE.FindString(t)
	if num == "" {
		switch lt {
		case "none", "n/a", "na", "unknown", "?", "tbd", "-":
			return 0, &QuantityError{Code: "UNIT-SYNTAX", Offset: off, Summary: fmt.Sprintf("%q is not a number", t), Detail: "Remove the key when the value is not known: a missing value is reported as a finding, never assumed safe."}
		}
		return 0, &QuantityError{Code: "UNIT-SYNTAX", Offset: off, Summary: fmt.Sprintf("%q does not start with a number", t), Detail: fmt.Sprintf("Write %s as a number and a unit, e.g. %q.", dimensionNames[unit], examples[unit])}
	}
	v, err := strconv.ParseFloat(num, 64)
	if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, &QuantityError{Code: "UNIT-NONFINITE", Offset: off, Length: utf8.RuneCountInString(num), Summary: fmt.Sprintf("%q is too large to be a finite number", num), Detail: "Check the exponent."}
	}
	restRaw := t[len(num):]
	uOff := off + utf8.RuneCountInString(num) + utf8.RuneCountInString(restRaw) - utf8.RuneCountInString(strings.TrimLeftFunc(restRaw, isSpace))
	rest := strings.TrimLeftFunc(restRaw, isSpace)
	if rest != "" && (rest[0] == ',' || rest[0] == '_') && len(rest) > 1 && rest[1] >= '0' && rest[1] <= '9' {
		return 0, &QuantityError{Code: "UNIT-SYNTAX", Offset: uOff, Length: 1, Summary: fmt.Sprintf("%q is not a number", t), Detail: "Use a point for the decimal separator and no digit grouping: 1.5 kV, 2200 uF."}
	}
	if rest == "" {
		return bareNumber(v, unit, t)
	}
	canon := canonUnit(rest)
	if e, m, o, ok := matchUnit(canon, dims); ok {
		return finite(scaled(num, e)*m+o, t, off)
	}
	for _, other := range Units() {
		if other == unit {
			continue
		}
		if _, _, _, ok := matchUnit(canon, dimensions[other]); ok {
			return 0, &QuantityError{Code: "UNIT-DIMENSION", Offset: uOff, Summary: fmt.Sprintf("%q is %s, but this field takes %s", t, dimensionNames[other], dimensionNames[unit]),
				Detail: fmt.Sprintf("Give %s, e.g. %q. Check that the value is in the right field.", dimensionNames[unit], examples[unit])}
		}
	}
	detail := fmt.Sprintf("Write %s with one of the units %s, e.g. %q.", dimensionNames[unit], strings.Join(spellings(unit), ", "), examples[unit])
	summary := fmt.Sprintf("unknown unit %q", rest)
	if m := spelledOut(rest); m != "" {
		summary += fmt.Sprintf(" (did you mean %q?)", m)
	} else if m := Suggest(rest, allSpellings(unit)); m != "" {
		summary += fmt.Sprintf(" (did you mean %q?)", m)
	}
	return 0, &QuantityError{Code: "UNIT-UNKNOWN", Offset: uOff, Summary: summary, Detail: detail}
}

func finite(v float64, t string, off int) (float64, error) {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, &QuantityError{Code: "UNIT-NONFINITE", Offset: off, Summary: fmt.Sprintf("%q is too large to be a finite number", t), Detail: "Check the exponent and the prefix."}
	}
	return v, nil
}

// bareNumber applies the rule that a plain number is in SI units unless that is ambiguous.
func bareNumber(v float64, unit, t string) (float64, error) {
	missing := func(why string) error {
		return &QuantityError{Code: "UNIT-MISSING", Summary: fmt.Sprintf("%s needs its unit: %s", t, why),
			Detail: fmt.Sprintf("Write the unit, e.g. %q.", examples[unit])}
	}
	switch {
	case unit == "K":
		return 0, missing("kelvin or degrees Celsius?")
	case unit == "1" && math.Abs(v) > 1:
		return 0, missing(fmt.Sprintf("a fraction above 1; did you mean %s %%?", t))
	case (unit == "F" || unit == "H") && math.Abs(v) >= 1:
		name := map[string]string{"F": "farads (did you mean uF?)", "H": "henries (did you mean mH or uH?)"}[unit]
		return 0, missing(name)
	}
	return v, nil
}

var unitVariants = strings.NewReplacer("\u03bc", "\u00b5", "\u2126", "\u03a9", "℃", "°C", "⋅", "·")

// canonUnit rewrites the accepted variant spellings into the canonical form of the unit table: ohm → Ω,
// μ (Greek mu) → µ (micro sign), Ω (ohm sign) → Ω, ^2 and a trailing digit → ², separators removed.
func canonUnit(u string) string {
	u = unitVariants.Replace(u)
	u = ohmRE.ReplaceAllString(u, "Ω")
	u = strings.Map(func(r rune) rune {
		switch r {
		case ' ', '\u00a0', '\u2009', '\u202f', '·', '*', '-':
			return -1
		}
		return r
	}, u)
	u = strings.ReplaceAll(u, ".", "")
	if degCRE.MatchString(u) {
		u = "°C"
	}
	u = powerRE.ReplaceAllString(u, "$1")
	u = digitRE.ReplaceAllStringFunc(u, func(m string) string {
		return m[:len(m)-1] + map[byte]string{'2': "²", '3': "³"}[m[len(m)-1]]
	})
	return u
}

// matchUnit finds u among the dimension's spellings, with an optional prefix, and returns the decimal
// exponent, the further factor and the offset that convert a value in that unit to SI.
func matchUnit(u string, dims []unitSym) (exp int, mult, offset float64, ok bool) {
	m := func(d unitSym) float64 {
		if d.mult == 0 {
			return 1
		}
		return d.mult
	}
	for _, d := range dims {
		if u == d.sym {
			return d.exp, m(d), d.offset, true
		}
	}
	r, size := utf8.DecodeRuneInString(u)
	pe, isPrefix := prefixExp[r]
	if !isPrefix {
		return 0, 0, 0, false
	}
	for _, d := range dims {
		ps := d.prefixes
		if ps == "" {
			ps = stdPrefixes
		}
		if d.prefixed && u[size:] == d.sym && strings.ContainsRune(ps, r) {
			return pe + d.exp, m(d), d.offset, true
		}
	}
	return 0, 0, 0, false
}

// scaled returns the decimal number num × 10^exp, correctly rounded (2200 uF is exactly the double nearest
// 2.2e-3, not 2200 × 1e-6).
func scaled(num string, exp int) float64 {
	mant, e := num, 0
	if i := strings.IndexAny(num, "eE"); i >= 0 {
		mant = num[:i]
		n, err := strconv.Atoi(num[i+1:])
		if err != nil || n > 1000 || n < -1000 { // far outside float64: let ParseFloat saturate
			v, _ := strconv.ParseFloat(num, 64)
			return v * math.Pow10(exp)
		}
		e = n
	}
	v, _ := strconv.ParseFloat(fmt.Sprintf("%se%d", mant, e+exp), 64)
	return v
}

// spellings lists the base spellings accepted for a dimension, for messages.
func spellings(unit string) []string {
	var out []string
	for _, d := range dimensions[unit] {
		out = append(out, d.sym)
	}
	if unit == "Ω" || unit == "Ω·m" {
		out = append(out, "ohm")
	}
	if unit == "1" {
		out = append(out, "or a plain fraction")
	}
	return out
}

// allSpellings lists every spelling with every prefix, for suggestions.
func allSpellings(unit string) []string {
	var out []string
	for _, d := range dimensions[unit] {
		out = append(out, d.sym)
		if d.prefixed {
			ps := d.prefixes
			if ps == "" {
				ps = stdPrefixes
			}
			for _, p := range ps {
				out = append(out, string(p)+d.sym)
			}
		}
	}
	return out
}

// unitWords maps spelled-out unit names (lower case, singular) to their symbols, for suggestions.
var unitWords = map[string]string{
	"farad": "F", "volt": "V", "amp": "A", "ampere": "A", "amps": "A", "henry": "H", "henrie": "H", "second": "s",
	"sec": "s", "metre": "m", "meter": "m", "gram": "g", "joule": "J", "watt": "W", "hertz": "Hz", "tesla": "T",
	"kelvin": "K", "celsius": "°C", "percent": "%", "degree": "deg", "radian": "rad",
}

var prefixWords = map[string]string{"pico": "p", "nano": "n", "micro": "u", "milli": "m", "centi": "c", "kilo": "k", "mega": "M", "giga": "G"}

// spelledOut turns "Watts" into "W" and "microfarads" into "uF", or returns "".
func spelledOut(u string) string {
	w := strings.ToLower(strings.TrimSpace(u))
	prefix := ""
	for word, p := range prefixWords {
		if rest, ok := strings.CutPrefix(w, word); ok && rest != "" {
			prefix, w = p, rest
			break
		}
	}
	if sym, ok := unitWords[w]; ok {
		return prefix + sym
	}
	if sym, ok := unitWords[strings.TrimSuffix(w, "s")]; ok {
		return prefix + sym
	}
	return ""
}

// findRefusedRune returns the rune offset of the first character a quantity may not contain.
func findRefusedRune(s string) (int, rune, bool) {
	i := 0
	for _, r := range s {
		if r == utf8.RuneError || (r >= 0x80 && !allowedRunes[r]) || r < 0x20 && r != '\t' || r == 0x7f {
			return i, r, true
		}
		i++
	}
	return 0, 0, false
}

func isSpace(r rune) bool {
	return r == ' ' || r == '\t' || r == '\u00a0' || r == '\u2009' || r == '\u202f'
}

func leadingSpace(s string) int {
	return len(s) - len(strings.TrimLeftFunc(s, isSpace))
}
