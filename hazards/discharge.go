package hazards

// assessDischarge computes discharge paths and bleeder quantities (DESIGN.md §4.3). PLACEHOLDER until issue 3 lands.
func assessDischarge(a *Assessment) error { return nil }
