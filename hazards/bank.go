package hazards

// BankModel is the bank as later stages use it. Owner: electrical physics (issue 3).
type BankModel struct {
	C      float64 // equivalent capacitance, F (nominal)
	CWorst float64 // equivalent capacitance at +tolerance, F
	V      float64 // charge voltage used for the review, V (nominal)
	VWorst float64 // charge voltage at high line, V
	S, P   int     // series cells per string, parallel strings
	ESR    float64 // equivalent series resistance of the whole bank, Ω (0 when not stated; see Gaps)
}

// assessBank computes the bank quantities (DESIGN.md §4.2). PLACEHOLDER until issue 3 lands.
func assessBank(a *Assessment) error { return nil }
