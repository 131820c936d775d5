package main

import (
	"fmt"
	"io"
	"math/rand"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"chargeward/internal/riggen"
)

// BenchmarkCheck100 is 'chargeward check' of 100 generated rigs (half with a coil and a projectile, so
// half run the launch simulation) in one call. Budget: 5 s on the project's 2-core machine using both
// cores; the workers=1 case is the same call held to one core, for the speed-up.
func BenchmarkCheck100(b *testing.B) {
	dir := b.TempDir()
	r := rand.New(rand.NewSource(100))
	args := []string{"check", "--fail-on", "never"}
	for i := range 100 {
		p := filepath.Join(dir, fmt.Sprintf("rig-%03d.yaml", i))
		if err := os.WriteFile(p, []byte(riggen.Rig(r, riggen.Options{Launch: i%2 == 0})), 0o644); err != nil {
			b.Fatal(err)
		}
		args = append(args, p)
	}
	for _, procs := range []int{runtime.GOMAXPROCS(0), 1} {
		b.Run(fmt.Sprintf("workers=%d", procs), func(b *testing.B) {
			defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
			b.ReportAllocs()
			for b.Loop() {
				var stderr strings.Builder
				if got := run(args, strings.NewReader(""), io.Discard, &stderr); got != exitOK {
					b.Fatalf("got exit %d, want 0; stderr:\n%s", got, stderr.String())
				}
			}
		})
	}
}
