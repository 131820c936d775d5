package report

import (
	"bytes"
	"crypto/sha256"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"os/exec"
	"path"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goitalic"
	"golang.org/x/image/font/gofont/gomono"
	"golang.org/x/image/font/gofont/gomonobold"
	"golang.org/x/image/font/gofont/goregular"

	"chargeward"
	"chargeward/hazards"
	"chargeward/rules"
	"chargeward/schema"
)

var reviewDate = time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC)

func renderFixture(t *testing.T, r *rules.Review) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := PDF(&b, r, Options{Date: reviewDate, Reviewer: "J. Q. Reviewer", Version: "0.1.0"}); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

// pdfText extracts the text with pdftotext (poppler-utils), skipping where it is not installed.
func pdfText(t *testing.T, pdf []byte) string {
	t.Helper()
	if _, err := exec.LookPath("pdftotext"); err != nil {
		t.Skip("pdftotext (poppler-utils) not installed: apt-get install poppler-utils")
	}
	f := filepath.Join(t.TempDir(), "review.pdf")
	if err := os.WriteFile(f, pdf, 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command("pdftotext", "-enc", "UTF-8", f, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	return string(out)
}

func TestPDFText(t *testing.T) {
	r := fixtureReview(t, 9, "Bench demo thrower")
	pdf := renderFixture(t, r)
	text := pdfText(t, pdf)
	n := bytes.Count(pdf, []byte("/Type /Page\n"))
	want := []string{
		"Verdict: NOT READY",
		"Not ready: do not operate the rig",
		Fingerprint(r, "0.1.0"),
		"2026-12-01", "J. Q. Reviewer", "chargeward 0.1.0",
		// key quantities as SI prints them (TestSI checks the formatting against the SI Brochure)
		"547 J", "656 J", "3.27 kA", "3.61 kA", "586 s", "2.2 mF", "2.64 mF", "1.5 mΩ", "5.12×10⁴ A²s",
		"E = ½·C·V²", "switch.di_dt_critical",
		// the figures' axes, with quantity and prefixed unit, and the reference lines
		"bank voltage (V)", "time (ms)", "current (kA)", "height (m)", "safe voltage 50 V", "time allowed 60 s", "ceiling 2.7 m",
		// checklist, cautions, sign-off, appendix
		"Charging and firing", "bank voltage before touching, V", "initials",
		"does not replace local codes", "qualified and licensed persons", "verify the description by measurement",
		"department safety officer", "Conditions of approval",
		"valid only for revision C of the rig above; any change to the rig requires a new review",
		"capacitance: 2200 uF", "Ω µ ² ° ≤ ± must print",
		"discharge.time_allowed", "120 s", "60 s",
		fmt.Sprintf("page 1 of %d", n), fmt.Sprintf("page %d of %d", n, n),
	}
	for _, f := range r.Findings {
		want = append(want, f.Rule)
	}
	norm := strings.Join(strings.Fields(text), " ")
	for _, w := range want {
		if !strings.Contains(norm, w) {
			t.Errorf("PDF text lacks %q", w)
		}
	}
}

func TestPDFDeterministic(t *testing.T) {
	// The embedded fonts must come out of a rendering unchanged, or the next rendering in the same process
	// embeds a different subset (fpdf's subsetter writes into the bytes it is given).
	fonts := [][]byte{goregular.TTF, gobold.TTF, goitalic.TTF, gomono.TTF, gomonobold.TTF}
	var before [][32]byte
	for _, f := range fonts {
		before = append(before, sha256.Sum256(f))
	}
	r := fixtureReview(t, 12, "Bench demo thrower")
	defer func() {
		for i, f := range fonts {
			if sha256.Sum256(f) != before[i] {
				t.Errorf("font %d: its bytes changed during rendering, want them untouched", i)
			}
		}
	}()
	a, b := renderFixture(t, r), renderFixture(t, fixtureReview(t, 12, "Bench demo thrower"))
	if !bytes.Equal(a, b) {
		t.Errorf("two renderings of the same review differ (%d and %d bytes)", len(a), len(b))
	}
	var c bytes.Buffer
	if err := PDF(&c, r, Options{Date: reviewDate.AddDate(0, 0, 1), Reviewer: "J. Q. Reviewer", Version: "0.1.0"}); err != nil {
		t.Fatal(err)
	}
	if bytes.Equal(a, c.Bytes()) {
		t.Errorf("a different review date gives the same bytes, want different")
	}
}

func TestPDFQpdfCheck(t *testing.T) {
	if _, err := exec.LookPath("qpdf"); err != nil {
		t.Skip("qpdf not installed: apt-get install qpdf")
	}
	for _, tt := range layoutCases(t) {
		t.Run(tt.name, func(t *testing.T) {
			f := filepath.Join(t.TempDir(), "review.pdf")
			if err := os.WriteFile(f, renderFixture(t, tt.r), 0o644); err != nil {
				t.Fatal(err)
			}
			out, err := exec.Command("qpdf", "--check", f).CombinedOutput()
			if err != nil || !bytes.Contains(out, []byte("No syntax or stream encoding errors")) {
				t.Errorf("qpdf --check: got %v\n%s", err, out)
			}
		})
	}
}

type layoutCase struct {
	name string
	r    *rules.Review
}

func layoutCases(t *testing.T) []layoutCase {
	long := fixtureReview(t, 240, strings.Repeat("Extremely long rig name with many words and a Ω µ ² ° ≤ ± tail ", 6)+
		"Supercalifragilisticexpialidociouslylongwordwithoutanyspacesatallthatmustbesplitbetweencharacters")
	long.Assessment.Rig.Rig.Revision = strings.Repeat("rev-", 40)
	long.Assessment.Rig.Rig.Owner = strings.Repeat("owner ", 60)
	long.Assessment.Rig.Source.Raw = []byte(strings.Repeat("key: "+strings.Repeat("x", 300)+"\n\ttabbed: 1 # comment\n", 120))
	for i := range long.Findings {
		long.Findings[i].Message = strings.Repeat("A long message with numbers 3.27 kA and 586 s. ", 12)
		long.Findings[i].Controls = append(long.Findings[i].Controls, strings.Repeat("control text ", 30))
	}
	for i := 0; i < 80; i++ {
		long.Checklist = append(long.Checklist, rules.ChecklistItem{Phase: rules.Phase(i%5 + 1),
			Text: strings.Repeat("step text ", 1+i%25), Measured: "a measured value with a long label, V", From: []string{"TSH-00", "TST-01"}})
	}
	empty := fixtureReview(t, 0, "")
	empty.Assessment = &hazards.Assessment{Rig: empty.Assessment.Rig, Targets: hazards.Targets{}}
	empty.Assessment.Rig.Source.Raw = nil
	empty.Checklist = nil
	empty.Overrides = nil
	empty.Thresholds = nil
	empty.Verdict = rules.Ready
	// Text that PDF strings and the fonts must survive: delimiters and escapes of PDF literal strings
	// (ISO 32000-1 §7.3.4.2), characters outside the fonts and outside the BMP, control characters.
	hostile := fixtureReview(t, 3, `Rig (with) \back\slashes) and ) unbalanced ( 😀 中文 ✓ `+"\x00\x07\t tab")
	hostile.Assessment.Rig.Rig.Revision = `r) (\`
	hostile.Findings[0].Message = `a (b) \c ) ( %% 😀 ∈ ⌊x⌋`
	hostile.Assessment.Rig.Source.Raw = []byte("name: \"(x)\" \\ 😀\r\nnext: \x01\n")
	cases := []layoutCase{{"demo", fixtureReview(t, 9, "Bench demo thrower")}, {"many findings and long names", long}, {"empty", empty},
		{"hostile text", hostile}}
	return append(cases, demoRigCases(t)...)
}

var demoCache []layoutCase

// demoRigCases runs the shipped demo rigs through the real pipeline (schema, hazards, default rules), so
// that the layout is also checked on real findings, quantities and curves.
func demoRigCases(t *testing.T) []layoutCase {
	t.Helper()
	if demoCache != nil {
		return demoCache // rendering does not change a review; the physics runs once per test binary
	}
	set, err := rules.Default()
	if err != nil {
		t.Fatal(err)
	}
	names, err := fs.Glob(chargeward.Demos, "testdata/rigs/*.yaml")
	if err != nil || len(names) == 0 {
		t.Fatalf("demo rigs: got %v, %v", names, err)
	}
	var cases []layoutCase
	for _, n := range names {
		b, err := fs.ReadFile(chargeward.Demos, n)
		if err != nil {
			t.Fatal(err)
		}
		rig, err := schema.LoadRig(n, b)
		if err != nil {
			t.Fatalf("%s: %v", n, err)
		}
		a, err := hazards.Assess(rig, set.Targets())
		if err != nil {
			t.Fatalf("%s: %v", n, err)
		}
		rv, err := set.Evaluate(a)
		if err != nil {
			t.Fatalf("%s: %v", n, err)
		}
		cases = append(cases, layoutCase{"demo rig " + path.Base(n), rv})
	}
	demoCache = cases
	return cases
}

// TestPDFLayout checks the layout model of every page: every mark inside the printable area (body between
// header and footer), no text wider than its box, and no two marks on a page overlapping.
func TestPDFLayout(t *testing.T) {
	const eps = 0.05 // mm; fpdf rounds coordinates to 0.01 pt, and text widths are sums of rounded advances
	for _, tt := range layoutCases(t) {
		t.Run(tt.name, func(t *testing.T) {
			d, err := layout(tt.r, Options{Date: reviewDate, Reviewer: "J. Q. Reviewer", Version: "0.1.0"}, 0)
			if err != nil {
				t.Fatal(err)
			}
			pages := map[int][]box{}
			for _, b := range d.boxes {
				pages[b.Page] = append(pages[b.Page], b)
				top, bottom := bodyTop, bodyBottom
				switch b.Kind {
				case "header":
					top, bottom = headerY, bodyTop
				case "footer":
					top, bottom = footerY, pageH-5
				}
				if b.X < marginL-eps || b.X+b.W > pageW-marginR+eps || b.Y < top-eps || b.Y+b.H > bottom+eps {
					t.Errorf("page %d: %s box %q at (%.1f, %.1f, %.1f × %.1f) leaves its area x∈[%g, %g] y∈[%g, %g]",
						b.Page, b.Kind, b.Text, b.X, b.Y, b.W, b.H, marginL, pageW-marginR, top, bottom)
				}
				if b.TextW > b.W+eps {
					t.Errorf("page %d: %s text %q is %.2f mm wide in a %.2f mm box", b.Page, b.Kind, b.Text, b.TextW, b.W)
				}
			}
			overlaps := 0
			for p, bs := range pages {
				for i := range bs {
					for j := i + 1; j < len(bs); j++ {
						a, b := bs[i], bs[j]
						if a.X+eps < b.X+b.W && b.X+eps < a.X+a.W && a.Y+eps < b.Y+b.H && b.Y+eps < a.Y+a.H {
							if overlaps++; overlaps <= 10 {
								t.Errorf("page %d: %s %q (%.1f, %.1f, %.1f × %.1f) overlaps %s %q (%.1f, %.1f, %.1f × %.1f)",
									p, a.Kind, a.Text, a.X, a.Y, a.W, a.H, b.Kind, b.Text, b.X, b.Y, b.W, b.H)
							}
						}
					}
				}
			}
			// No heading is the last thing on its page: each keeps with what follows.
			for p, bs := range pages {
				last := -1
				for i, b := range bs {
					if b.Kind != "header" && b.Kind != "footer" && (last < 0 || b.Y > bs[last].Y) {
						last = i
					}
				}
				if last >= 0 && bs[last].Kind == "heading" {
					t.Errorf("page %d ends with the heading %q, want it kept with what follows", p, bs[last].Text)
				}
			}
			if len(d.boxes) == 0 || len(pages) != d.pdf.PageCount() {
				t.Errorf("got %d boxes on %d pages of %d, want marks on every page", len(d.boxes), len(pages), d.pdf.PageCount())
			}
		})
	}
}

func TestPDFRefuses(t *testing.T) {
	r := fixtureReview(t, 1, "x")
	tests := []struct {
		name string
		r    *rules.Review
		opt  Options
		want error
	}{
		{"no date", r, Options{Version: "0.1.0"}, ErrNoDate},
		{"no review", nil, Options{Date: reviewDate}, ErrNoReview},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var b bytes.Buffer
			err := PDF(&b, tt.r, tt.opt)
			if !errors.Is(err, tt.want) || b.Len() != 0 {
				t.Errorf("got %v and %d bytes, want %v and nothing written", err, b.Len(), tt.want)
			}
		})
	}
}

func TestReadFingerprint(t *testing.T) {
	for _, c := range layoutCases(t) {
		pdf := renderFixture(t, c.r)
		got, err := ReadFingerprint(pdf)
		if err != nil || got != Fingerprint(c.r, "0.1.0") {
			t.Errorf("%s: got %q, %v, want %q", c.name, got, err, Fingerprint(c.r, "0.1.0"))
		}
	}
	r := fixtureReview(t, 3, "Bench demo thrower")
	pdf := renderFixture(t, r)
	if v := ReadVersion(pdf); v != "0.1.0" {
		t.Errorf("version: got %q, want %q", v, "0.1.0")
	}
	other := bytes.Replace(pdf, []byte("%%EOF"), []byte("/Keywords (chargeward-fingerprint:"+strings.Repeat("0", 64)+")\n%%EOF"), 1)
	tests := []struct {
		name string
		in   []byte
	}{
		{"not a PDF", []byte("rig:\n  name: x\n")},
		{"no fingerprint", []byte("%PDF-1.3\n%%EOF\n")},
		{"two fingerprints", other},
		{"empty", nil},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if fp, err := ReadFingerprint(tt.in); err == nil {
				t.Errorf("got %q, nil, want an error", fp)
			}
		})
	}
}

// The Go fonts cover the WGL4 character set (from memory; their README names Bigelow & Holmes and WGL4), so
// the characters of SI units print; a CJK character or a check mark (not in WGL4) must become '?'.
func TestCleanGlyphs(t *testing.T) {
	d, err := layout(fixtureReview(t, 0, "x"), Options{Date: reviewDate}, 0)
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct{ in, want string }{
		{"Ω µ ² ° ≤ ± · × ½ ⁻⁸ —", "Ω µ ² ° ≤ ± · × ½ ⁻⁸ —"},
		{"中 ✓", "? ?"},
		{"C ∈ {a, b}; ⌊x⌋; a ≪ b; Mᵀ", "C in {a, b}; floor(x); a << b; M^T"},
		{"a\tb\x01", "a    b?"},
	}
	for _, tt := range tests {
		t.Run(tt.in, func(t *testing.T) {
			if got := d.clean(tt.in); got != tt.want {
				t.Errorf("got %q, want %q", got, tt.want)
			}
		})
	}
}

// BenchmarkPDF renders the demo review (9 findings, 4 figures, 10 pages) from scratch, both passes.
func BenchmarkPDF(b *testing.B) {
	r := fixtureReview(b, 9, "Bench demo thrower")
	opt := Options{Date: reviewDate, Reviewer: "J. Q. Reviewer", Version: "0.1.0"}
	for b.Loop() {
		if err := PDF(io.Discard, r, opt); err != nil {
			b.Fatal(err)
		}
	}
}
