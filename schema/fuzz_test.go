package schema

import (
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"
)

// FuzzLoad feeds arbitrary bytes to LoadRig, seeded with the demo rigs and the bad-input corpus (crashers
// found earlier live in testdata/fuzz/FuzzLoad). Invariants: no panic; success gives a rig whose every
// quantity is finite and whose required fields are set; failure gives Diagnostics, each with a code, a
// severity and a position inside the file, and rendering them never fails.
func FuzzLoad(f *testing.F) {
	for _, pattern := range []string{"../testdata/rigs/*.yaml", "../testdata/bad/*.yaml"} {
		files, _ := filepath.Glob(pattern)
		for _, file := range files {
			if data, err := os.ReadFile(file); err == nil {
				f.Add(data)
			}
		}
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		r, err := LoadRig("fuzz.yaml", data)
		if err == nil {
			if r == nil || r.Rig.Name == "" || r.Bank.Capacitance == nil || r.Bank.VoltageRating == nil {
				t.Fatalf("got rig %+v without its required fields, want them set", r)
			}
			if p := nonFinite(reflect.ValueOf(r).Elem(), "rig"); p != "" {
				t.Fatalf("got a non-finite value at %s", p)
			}
			return
		}
		if r != nil {
			t.Fatalf("got a rig and an error, want one of them")
		}
		var ds Diagnostics
		if !errors.As(err, &ds) || len(ds) == 0 {
			t.Fatalf("got %v (%T), want Diagnostics", err, err)
		}
		lines := len(lineStarts(data))
		for _, d := range ds {
			if d.Code == "" || d.Severity != SeverityError || d.Line < 1 || d.Line > lines || d.Column < 1 {
				t.Fatalf("got diagnostic %+v, want a code, error severity and a position within %d lines", d, lines)
			}
		}
		if err := ds.Render(io.Discard, map[string][]byte{"fuzz.yaml": data}); err != nil {
			t.Fatal(err)
		}
	})
}

// nonFinite returns the path of the first NaN or infinite float reachable from v, or "".
func nonFinite(v reflect.Value, path string) string {
	switch v.Kind() {
	case reflect.Pointer:
		if v.IsNil() {
			return ""
		}
		return nonFinite(v.Elem(), path)
	case reflect.Float64:
		if math.IsNaN(v.Float()) || math.IsInf(v.Float(), 0) {
			return path
		}
	case reflect.Struct:
		for i := 0; i < v.NumField(); i++ {
			if v.Type().Field(i).IsExported() {
				if p := nonFinite(v.Field(i), path+"."+v.Type().Field(i).Name); p != "" {
					return p
				}
			}
		}
	case reflect.Slice:
		for i := 0; i < v.Len(); i++ {
			if p := nonFinite(v.Index(i), path+"["+strconv.Itoa(i)+"]"); p != "" {
				return p
			}
		}
	}
	return ""
}

// siSymbol is the unprefixed SI spelling of each dimension, for the round trip below.
var siSymbol = map[string]string{"kg": "kg", "m²": "m²", "Ω·m": "Ω·m", "kg/m³": "kg/m³", "1": ""}

// FuzzParseQuantity checks ParseQuantity on arbitrary text for every dimension: no panic; a result is
// finite; an error is a QuantityError whose offset lies inside the text; and a parsed value written back
// as a plain SI number with its SI symbol parses to exactly the same value (shortest round-trip
// formatting, strconv 'g' with precision -1, is exact by construction).
func FuzzParseQuantity(f *testing.F) {
	for _, s := range []string{"2200 uF", "0.75 kV", "10 kΩ", "1.2 mH", "25 %", "51 kA²s", "150 A/us", "-40 °C", "1e-3",
		"6 mm²", "2,2", "\u2212400 V", "1e999", ".nan", "5 deg", "2.7 g/cm³", "", "±5 %", "4.7 Mohm", "1 cm"} {
		f.Add(s)
	}
	units := Units()
	f.Fuzz(func(t *testing.T, s string) {
		for _, u := range units {
			v, err := ParseQuantity(s, u)
			if err != nil {
				var qe *QuantityError
				if !errors.As(err, &qe) || qe.Code == "" || qe.Offset < 0 || qe.Offset > utf8.RuneCountInString(s) {
					t.Fatalf("ParseQuantity(%q, %q): got %#v, want a QuantityError inside the text", s, u, err)
				}
				continue
			}
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("ParseQuantity(%q, %q) = %v, want finite", s, u, v)
			}
			sym, ok := siSymbol[u]
			if !ok {
				sym = u
			}
			if u == "1" && math.Abs(v) > 1 {
				continue // a bare fraction above 1 is refused as ambiguous
			}
			back := strconv.FormatFloat(v, 'g', -1, 64) + " " + sym
			w, err := ParseQuantity(strings.TrimSpace(back), u)
			if err != nil || w != v {
				t.Fatalf("ParseQuantity(%q, %q) = %v; written back as %q it gives %v, %v", s, u, v, back, w, err)
			}
		}
	})
}
