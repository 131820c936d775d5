package main

import (
	"bytes"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// demoRig copies a shipped demo rig into a fresh directory and returns its path.
func demoRig(t *testing.T, name string) string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("../../testdata/rigs", name))
	if err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, b, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// dirEntries lists a directory's file names, to see that no temporary file is left behind.
func dirEntries(t *testing.T, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var n []string
	for _, e := range es {
		n = append(n, e.Name())
	}
	return n
}

func TestReviewWritesDeterministicPDF(t *testing.T) {
	rig := demoRig(t, "disc-thrower.yaml")
	dir := filepath.Dir(rig)
	a, b := filepath.Join(dir, "a.pdf"), filepath.Join(dir, "b.pdf")
	for _, out := range []string{a, b} {
		code, stdout, stderr := runCLI(t, "", "review", rig, "-o", out, "--date", "2026-12-01", "--reviewer", "J. Q. Reviewer")
		if code != exitOK || stdout != "" {
			t.Fatalf("review: got exit %d, stdout %q, stderr %q; want 0 and nothing on stdout", code, stdout, stderr)
		}
	}
	pa, _ := os.ReadFile(a)
	pb, _ := os.ReadFile(b)
	if len(pa) == 0 || !bytes.Equal(pa, pb) {
		t.Errorf("two runs with the same --date: got %d and %d bytes, equal=%v; want identical", len(pa), len(pb), bytes.Equal(pa, pb))
	}
	if got := dirEntries(t, dir); len(got) != 3 {
		t.Errorf("directory holds %q, want the rig and the two reviews only", got)
	}
	if _, err := exec.LookPath("pdftotext"); err == nil {
		out, err := exec.Command("pdftotext", a, "-").Output()
		if err != nil {
			t.Fatal(err)
		}
		want := []string{"Verdict:", "Open-day disc thrower, bench 4", "2026-12-01", "J. Q. Reviewer"}
		// Every finding of the same pipeline's JSON appears in the PDF by rule id.
		code, js, _ := runCLI(t, "", "review", rig, "--format", "json", "--date", "2026-12-01")
		var doc struct {
			Verdict  string
			Findings []struct{ Rule string }
		}
		if err := json.Unmarshal([]byte(js), &doc); code != exitOK || err != nil || len(doc.Findings) == 0 {
			t.Fatalf("json: got exit %d, %v, %d findings; want 0, nil, some", code, err, len(doc.Findings))
		}
		want = append(want, "Verdict: "+strings.ToUpper(doc.Verdict))
		for _, f := range doc.Findings {
			want = append(want, f.Rule)
		}
		for _, w := range want {
			if !bytes.Contains(out, []byte(w)) {
				t.Errorf("PDF text lacks %q", w)
			}
		}
	}
	// verify: the review belongs to the rig (0); an edited rig does not (1).
	if code, stdout, stderr := runCLI(t, "", "verify", a, rig); code != exitOK || !strings.HasPrefix(stdout, "match:") {
		t.Errorf("verify: got exit %d, stdout %q, stderr %q; want 0 and a match", code, stdout, stderr)
	}
	src, _ := os.ReadFile(rig)
	edited := filepath.Join(dir, "edited.yaml")
	os.WriteFile(edited, bytes.Replace(src, []byte("resistance: 100 kΩ"), []byte("resistance: 47 kΩ"), 1), 0o644)
	if bytes.Equal(src, mustRead(t, edited)) {
		t.Fatal("the edit did not change the rig; the test would prove nothing")
	}
	if code, stdout, _ := runCLI(t, "", "verify", a, edited); code != exitFindings || !strings.HasPrefix(stdout, "MISMATCH") {
		t.Errorf("verify of an edited rig: got exit %d, stdout %q; want 1 and MISMATCH", code, stdout)
	}
	// Comments and spelling of units do not change what the rig is, so the review still applies.
	recommented := filepath.Join(dir, "recommented.yaml")
	os.WriteFile(recommented, append([]byte("# reviewed copy\n"), bytes.Replace(src, []byte("2200 uF"), []byte("2.2 mF"), 1)...), 0o644)
	if code, stdout, stderr := runCLI(t, "", "verify", a, recommented); code != exitOK {
		t.Errorf("verify of a re-commented rig: got exit %d, stdout %q, stderr %q; want 0", code, stdout, stderr)
	}
}

func mustRead(t *testing.T, p string) []byte {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func TestReviewRefusesAndLeavesNothing(t *testing.T) {
	rig := demoRig(t, "ring-jumper.yaml")
	dir := filepath.Dir(rig)
	existing := filepath.Join(dir, "old.pdf")
	os.WriteFile(existing, []byte("previous review"), 0o644)
	bad := filepath.Join(dir, "bad.yaml")
	os.WriteFile(bad, []byte("rig:\n  name: x\nbank:\n  capacitance: 400 V\n"), 0o644)
	tests := []struct {
		name string
		args []string
	}{
		{"over the input rig", []string{"review", rig, "-o", rig, "--date", "2026-12-01"}},
		{"over the input rig by another path", []string{"review", rig, "-o", filepath.Join(dir, ".", filepath.Base(rig))}},
		{"bad rig keeps the old file", []string{"review", bad, "-o", existing, "--date", "2026-12-01"}},
		{"bad date", []string{"review", rig, "-o", existing, "--date", "1 Dec 2026"}},
		{"no output", []string{"review", rig}},
		{"two rigs", []string{"review", rig, rig, "-o", existing}},
		{"bad format", []string{"review", rig, "-o", existing, "--format", "html"}},
		{"missing policy", []string{"review", rig, "-o", existing, "--policy", filepath.Join(dir, "nope.yaml")}},
		{"into a missing directory", []string{"review", rig, "-o", filepath.Join(dir, "no", "such", "r.pdf")}},
	}
	before := mustRead(t, rig)
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			code, stdout, stderr := runCLI(t, "", tt.args...)
			if code != exitBadInput || stdout != "" || stderr == "" {
				t.Errorf("got exit %d, stdout %q, stderr %q; want 2, nothing, a message", code, stdout, stderr)
			}
			if !bytes.Equal(mustRead(t, rig), before) {
				t.Errorf("the input rig changed")
			}
			if got := string(mustRead(t, existing)); got != "previous review" {
				t.Errorf("the existing file now holds %d bytes, want it untouched", len(got))
			}
			if got := dirEntries(t, dir); len(got) != 3 {
				t.Errorf("directory holds %q, want only the rig, the bad rig and the old file", got)
			}
		})
	}
}

func TestReviewTextAndJSON(t *testing.T) {
	rig := demoRig(t, "flash-bank.yaml")
	code, stdout, stderr := runCLI(t, "", "review", rig, "--format", "json", "--date", "2026-12-01")
	if code != exitOK {
		t.Fatalf("got exit %d, stderr %q, want 0", code, stderr)
	}
	var doc struct {
		Verdict     string         `json:"verdict"`
		Fingerprint string         `json:"fingerprint"`
		Quantities  map[string]any `json:"quantities"`
	}
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil || doc.Verdict == "" || len(doc.Fingerprint) != 64 || len(doc.Quantities) == 0 {
		t.Errorf("got %+v (%v), want a verdict, a 64-digit fingerprint and quantities", doc, err)
	}
	code, stdout, _ = runCLI(t, "", "review", "--format", "text", rig)
	if code != exitOK || !strings.Contains(stdout, "Verdict: ") || !strings.Contains(stdout, doc.Fingerprint) {
		t.Errorf("text: got exit %d and %q, want the verdict and the same fingerprint as the JSON", code, stdout)
	}
}

func TestVerifyBadInput(t *testing.T) {
	rig := demoRig(t, "disc-thrower.yaml")
	dir := filepath.Dir(rig)
	notPDF := filepath.Join(dir, "x.pdf")
	os.WriteFile(notPDF, []byte("not a pdf"), 0o644)
	plain := filepath.Join(dir, "plain.pdf")
	os.WriteFile(plain, []byte("%PDF-1.4\n1 0 obj << >> endobj\n%%EOF\n"), 0o644)
	for _, args := range [][]string{
		{"verify", notPDF, rig},
		{"verify", plain, rig},
		{"verify", filepath.Join(dir, "missing.pdf"), rig},
		{"verify", notPDF},
		{"verify", "-", "-"},
	} {
		t.Run(strings.Join(args[1:], " "), func(t *testing.T) {
			if code, _, stderr := runCLI(t, "", args...); code != exitBadInput || stderr == "" {
				t.Errorf("got exit %d, stderr %q; want 2 and a message", code, stderr)
			}
		})
	}
}

func TestParseInterspersed(t *testing.T) {
	tests := []struct {
		args []string
		pos  string
		out  string
	}{
		{[]string{"r.yaml", "-o", "x.pdf"}, "r.yaml", "x.pdf"},
		{[]string{"-o", "x.pdf", "r.yaml"}, "r.yaml", "x.pdf"},
		{[]string{"-o", "x.pdf", "--", "-o"}, "-o", "x.pdf"},
		{[]string{"-", "-o", "-"}, "-", "-"},
	}
	for _, tt := range tests {
		t.Run(strings.Join(tt.args, " "), func(t *testing.T) {
			var b bytes.Buffer
			e := &env{stdout: &b, stderr: &b}
			fs := newFlags("t", "", e)
			out := fs.String("o", "", "")
			pos, done, err := parseInterspersed(fs, tt.args, e)
			if done || err != nil || strings.Join(pos, " ") != tt.pos || *out != tt.out {
				t.Errorf("got %q, -o %q (done %v, %v), want %q, -o %q", pos, *out, done, err, tt.pos, tt.out)
			}
		})
	}
}
