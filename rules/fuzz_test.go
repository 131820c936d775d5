package rules

import (
	"errors"
	"os"
	"path/filepath"
	"testing"

	"chargeward/schema"
)

// FuzzLoadSite feeds arbitrary bytes to the site rulebook and site policy loaders. Whatever the input, Load
// must return either a rule set or positioned diagnostics, never panic, and a set that loads must evaluate
// the base fixture without panicking.
func FuzzLoadSite(f *testing.F) {
	for _, dir := range []string{"rulebook", "policy"} {
		files, _ := filepath.Glob(filepath.Join("..", "testdata", dir, "*.yaml"))
		for _, p := range files {
			data, err := os.ReadFile(p)
			if err == nil {
				f.Add(data, dir == "policy")
			}
		}
	}
	f.Fuzz(func(t *testing.T, data []byte, asPolicy bool) {
		var s *Set
		var err error
		if asPolicy {
			s, err = Load("site.yaml", data, "", nil)
		} else {
			s, err = Load("", nil, "site.yaml", data)
		}
		if err != nil {
			var ds schema.Diagnostics
			if !errors.As(err, &ds) || len(ds) == 0 {
				t.Fatalf("got error %v, want diagnostics", err)
			}
			for _, d := range ds {
				if d.File != "site.yaml" || d.Line < 0 || d.Column < 0 || d.Code == "" {
					t.Fatalf("got diagnostic %+v, want file, position and code", d)
				}
			}
			return
		}
		if _, err := s.Evaluate(baseFixture().assessment(t)); err != nil {
			t.Logf("a site rule failed at run time (reported, not a crash): %v", err)
		}
	})
}
