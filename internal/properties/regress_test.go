package properties

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"chargeward/rules"
	"chargeward/schema"
)

// TestRegressions runs the rigs of testdata/regress, each a bug a property found, through the pipeline.
func TestRegressions(t *testing.T) {
	set, err := rules.Default()
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		file    string
		gap     string // a gap the assessment must report
		finding string // a finding must name this field
	}{
		// The launch stage refused a measured coil ("the coil has no filaments"): now a gap.
		{"measured-coil-projectile.yaml", "coil.turns", "coil.turns"},
	}
	for _, tt := range tests {
		t.Run(tt.file, func(t *testing.T) {
			data, err := os.ReadFile(filepath.Join("..", "..", "testdata", "regress", tt.file))
			if err != nil {
				t.Fatal(err)
			}
			rig, err := schema.LoadRig(tt.file, data)
			if err != nil {
				t.Fatal(err)
			}
			a, rv, err := judge(rig, set)
			if err != nil {
				t.Fatalf("got error %v, want a review", err)
			}
			found := false
			for _, g := range a.Gaps {
				found = found || g.Field == tt.gap
			}
			if !found {
				t.Errorf("got gaps %+v, want one for %s", a.Gaps, tt.gap)
			}
			named := false
			for _, f := range rv.Findings {
				for _, fl := range f.Fields {
					named = named || fl == tt.finding
				}
				named = named || strings.Contains(f.Message, tt.finding)
			}
			if !named {
				t.Errorf("got no finding naming %s, want missing information reported", tt.finding)
			}
			if _, ok := a.Q("launch.speed"); ok {
				t.Error("got a launch speed, want none without the coil's winding")
			}
		})
	}
}
