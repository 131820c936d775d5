// Command chargeward reviews charged-capacitor bench rigs: it reads a YAML rig description, validates it,
// computes the physics that decides its hazards, judges it against a rulebook and a threshold policy, and
// writes a hazard review. See README.md.
package main

import (
	"os"
)

func main() {
	os.Exit(run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr))
}
