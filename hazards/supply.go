package hazards

// assessSupply computes the supply quantities (DESIGN.md §4.1). Owner: electrical physics (issue 3).
// PLACEHOLDER until issue 3 lands: computes nothing.
func assessSupply(a *Assessment) error { return nil }
