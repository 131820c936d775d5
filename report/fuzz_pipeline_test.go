package report

import (
	"bytes"
	"encoding/json"
	"errors"
	"math/rand"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"chargeward/hazards"
	"chargeward/internal/riggen"
	"chargeward/rules"
	"chargeward/schema"
)

// FuzzReview runs the whole pipeline from bytes to review: schema.LoadRig → hazards.Assess against the
// default policy's targets → Evaluate → PDF, text and JSON written to memory. Seeds are the demo rigs, the
// hostile corpus and a few generated rigs; crashers found earlier live in testdata/fuzz/FuzzReview.
// Invariants: no panic; a rig that does not load gives positioned Diagnostics; a physics error is an
// ordinary error naming its stage; a review that renders holds no NaN or Inf in its text or JSON and gives
// a PDF.
func FuzzReview(f *testing.F) {
	for _, pattern := range []string{"../testdata/rigs/*.yaml", "../testdata/hostile/rig-*.yaml"} {
		files, _ := filepath.Glob(pattern)
		for _, file := range files {
			if data, err := os.ReadFile(file); err == nil {
				f.Add(data)
			}
		}
	}
	r := rand.New(rand.NewSource(8))
	for i := 0; i < 4; i++ {
		f.Add([]byte(riggen.Rig(r, riggen.Options{Launch: i%2 == 0})))
	}
	set, err := rules.Default()
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		rig, err := schema.LoadRig("fuzz.yaml", data)
		if err != nil {
			var ds schema.Diagnostics
			if !errors.As(err, &ds) || len(ds) == 0 {
				t.Fatalf("got %v (%T), want Diagnostics", err, err)
			}
			for _, d := range ds {
				if d.Line < 1 || d.Column < 1 {
					t.Fatalf("got diagnostic %+v, want a position", d)
				}
			}
			return
		}
		a, err := hazards.Assess(rig, set.Targets())
		if err != nil {
			if err.Error() == "" || !strings.Contains(err.Error(), ":") {
				t.Fatalf("got physics error %q, want one naming its stage", err)
			}
			return
		}
		rv, err := set.Evaluate(a)
		if err != nil {
			t.Fatalf("default rulebook over a loaded rig: %v", err)
		}
		var pdf, text, js bytes.Buffer
		if err := PDF(&pdf, rv, Options{Date: reviewDate, Version: "fuzz"}); err != nil {
			t.Fatalf("PDF: %v", err)
		}
		if !bytes.HasPrefix(pdf.Bytes(), []byte("%PDF-")) {
			t.Fatalf("got PDF starting %q, want %%PDF-", pdf.Bytes()[:min(8, pdf.Len())])
		}
		if err := Text(&text, rv, Options{Date: reviewDate, Version: "fuzz"}); err != nil {
			t.Fatalf("Text: %v", err)
		}
		if err := JSON(&js, rv, Options{Date: reviewDate, Version: "fuzz"}); err != nil {
			t.Fatalf("JSON: %v", err)
		}
		if !json.Valid(js.Bytes()) {
			t.Fatal("got invalid JSON")
		}
		for _, out := range []struct{ name, s string }{{"text", text.String()}, {"JSON", js.String()}} {
			for _, bad := range []string{"NaN", "Inf"} {
				if i := strings.Index(out.s, bad); i >= 0 && !fzInEcho(out.s, i, data) {
					t.Fatalf("got %q in the %s output near %q, want finite numbers", bad, out.name, fzAround(out.s, i))
				}
			}
		}
	})
}

// fzInEcho reports whether the text at i is a word the rig itself contains (a name such as "Infinity bench"
// is echoed, not computed).
func fzInEcho(s string, i int, rig []byte) bool {
	lo, hi := i, i
	for lo > 0 && fzIsWord(s[lo-1]) {
		lo--
	}
	for hi < len(s) && fzIsWord(s[hi]) {
		hi++
	}
	return bytes.Contains(rig, []byte(s[lo:hi]))
}

func fzIsWord(c byte) bool {
	return c == '_' || c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c >= 0x80
}

func fzAround(s string, i int) string {
	return s[max(0, i-40):min(len(s), i+40)]
}
