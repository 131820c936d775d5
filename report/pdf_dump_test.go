package report

import (
	"os"
	"testing"
)

// TestDumpPDF writes the layout cases for looking at: H6PDF=/tmp/dir go test -run TestDumpPDF ./report
func TestDumpPDF(t *testing.T) {
	dir := os.Getenv("H6PDF")
	if dir == "" {
		t.Skip("set H6PDF to a directory to write the layout cases as PDF files")
	}
	for i, c := range layoutCases(t) {
		if err := os.WriteFile(dir+"/case"+string(rune('0'+i))+".pdf", renderFixture(t, c.r), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}
