package main

import (
	"bytes"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"time"

	"chargeward/report"
	"chargeward/rules"
	"chargeward/schema"
)

var reviewCommand = command{name: "review", summary: "write the hazard review of a rig (PDF for sign-off)", run: runReview}

const reviewUsage = `Usage: chargeward review RIG -o FILE.pdf [options]

Reads the rig description RIG (a YAML file, or - for standard input), computes its hazards, judges them
against the rulebook and the threshold policy, and writes the hazard review: a PDF for sign-off by the
department safety officer, or with --format the same content as text or JSON.

The file is written only when the review is complete: it is built in memory, written to a temporary file in
the same directory and renamed into place, so a failed run leaves no partial file and never replaces an
existing one. The same inputs and --date give a byte-identical PDF.

Exit status: 0 when the review is written (whatever its verdict), 2 on bad input or when nothing could be
written.
`

// siteFiles are the site policy and rulebook options, shared by review and verify.
type siteFiles struct {
	policy, rules string
}

func (s *siteFiles) register(fs *flag.FlagSet) {
	fs.StringVar(&s.policy, "policy", "", "site threshold `FILE` overriding entries of the default policy")
	fs.StringVar(&s.rules, "rules", "", "site rulebook `FILE` adding to or disabling default rules")
}

func runReview(args []string, e *env) error {
	fs := newFlags("review", reviewUsage, e)
	var site siteFiles
	site.register(fs)
	out := fs.String("o", "", "output `FILE` (required for pdf; - writes to standard output)")
	date := fs.String("date", "", "review `YYYY-MM-DD` printed on the review (default: today, UTC)")
	reviewer := fs.String("reviewer", "", "`NAME` for the \"prepared by\" field (default: left blank to sign by hand)")
	format := fs.String("format", "pdf", "output `FORMAT`: pdf, text or json")
	pos, done, err := parseInterspersed(fs, args, e)
	if done {
		return err
	}
	if len(pos) != 1 {
		fmt.Fprintln(e.stderr, "chargeward review: name exactly one rig file (or - for standard input)")
		fs.Usage()
		return exitError{exitBadInput}
	}
	switch *format {
	case "pdf", "text", "json":
	default:
		fmt.Fprintf(e.stderr, "chargeward review: --format %q: want pdf, text or json\n", *format)
		return exitError{exitBadInput}
	}
	if *out == "" {
		if *format == "pdf" {
			fmt.Fprintln(e.stderr, "chargeward review: -o FILE.pdf is required (use -o - for standard output)")
			return exitError{exitBadInput}
		}
		*out = "-"
	}
	day, err := reviewDay(*date)
	if err != nil {
		fmt.Fprintln(e.stderr, "chargeward review:", err)
		return exitError{exitBadInput}
	}
	if err := refuseOverwrite(*out, pos[0], site.policy, site.rules); err != nil {
		fmt.Fprintln(e.stderr, "chargeward review:", err)
		return exitError{exitBadInput}
	}
	_, rv, err := buildReview(pos[0], site, e)
	if err != nil {
		return err
	}
	opt := report.Options{Date: day, Reviewer: *reviewer, Version: Version}
	var buf bytes.Buffer
	switch *format {
	case "pdf":
		err = report.PDF(&buf, rv, opt)
	case "text":
		err = report.Text(&buf, rv, opt)
	case "json":
		err = report.JSON(&buf, rv, opt)
	}
	if err != nil {
		fmt.Fprintln(e.stderr, "chargeward review:", err)
		return exitError{exitBadInput}
	}
	if *out == "-" {
		_, err := e.stdout.Write(buf.Bytes())
		return err
	}
	if err := writeAtomic(*out, buf.Bytes()); err != nil {
		fmt.Fprintln(e.stderr, "chargeward review:", err)
		return exitError{exitBadInput}
	}
	fmt.Fprintf(e.stderr, "%s: %s, verdict %s, %d findings; fingerprint %s\n", *out, rv.Assessment.Rig.Rig.Name,
		rv.Verdict, len(rv.Findings), report.Fingerprint(rv, Version))
	return nil
}

// buildReview runs the stages for one rig as check does (load, then judge: assess against the policy's
// targets and evaluate), so a review and a check of the same files carry the same fingerprint. On bad input
// it prints the diagnostics and returns an exit-2 error.
func buildReview(name string, site siteFiles, e *env) (*schema.Rig, *rules.Review, error) {
	set, err := loadRuleSet(site.policy, site.rules, e)
	if err != nil {
		return nil, nil, err
	}
	rig, rv, err := loadAndJudge(name, e, set)
	if err != nil {
		return nil, nil, err
	}
	return rig, rv, nil
}

// reviewDay parses --date; empty means today in UTC.
func reviewDay(s string) (time.Time, error) {
	if s == "" {
		n := time.Now().UTC()
		return time.Date(n.Year(), n.Month(), n.Day(), 0, 0, 0, 0, time.UTC), nil
	}
	t, err := time.Parse("2006-01-02", s)
	if err != nil {
		return time.Time{}, fmt.Errorf("--date %q: want YYYY-MM-DD", s)
	}
	return t, nil
}

// refuseOverwrite refuses an output path that names one of the inputs.
func refuseOverwrite(out string, inputs ...string) error {
	if out == "-" {
		return nil
	}
	oi, oerr := os.Stat(out)
	if oerr == nil && !oi.Mode().IsRegular() {
		return fmt.Errorf("%s: exists and is not a regular file; not writing over it", out)
	}
	abs := func(p string) string {
		a, err := filepath.Abs(p)
		if err != nil {
			return filepath.Clean(p)
		}
		return a
	}
	for _, in := range inputs {
		if in == "" || in == "-" {
			continue
		}
		if abs(in) == abs(out) {
			return fmt.Errorf("%s: is an input of the review; not writing over it", out)
		}
		if oerr == nil {
			if ii, err := os.Stat(in); err == nil && os.SameFile(oi, ii) {
				return fmt.Errorf("%s: is the same file as the input %s; not writing over it", out, in)
			}
		}
	}
	return nil
}

// writeAtomic writes data to path through a temporary file in the same directory, synced and renamed into
// place: readers see the old file or the complete new one, and a failure removes the temporary file and
// leaves any existing file untouched.
func writeAtomic(path string, data []byte) (err error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	tmp, err := os.CreateTemp(dir, "."+base+".tmp-*")
	if err != nil {
		return err
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	if _, err = io.Copy(tmp, bytes.NewReader(data)); err != nil {
		return err
	}
	if err = tmp.Chmod(0o644); err != nil {
		return err
	}
	if err = tmp.Sync(); err != nil {
		return err
	}
	if err = tmp.Close(); err != nil {
		return err
	}
	return os.Rename(tmp.Name(), path)
}
