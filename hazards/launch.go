package hazards

// assessLaunch runs the launch simulation (DESIGN.md §4.6). PLACEHOLDER until issue 5 lands.
func assessLaunch(a *Assessment) error { return nil }
