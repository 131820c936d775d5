//go:build race

package hazards

// raceDetector is true in a -race build, where everything runs 5–10 times slower: wall-time budgets
// of the tests do not apply.
const raceDetector = true
