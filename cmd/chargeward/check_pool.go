package main

import (
	"bytes"
	"io"
	"runtime"
	"strings"
	"sync"

	"chargeward/rules"
	"chargeward/schema"
)

// judged is one rig of a check loaded and judged ahead of its turn; its diagnostics wait in stderr and are
// printed in argument order, so the output does not depend on which worker finished first.
type judged struct {
	rig    *schema.Rig
	rv     *rules.Review
	err    error
	stderr bytes.Buffer
}

// judgeAll loads and judges several rigs on a pool of GOMAXPROCS workers (the physics is pure and a
// rules.Set is safe for concurrent use). Standard input ("-") is left to the ordered pass: its entry is
// nil, as is every entry when there is only one rig.
func judgeAll(names []string, set *rules.Set) []*judged {
	out := make([]*judged, len(names))
	if len(names) < 2 {
		return out
	}
	next := make(chan int)
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), len(names)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				j := &judged{}
				le := &env{stdin: strings.NewReader(""), stdout: io.Discard, stderr: &j.stderr}
				j.rig, j.rv, j.err = loadAndJudge(names[i], le, set)
				out[i] = j
			}
		}()
	}
	for i, n := range names {
		if n != "-" {
			next <- i
		}
	}
	close(next)
	wg.Wait()
	return out
}

// loadAndJudge loads one rig and judges it, printing its diagnostics to e.stderr.
func loadAndJudge(name string, e *env, set *rules.Set) (*schema.Rig, *rules.Review, error) {
	rig, err := loadRig(name, e)
	if err != nil {
		return nil, nil, err
	}
	rv, err := judge(rig, set)
	if err != nil {
		reportPhysics(e.stderr, name, rig, err)
		return rig, nil, exitError{exitBadInput}
	}
	return rig, rv, nil
}
