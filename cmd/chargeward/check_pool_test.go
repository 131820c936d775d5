package main

import (
	"runtime"
	"strings"
	"testing"
)

// TestCheckPoolOrder checks that a check of several rigs on the worker pool prints exactly what the same
// check prints on one core: the summaries and the diagnostics in argument order, and the same exit code.
func TestCheckPoolOrder(t *testing.T) {
	args := []string{"check",
		"../../testdata/rigs/disc-thrower.yaml",
		"../../testdata/hostile/rig-turns-5000.yaml",
		"../../testdata/rigs/ring-jumper.yaml",
		"../../testdata/hostile/rig-lookalike-kelvin-sign.yaml",
		"../../testdata/rigs/flash-bank.yaml",
		"../../testdata/hostile/rig-cap-1e308.yaml",
	}
	runWith := func(procs int) (int, string, string) {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		var stdout, stderr strings.Builder
		return run(args, strings.NewReader(""), &stdout, &stderr), stdout.String(), stderr.String()
	}
	code1, out1, err1 := runWith(1)
	code2, out2, err2 := runWith(4)
	if code1 != exitBadInput || code2 != code1 {
		t.Errorf("got exit %d on one core and %d on four, want %d both", code1, code2, exitBadInput)
	}
	if out2 != out1 {
		t.Errorf("got standard output on four cores\n%s\nwant as on one core\n%s", out2, out1)
	}
	if err2 != err1 {
		t.Errorf("got standard error on four cores\n%s\nwant as on one core\n%s", err2, err1)
	}
	for i, want := range []string{"rig-turns-5000.yaml:28:10", "rig-lookalike-kelvin-sign.yaml:20:18", "rig-cap-1e308.yaml:13:1"} {
		if !strings.Contains(err1, want) {
			t.Errorf("diagnostic %d: got standard error\n%s\nwant it to contain %s", i, err1, want)
		}
	}
	if n := strings.Count(out1, "\n"); n != 3 {
		t.Errorf("got %d summary lines, want 3 (one per rig that loads)", n)
	}
}
