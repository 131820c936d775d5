// Package chargeward holds the shipped demo rigs. The program itself is in cmd/chargeward; the stages are in
// schema, hazards, rules and report (see DEVELOPERS.md).
package chargeward

import "embed"

// Demos holds the demo rigs under testdata/rigs: an invented scenario, for examples and tests only.
//
//go:embed testdata/rigs/*.yaml
var Demos embed.FS
