// Package bench holds the end-to-end benchmarks of issue 8: the whole review of each demo rig (load the
// rulebook and policy, load the rig, compute the physics, judge, render the PDF), and its stages apart so
// that a regression can be placed. Budget: the demo disc thrower's full review within 300 ms on the
// project's 2-core machine.
package bench

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"chargeward/hazards"
	"chargeward/report"
	"chargeward/rules"
	"chargeward/schema"
)

var demoRigs = []string{"disc-thrower", "ring-jumper", "flash-bank"}

func readDemo(b *testing.B, name string) []byte {
	b.Helper()
	data, err := os.ReadFile(filepath.Join("..", "..", "testdata", "rigs", name+".yaml"))
	if err != nil {
		b.Fatal(err)
	}
	return data
}

// review is what 'chargeward review RIG -o FILE.pdf' computes, without the file system.
func review(b *testing.B, name string, data []byte, pdf *bytes.Buffer) {
	set, err := rules.Default()
	if err != nil {
		b.Fatal(err)
	}
	rig, err := schema.LoadRig(name, data)
	if err != nil {
		b.Fatal(err)
	}
	rv, err := set.Judge(rig)
	if err != nil {
		b.Fatal(err)
	}
	pdf.Reset()
	if err := report.PDF(pdf, rv, report.Options{Date: time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC), Version: "bench"}); err != nil {
		b.Fatal(err)
	}
}

// BenchmarkReview is the full review of each demo rig.
func BenchmarkReview(b *testing.B) {
	for _, name := range demoRigs {
		data := readDemo(b, name)
		b.Run(name, func(b *testing.B) {
			var pdf bytes.Buffer
			b.ReportAllocs()
			for b.Loop() {
				review(b, name, data, &pdf)
			}
			b.ReportMetric(float64(pdf.Len()), "pdf-bytes")
		})
	}
}

// BenchmarkStages times each stage of the disc thrower's review on its own.
func BenchmarkStages(b *testing.B) {
	data := readDemo(b, "disc-thrower")
	set, err := rules.Default()
	if err != nil {
		b.Fatal(err)
	}
	rig, err := schema.LoadRig("disc-thrower.yaml", data)
	if err != nil {
		b.Fatal(err)
	}
	a, err := hazards.Assess(rig, set.Targets())
	if err != nil {
		b.Fatal(err)
	}
	rv, err := set.Evaluate(a)
	if err != nil {
		b.Fatal(err)
	}
	opt := report.Options{Date: time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC), Version: "bench"}
	for _, st := range []struct {
		name string
		run  func() error
	}{
		{"rules-load", func() error { _, err := rules.Default(); return err }},
		{"rig-load", func() error { _, err := schema.LoadRig("disc-thrower.yaml", data); return err }},
		{"assess", func() error { _, err := hazards.Assess(rig, set.Targets()); return err }},
		{"evaluate", func() error { _, err := set.Evaluate(a); return err }},
		{"pdf", func() error { var buf bytes.Buffer; return report.PDF(&buf, rv, opt) }},
		{"text", func() error { var buf strings.Builder; return report.Text(&buf, rv, opt) }},
	} {
		b.Run(st.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if err := st.run(); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
