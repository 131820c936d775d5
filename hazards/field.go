package hazards

// assessField computes the field and distance quantities (DESIGN.md §4.7). PLACEHOLDER until issue 5 lands.
func assessField(a *Assessment) error { return nil }
