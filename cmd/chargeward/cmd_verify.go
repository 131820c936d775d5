package main

import (
	"fmt"
	"io"
	"os"

	"chargeward/report"
)

var verifyCommand = command{name: "verify", summary: "check that a review PDF belongs to a rig description", run: runVerify}

const verifyUsage = `Usage: chargeward verify REVIEW.pdf RIG [options]

Reads the fingerprint recorded in the metadata of REVIEW.pdf, recomputes it from the rig description RIG
(a YAML file, or - for standard input) with the rulebook, the policy and this program's version, and says
whether the review belongs to that rig description. Give the same --policy and --rules files as for the
review.

Exit status: 0 when the fingerprints match, 1 when they differ (the rig description, rulebook, policy or
program version is not the one reviewed), 2 on bad input (an unreadable or foreign PDF, a bad rig file).
`

// maxReviewSize bounds the PDF read by verify; a review of the largest rig is far below it.
const maxReviewSize = 64 << 20

func runVerify(args []string, e *env) error {
	fs := newFlags("verify", verifyUsage, e)
	var site siteFiles
	site.register(fs)
	pos, done, err := parseInterspersed(fs, args, e)
	if done {
		return err
	}
	if len(pos) != 2 {
		fmt.Fprintln(e.stderr, "chargeward verify: name the review PDF and the rig file")
		fs.Usage()
		return exitError{exitBadInput}
	}
	pdfName, rigName := pos[0], pos[1]
	if pdfName == "-" && rigName == "-" {
		fmt.Fprintln(e.stderr, "chargeward verify: only one of the review and the rig can be read from standard input")
		return exitError{exitBadInput}
	}
	pdf, err := readReview(pdfName, e)
	if err != nil {
		fmt.Fprintf(e.stderr, "chargeward verify: %s: %v\n", pdfName, err)
		return exitError{exitBadInput}
	}
	recorded, err := report.ReadFingerprint(pdf)
	if err != nil {
		fmt.Fprintf(e.stderr, "chargeward verify: %s: %v\n", pdfName, err)
		return exitError{exitBadInput}
	}
	_, rv, err := buildReview(rigName, site, e)
	if err != nil {
		return err
	}
	now := report.Fingerprint(rv, Version)
	if now == recorded {
		fmt.Fprintf(e.stdout, "match: %s is the review of %s (revision %s)\n  fingerprint %s\n", pdfName, rigName,
			rv.Assessment.Rig.Rig.Revision, now)
		return nil
	}
	fmt.Fprintf(e.stdout, "MISMATCH: %s is not the review of %s as it stands\n  recorded   %s\n  recomputed %s\n"+
		"The rig description, the rulebook, the policy or the program version differs from the one reviewed;\n"+
		"the review does not apply. Review the rig again.\n", pdfName, rigName, recorded, now)
	if v := report.ReadVersion(pdf); v != "" && v != Version {
		fmt.Fprintf(e.stdout, "The review was made by chargeward %s and this is %s: the version alone changes the fingerprint.\n", v, Version)
	}
	return exitError{exitFindings}
}

// readReview reads the PDF, refusing more than maxReviewSize bytes.
func readReview(name string, e *env) ([]byte, error) {
	var r io.Reader = e.stdin
	if name != "-" {
		f, err := os.Open(name)
		if err != nil {
			return nil, err
		}
		defer f.Close()
		r = f
	}
	b, err := io.ReadAll(io.LimitReader(r, maxReviewSize+1))
	if err != nil {
		return nil, err
	}
	if len(b) > maxReviewSize {
		return nil, fmt.Errorf("larger than %d MiB; not a chargeward review", maxReviewSize>>20)
	}
	return b, nil
}
