package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// soSetup copies the disc thrower into a fresh directory with a site policy and a site rulebook, and
// returns their paths.
func soSetup(t *testing.T) (dir, rig, policy, rulebook string) {
	t.Helper()
	dir = t.TempDir()
	data, err := os.ReadFile("../../testdata/rigs/disc-thrower.yaml")
	if err != nil {
		t.Fatal(err)
	}
	rig = filepath.Join(dir, "rig.yaml")
	policy = filepath.Join(dir, "site-policy.yaml")
	rulebook = filepath.Join(dir, "site-rules.yaml")
	for _, f := range []struct {
		path string
		data []byte
	}{
		{rig, data},
		{policy, []byte("thresholds:\n  residual.safe_voltage: {value: 30 V, unit: V, basis: site electrical safety program}\n")},
		{rulebook, []byte("checklist:\n  - {phase: set-up, text: Read the review aloud before the first shot}\n")},
	} {
		if err := os.WriteFile(f.path, f.data, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir, rig, policy, rulebook
}

func soRun(args ...string) (int, string, string) {
	var stdout, stderr bytes.Buffer
	code := run(args, strings.NewReader(""), &stdout, &stderr)
	return code, stdout.String(), stderr.String()
}

func soSnapshot(t *testing.T, dir string) map[string]string {
	t.Helper()
	m := map[string]string{}
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range es {
		b, _ := os.ReadFile(filepath.Join(dir, e.Name()))
		m[e.Name()] = string(b)
	}
	return m
}

// TestReviewNeverOverwritesItsInputs names each input of a review as its output, directly, through a
// symbolic link and through a hard link, in every format: exit 2, a message, and the directory exactly
// as it was (no input changed, no temporary file left).
func TestReviewNeverOverwritesItsInputs(t *testing.T) {
	dir, rig, policy, rulebook := soSetup(t)
	if err := os.Symlink(rig, filepath.Join(dir, "link.pdf")); err != nil {
		t.Fatal(err)
	}
	if err := os.Link(policy, filepath.Join(dir, "hard.pdf")); err != nil {
		t.Fatal(err)
	}
	site := []string{"--policy", policy, "--rules", rulebook, "--date", "2026-12-01"}
	tests := []struct{ name, out, format string }{
		{"rig", rig, "pdf"},
		{"site policy", policy, "pdf"},
		{"site rulebook", rulebook, "pdf"},
		{"rig by a relative path with dots", filepath.Join(dir, "..", filepath.Base(dir), ".", "rig.yaml"), "pdf"},
		{"rig through a symbolic link", filepath.Join(dir, "link.pdf"), "pdf"},
		{"site policy through a hard link", filepath.Join(dir, "hard.pdf"), "pdf"},
		{"rig as text", rig, "text"},
		{"site rulebook as JSON", rulebook, "json"},
		{"the directory itself", dir, "pdf"},
	}
	before := soSnapshot(t, dir)
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			args := append([]string{"review", rig, "-o", tt.out, "--format", tt.format}, site...)
			code, stdout, stderr := soRun(args...)
			if code != exitBadInput || stdout != "" || !strings.Contains(stderr, "not writing over it") {
				t.Errorf("got exit %d, stdout %q, stderr %q; want 2, nothing, a refusal", code, stdout, stderr)
			}
			after := soSnapshot(t, dir)
			if len(after) != len(before) {
				t.Errorf("got %d directory entries, want %d as before", len(after), len(before))
			}
			for name, data := range before {
				if after[name] != data {
					t.Errorf("got %s changed, want it untouched", name)
				}
			}
		})
	}
}

// TestReviewReplacesAtomically writes a review over an existing file while a reader holds the old one
// open: the reader still reads the old review complete (rename(2) replaces the directory entry, not the
// file's contents), the path then holds a complete PDF in a new file, and no temporary file is left.
func TestReviewReplacesAtomically(t *testing.T) {
	dir, rig, _, _ := soSetup(t)
	out := filepath.Join(dir, "review.pdf")
	old := []byte("%PDF-1.4 the previous review\n")
	if err := os.WriteFile(out, old, 0o644); err != nil {
		t.Fatal(err)
	}
	reader, err := os.Open(out)
	if err != nil {
		t.Fatal(err)
	}
	defer reader.Close()
	oldInfo, err := reader.Stat()
	if err != nil {
		t.Fatal(err)
	}
	if code, _, stderr := soRun("review", rig, "-o", out, "--date", "2026-12-01"); code != exitOK {
		t.Fatalf("got exit %d, want 0; stderr:\n%s", code, stderr)
	}
	var held bytes.Buffer
	if _, err := held.ReadFrom(reader); err != nil || !bytes.Equal(held.Bytes(), old) {
		t.Errorf("got %q through the open old file (err %v), want the old review intact", held.Bytes(), err)
	}
	newData, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.HasPrefix(newData, []byte("%PDF-")) || !bytes.Contains(newData[max(0, len(newData)-64):], []byte("%%EOF")) {
		t.Errorf("got a new file of %d bytes without a PDF header and trailer, want a complete PDF", len(newData))
	}
	newInfo, err := os.Stat(out)
	if err != nil {
		t.Fatal(err)
	}
	if os.SameFile(oldInfo, newInfo) {
		t.Error("got the old file rewritten in place, want a new file renamed over it")
	}
	if st, ok := newInfo.Sys().(*syscall.Stat_t); ok && st.Nlink != 1 {
		t.Errorf("got %d links to the new review, want 1", st.Nlink)
	}
	if got := soSnapshot(t, dir); len(got) != 4 {
		t.Errorf("got directory entries %v, want the rig, the two site files and the review only", keys(got))
	}
}

// TestFailedReviewLeavesNothing runs reviews that fail at each stage (the rig, a site file, the physics,
// a rule at run time, writing) with an existing output file: exit 2, the file as it was, nothing else.
func TestFailedReviewLeavesNothing(t *testing.T) {
	dir, rig, _, _ := soSetup(t)
	out := filepath.Join(dir, "review.pdf")
	old := "previous review, must survive\n"
	if err := os.WriteFile(out, []byte(old), 0o644); err != nil {
		t.Fatal(err)
	}
	h := func(name string) string { return filepath.Join("..", "..", "testdata", "hostile", name) }
	tests := []struct {
		name string
		args []string
	}{
		{"rig does not load", []string{"review", h("rig-lookalike-kelvin-sign.yaml"), "-o", out}},
		{"physics refuses", []string{"review", h("rig-turns-5000.yaml"), "-o", out}},
		{"site policy does not load", []string{"review", rig, "--policy", h("policy-zero-safe-voltage.yaml"), "-o", out}},
		{"site rule fails at run time", []string{"review", rig, "--rules", h("rules-range-bomb.yaml"), "-o", out}},
		{"output directory is a file", []string{"review", rig, "-o", filepath.Join(out, "x.pdf")}},
	}
	before := soSnapshot(t, dir)
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			code, stdout, stderr := soRun(append(tt.args, "--date", "2026-12-01")...)
			if code != exitBadInput || stdout != "" || stderr == "" {
				t.Errorf("got exit %d, stdout %q, stderr %q; want 2, nothing, a message", code, stdout, stderr)
			}
			after := soSnapshot(t, dir)
			if len(after) != len(before) || after["review.pdf"] != old {
				t.Errorf("got directory %v with review.pdf %q, want it as before", keys(after), after["review.pdf"])
			}
		})
	}
}

func keys(m map[string]string) []string {
	var k []string
	for n := range m {
		k = append(k, n)
	}
	return k
}
