package hazards

import (
	"fmt"
	"math"

	"chargeward/hazards/em"
)

// AxialField returns the magnetic flux density, T, on the axis of a set of coaxial circular filaments
// carrying current i (A) each (times its Turns), at axial position z (m):
//
//	B(z) = Σ_j N_j μ0 i r_j² / (2 (r_j² + (z − z_j)²)^{3/2})
//
// (Biot–Savart law for a circular loop on its axis; e.g. D. J. Griffiths, Introduction to Electrodynamics,
// 4th ed., Example 5.6). Valid for any z; far from the coil it falls as the dipole field μ0 m/(2π z³),
// m = i Σ N_j π r_j².
func AxialField(fils []Filament, i, z float64) float64 {
	var b float64
	for _, f := range fils {
		d := z - f.Z
		r2 := f.R * f.R
		b += f.Turns * r2 / (2 * math.Pow(r2+d*d, 1.5))
	}
	return em.Mu0 * i * b
}

// ImplantDistance returns the distance, m, above the coil face (z = 0) beyond which the on-axis field of
// fils at current i (A) stays below limit (T). The axial field above the face falls monotonically, so the
// distance is found by bracketing and bisection to 1e-9 relative; zero if the field at the face is already
// below the limit. The axis is the direction in which a loop's field reaches farthest: its dipole far
// field on the axis is twice that in the plane of the coil.
func ImplantDistance(fils []Filament, i, limit float64) (float64, error) {
	if !(limit > 0) || !(i >= 0) || !finite(i, limit) {
		return 0, fmt.Errorf("implant distance: %w: current %g A, limit %g T", ErrNonFinite, i, limit)
	}
	if AxialField(fils, i, 0) <= limit {
		return 0, nil
	}
	lo, hi := 0.0, 0.01
	for AxialField(fils, i, hi) > limit {
		lo, hi = hi, 2*hi
		if hi > 1e6 {
			return 0, fmt.Errorf("implant distance: the field stays above %g T beyond 1000 km: %w", limit, ErrNonFinite)
		}
	}
	for hi-lo > 1e-9*hi {
		mid := (lo + hi) / 2
		if AxialField(fils, i, mid) > limit {
			lo = mid
		} else {
			hi = mid
		}
	}
	return hi, nil
}

// assessField computes the field and distance quantities (DESIGN.md §4.7): the peak flux density at the
// centre of the coil face for the coil-only pulse (no projectile to screen it: a dry fire is the worst
// case) and the on-axis distance at which it falls below the policy's limit for implanted medical devices.
func assessField(a *Assessment) error {
	if a.m.coil == nil || len(a.m.coil.Filaments) == 0 {
		if a.Rig.Coil != nil {
			a.AddGap("coil", "the coil is not computable, so the magnetic field around it cannot be computed")
		}
		return nil
	}
	if a.m.loop == nil {
		a.AddGap("switch", "the discharge loop is not computable, so the coil's peak current and field cannot be computed")
		return nil
	}
	loop := *a.m.loop
	p, err := RLCPulse(loop)
	if err != nil {
		return err
	}
	ip, ipW := p.PeakCurrent, p.PeakCurrent
	hasWorst := false
	if b := a.m.bank; b != nil && b.CWorst > 0 && b.VWorst > 0 {
		wl := loop
		wl.C, wl.V0 = b.CWorst, b.VWorst
		if pw, err := RLCPulse(wl); err == nil {
			ipW, hasWorst = math.Max(pw.PeakCurrent, ip), true
		}
	}
	fils := a.m.coil.Filaments
	var turns float64
	for _, f := range fils {
		turns += f.Turns
	}
	b0, b0W := AxialField(fils, ip, 0), AxialField(fils, ipW, 0)
	w := func(v float64) *float64 {
		if hasWorst {
			return Worst(v)
		}
		return nil
	}
	worstNote := "worst case at +C tolerance and the worst charge voltage"
	if !hasWorst {
		worstNote = "no worst-case bank stated"
	}
	basis := "Biot–Savart field of coaxial circular loops on their axis (Griffiths, Introduction to Electrodynamics, 4th ed., Example 5.6), summed over the coil's turns"
	in := []Input{{"I", "pulse.peak_current", ip, "A"}, {"N", "coil.turns", turns, "1"}}
	if err := a.Add(Quantity{Name: "field.peak_flux_density", Value: b0, Worst: w(b0W), Unit: "T",
		Formula: "B = Σ_j μ0 N_j I r_j² / (2 (r_j² + z_j²)^{3/2}) at the centre of the coil face", Inputs: in, Basis: basis,
		Note: joinLaunchNotes("at the coil-only (dry-fire) peak current; a projectile on the coil screens part of it", worstNote)}); err != nil {
		return err
	}
	limit := a.Targets.ImplantFluxLimit
	if !(limit > 0) {
		return nil
	}
	d, err := ImplantDistance(fils, ip, limit)
	if err != nil {
		return err
	}
	dW, err := ImplantDistance(fils, ipW, limit)
	if err != nil {
		return err
	}
	return a.Add(Quantity{Name: "field.implant_distance", Value: d, Worst: w(dW), Unit: "m",
		Formula: "smallest z with B_axis(z) ≤ B_limit, B_axis from the loop sum above",
		Inputs:  append(in, Input{"B_limit", "policy: implant field limit", limit, "T"}), Basis: basis,
		Note: joinLaunchNotes("measured from the coil face along the axis, the direction of the longest reach (the dipole far field on the axis is twice that in the coil's plane)",
			"the pulse peak is compared with a static-field limit, which is conservative for a millisecond pulse", worstNote)})
}
