// Package report renders a rules.Review: a PDF hazard review for sign-off (PDF), a terminal summary (Text)
// and a machine-readable document (JSON). It computes no physics and judges nothing: every number and every
// finding comes from the Review, and the only value derived here is the fingerprint that ties a review to the
// rig description, rulebook, policy and program version it was made from.
//
// Numbers are shown with SI prefixes (SI Brochure, BIPM, 9th edition, 2019, §3) by SI; the JSON output keeps
// the unprefixed SI values.
package report

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"strconv"
	"time"

	"chargeward/rules"
	"chargeward/schema"
)

// Options are what a rendering needs beyond the Review.
type Options struct {
	// Date is the review date printed on the cover and written as the PDF's creation date. The zero value
	// renders as "not dated" and is refused by PDF, because a review must be dated and a deterministic PDF
	// cannot take the clock.
	Date time.Time
	// Reviewer is the name printed in the "prepared by" field of the sign-off block; empty leaves the field
	// blank for a hand-written entry.
	Reviewer string
	// Version is the program version; it enters the fingerprint. Empty: the fingerprint is not shown.
	Version string
}

// ErrNoReview is returned when the review (or its assessment or rig) is missing.
var ErrNoReview = errors.New("report: no review to render")

func check(r *rules.Review) error {
	if r == nil || r.Assessment == nil || r.Assessment.Rig == nil {
		return ErrNoReview
	}
	return nil
}

// fingerprintDomain separates chargeward review fingerprints from any other SHA-256 over similar bytes, and
// versions the framing below.
const fingerprintDomain = "chargeward review fingerprint v1"

// Fingerprint is the SHA-256 (FIPS 180-4), in lower-case hex, over the canonical rig, the rulebook digest,
// the policy digest and the program version. The canonical rig is encoding/json's rendering of the typed
// *schema.Rig: SI values in fixed field order with shortest round-trip float formatting, so the fingerprint
// follows what the rig is, not how it was typed — "2200 uF" and "2.2 mF", comments, key order and white space
// do not change it, while every value the review rests on does. (The source text, Rig.Source, is excluded by
// its json:"-" tag.) Each part is framed with its length so that no two different inputs share a message.
// A nil review or rig gives the empty string.
func Fingerprint(r *rules.Review, version string) string {
	if check(r) != nil {
		return ""
	}
	rig, err := CanonicalRig(r.Assessment.Rig)
	if err != nil {
		return ""
	}
	h := sha256.New()
	part := func(name string, b []byte) {
		fmt.Fprintf(h, "%s %d\n", name, len(b))
		h.Write(b)
		h.Write([]byte{'\n'})
	}
	part("domain", []byte(fingerprintDomain))
	part("rig", rig)
	part("rulebook", []byte(r.RulebookDigest))
	part("policy", []byte(r.PolicyDigest))
	part("version", []byte(version))
	return hex.EncodeToString(h.Sum(nil))
}

// CanonicalRig is the canonical form of a rig that the fingerprint hashes and the JSON output carries.
func CanonicalRig(rig *schema.Rig) ([]byte, error) {
	if rig == nil {
		return nil, ErrNoReview
	}
	return json.Marshal(rig)
}

// keyQuantities are the quantities of the summary tables, in reading order, with a short meaning
// (DESIGN.md §9).
var keyQuantities = []struct{ name, meaning string }{
	{"supply.peak_voltage", "no-load peak DC from the supply"},
	{"bank.voltage", "charge voltage used for the review"},
	{"bank.voltage_rating", "equivalent voltage rating of the bank"},
	{"bank.capacitance", "equivalent capacitance"},
	{"bank.energy", "stored energy ½CV²"},
	{"bank.charge", "stored charge CV"},
	{"bank.cell_voltage_max", "highest voltage on one series cell"},
	{"discharge.time_constant", "time constant of the permanent discharge paths"},
	{"discharge.time_to_safe", "time to the safe voltage"},
	{"discharge.time_to_safe_single_fault", "the same, one bleeder failed open"},
	{"bleeder.power", "dissipation in one bleeder at full charge"},
	{"pulse.peak_current", "peak discharge current, coil only"},
	{"pulse.time_to_peak", "time to the current peak"},
	{"pulse.di_dt_max", "largest rate of rise of current"},
	{"pulse.i2t", "action integral through the switch"},
	{"pulse.reversal", "reversed bank voltage / charge voltage"},
	{"coil.inductance", "coil inductance"},
	{"coil.resistance", "coil DC resistance at 20 °C"},
	{"coil.temperature_rise", "conductor temperature rise per shot"},
	{"launch.speed", "projectile take-off speed"},
	{"launch.kinetic_energy", "projectile kinetic energy"},
	{"launch.height", "flight height above the start"},
	{"launch.efficiency", "kinetic energy / stored energy"},
	{"projectile.temperature_rise", "projectile temperature rise per shot"},
	{"field.peak_flux_density", "peak flux density at the coil centre"},
	{"field.implant_distance", "distance to the implant field limit"},
}

// verdictWords says what a verdict means for the people at the bench.
func verdictWords(v rules.Verdict) string {
	switch v {
	case rules.NotReady:
		return "Not ready: do not operate the rig until every must-fix finding is resolved and the rig is reviewed again."
	case rules.ReadyWithControls:
		return "Ready with controls: operate only with every control listed in the findings and the checklist in place."
	case rules.Ready:
		return "Ready: no finding restricts operation; follow the procedure checklist at every use."
	}
	return "No valid verdict: the review is incomplete and the rig must not be operated on its basis."
}

// severities and dispositions in display order, most severe first.
var (
	severities   = []rules.Severity{rules.Danger, rules.Warning, rules.Caution, rules.Notice}
	dispositions = []rules.Disposition{rules.MustFix, rules.Controls, rules.Advisory}
)

// findingGroup is the findings of one hazard class, in the Review's order.
type findingGroup struct {
	hazard   string // class id, "shock"
	title    string // the rulebook's title for it, "Electric shock"; the id when the rulebook gives none
	findings []rules.Finding
}

// groupFindings groups the review's findings by hazard class, keeping the order in which each class first
// appears (the Review orders findings by hazard class already), titled from the rulebook's classes.
func groupFindings(r *rules.Review) []findingGroup {
	titles := map[string]string{}
	for _, h := range r.HazardClasses {
		titles[h.ID] = h.Title
	}
	var gs []findingGroup
	at := map[string]int{}
	for _, f := range r.Findings {
		h := f.Hazard
		if h == "" {
			h = "unclassified"
		}
		i, ok := at[h]
		if !ok {
			i = len(gs)
			at[h] = i
			title := titles[h]
			if title == "" {
				title = h
			}
			gs = append(gs, findingGroup{hazard: h, title: title})
		}
		gs[i].findings = append(gs[i].findings, f)
	}
	return gs
}

// dateString is the review date as printed.
func dateString(t time.Time) string {
	if t.IsZero() {
		return "not dated"
	}
	return t.Format("2006-01-02")
}

// orDash returns s, or an em dash for an empty string.
func orDash(s string) string {
	if s == "" {
		return "—"
	}
	return s
}

// countsLine is "2 DANGER, 1 WARNING, 0 CAUTION, 0 NOTICE; 1 must-fix, 2 controls, 0 advisory".
func countsLine(r *rules.Review) string {
	bySev, byDisp := r.Counts()
	s := ""
	for i, sv := range severities {
		if i > 0 {
			s += ", "
		}
		s += strconv.Itoa(bySev[sv]) + " " + sv.String()
	}
	s += "; "
	for i, d := range dispositions {
		if i > 0 {
			s += ", "
		}
		s += strconv.Itoa(byDisp[d]) + " " + d.String()
	}
	return s
}
