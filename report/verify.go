package report

import (
	"bytes"
	"errors"
	"regexp"
)

// ErrNoFingerprint is returned by ReadFingerprint when a file is not a PDF or carries no review fingerprint.
var ErrNoFingerprint = errors.New("no chargeward fingerprint in the PDF's metadata")

// fingerprintEntry is the /Keywords entry of the document information dictionary (ISO 32000-1:2008,
// §14.3.3) as PDF writes it: a literal string holding FingerprintKey and 64 lower-case hex digits.
var fingerprintEntry = regexp.MustCompile(`/Keywords \(` + regexp.QuoteMeta(FingerprintKey) + `([0-9a-f]{64})\)`)

// ReadFingerprint returns the fingerprint recorded in a review PDF's metadata. It needs no PDF parser: the
// information dictionary is written uncompressed, and a literal string with only hex digits has no escapes.
// A file that is not a PDF, that has no fingerprint, or that has two different ones is refused.
func ReadFingerprint(pdf []byte) (string, error) {
	if !bytes.HasPrefix(pdf, []byte("%PDF-")) {
		return "", errors.New("not a PDF file (no %PDF- header)")
	}
	ms := fingerprintEntry.FindAllSubmatch(pdf, -1)
	if len(ms) == 0 {
		return "", ErrNoFingerprint
	}
	fp := string(ms[0][1])
	for _, m := range ms[1:] {
		if string(m[1]) != fp {
			return "", errors.New("the PDF's metadata holds two different fingerprints")
		}
	}
	return fp, nil
}

// creatorEntry is the /Creator entry PDF writes: "chargeward VERSION".
var creatorEntry = regexp.MustCompile(`/Creator \(chargeward ([0-9A-Za-z.+-]*)\)`)

// ReadVersion returns the program version recorded in a review PDF's /Creator metadata, or "" if none.
func ReadVersion(pdf []byte) string {
	if m := creatorEntry.FindSubmatch(pdf); m != nil {
		return string(m[1])
	}
	return ""
}
