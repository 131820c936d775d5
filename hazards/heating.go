package hazards

import (
	"fmt"
	"math"

	"chargeward/hazards/em"
)

// Adiabatic conductor heating in the form of IEC 60949 (1988), "Calculation of thermally permissible
// short-circuit currents, taking into account non-adiabatic heating effects", clause 3 and Table 1:
//
//	I²t = K² S² ln((θf + β)/(θi + β)),   K² = σ (β + 20 °C) / ρ20
//
// with S the conductor section (m²), θi and θf the initial and final temperatures (°C), β the reciprocal of
// the temperature coefficient of resistivity at 0 °C (β = 1/α20 − 20 °C), σ the volumetric specific heat
// (J/(K·m³)) and ρ20 the resistivity at 20 °C. It follows from ρ rising linearly with temperature and no
// heat leaving the conductor during the pulse — true for a pulse of milliseconds (the enamel and the
// neighbouring turns take seconds to conduct heat away), conservative otherwise.

// iec60949K2 returns K² = σ(β + 20)/ρ20, A²s/m⁴, and β, K, for material m.
func iec60949K2(m Material) (k2, beta float64) {
	beta = 1/m.Alpha20 - 20
	return m.VolumetricHeat() * (beta + 20) / m.Resistivity20, beta
}

// AdiabaticFinal returns the conductor temperature, K, after the action integral i2t (A²s) through section
// s (m²) of material m starting from thetaI (K), by IEC 60949's adiabatic formula:
// θf = (θi + β) exp(I²t / (K² S²)) − β. Valid while the material constants hold (up to a few hundred °C).
func AdiabaticFinal(m Material, s, i2t, thetaI float64) (float64, error) {
	if !(s > 0 && i2t >= 0 && thetaI > 0 && m.Alpha20 > 0 && m.Resistivity20 > 0) || !finite(s, i2t, thetaI) {
		return 0, fmt.Errorf("adiabatic heating needs S > 0, I²t ≥ 0, θi > 0 K (S %g m², I²t %g A²s, θi %g K)", s, i2t, thetaI)
	}
	k2, beta := iec60949K2(m)
	x := i2t / (k2 * s * s)
	if x > 50 {
		return 0, fmt.Errorf("adiabatic heating: I²t %g A²s would vaporise a %g mm² conductor", i2t, s*1e6)
	}
	ti := thetaI - 273.15
	return (ti+beta)*math.Exp(x) - beta + 273.15, nil
}

// AdiabaticI2t returns the action integral, A²s, that heats section s (m²) of material m adiabatically from
// thetaI to thetaF (K): K² S² ln((θf + β)/(θi + β)) (IEC 60949).
func AdiabaticI2t(m Material, s, thetaI, thetaF float64) float64 {
	k2, beta := iec60949K2(m)
	return k2 * s * s * math.Log((thetaF-273.15+beta)/(thetaI-273.15+beta))
}

// ShotsToLimit returns how many identical shots of action integral i2t (A²s) a conductor of section s (m²)
// takes from thetaI to reach thetaLimit (K) if no heat leaves it between shots: each shot multiplies
// (θ + β) by exp(I²t/(K²S²)), so n = ln((θlim + β)/(θi + β)) · K²S²/I²t, rounded down. The assumption (no
// cooling, and the same I²t each shot although the hotter coil's higher resistance lowers the current) errs
// towards fewer shots. Returns −1 when i2t is zero (no limit).
func ShotsToLimit(m Material, s, i2t, thetaI, thetaLimit float64) int {
	if i2t <= 0 {
		return -1
	}
	if thetaLimit <= thetaI {
		return 0
	}
	n := AdiabaticI2t(m, s, thetaI, thetaLimit) / i2t
	if n > 1e9 {
		return 1e9
	}
	return int(math.Floor(n))
}

// maxReportedRise bounds the reported temperature rise, K: beyond it the conductor has melted (copper at
// 1085 °C, aluminium at 660 °C) and the adiabatic formula no longer describes it.
const maxReportedRise = 2000

// assessCoilHeating adds the coil's adiabatic temperature rise per shot, the shots to its insulation class
// with no cooling between shots, and the skin-depth check of the DC-resistance assumption.
func assessCoilHeating(a *Assessment, nom LoopModel, pn, pw PulseResult) error {
	cm := a.m.coil
	if cm == nil {
		return nil
	}
	if !(cm.Section > 0) {
		a.AddGap("coil.wire_gauge", "the coil's wire size is not stated: its temperature rise per shot and the shots to its insulation class cannot be computed")
		return nil
	}
	m := cm.Conductor
	rise := func(i2t float64) (float64, string) {
		tf, err := AdiabaticFinal(m, cm.Section, i2t, cm.Ambient)
		if err != nil || tf-cm.Ambient > maxReportedRise {
			return maxReportedRise, "the conductor would melt: the rise is capped at 2000 K, far beyond the formula's validity"
		}
		return tf - cm.Ambient, ""
	}
	rn, noteN := rise(pn.CoilI2t)
	rw, noteW := rise(pw.CoilI2t)
	k2, beta := iec60949K2(m)
	in := []Input{{"I²t", "coil.i2t", pn.CoilI2t, "A²s"}, {"S", "πd²/4", cm.Section, "m²"}, {"K", "√(σ(β+20)/ρ20) of " + m.Name, math.Sqrt(k2) * 1e-6, "A·s½/mm²"},
		{"β", "1/α20 − 20 °C", beta, "°C"}, {"θi", "coil.ambient_temperature", cm.Ambient, "K"}}
	basis := "IEC 60949 (1988) clause 3, adiabatic heating: I²t = K²S² ln((θf + β)/(θi + β)); " + m.Basis
	note := "adiabatic: no heat leaves the wire during the millisecond pulse; DC current distribution; worst case at the worst-case coil I²t"
	if noteN+noteW != "" {
		note = noteN + noteW
	}
	qs := []Quantity{
		{Name: "coil.temperature_rise", Value: rn, Worst: Worst(rw), Unit: "K", Formula: "Δθ = (θi + β)[exp(I²t/(K²S²)) − 1]", Inputs: in, Basis: basis, Note: note},
		{Name: "coil.final_temperature", Value: cm.Ambient + rn, Worst: Worst(cm.Ambient + rw), Unit: "K", Formula: "θf = θi + Δθ", Inputs: in, Basis: basis},
	}
	if cm.InsulationClass > 0 {
		sn := ShotsToLimit(m, cm.Section, pn.CoilI2t, cm.Ambient, cm.InsulationClass)
		sw := ShotsToLimit(m, cm.Section, pw.CoilI2t, cm.Ambient, cm.InsulationClass)
		qs = append(qs, Quantity{Name: "coil.shots_to_class", Value: float64(sn), Worst: Worst(float64(sw)), Unit: "1",
			Formula: "n = ⌊K²S² ln((θclass + β)/(θi + β)) / I²t⌋",
			Inputs:  append(in, Input{"θclass", "coil.insulation_class", cm.InsulationClass, "K"}), Basis: basis,
			Note: "if the coil does not cool at all between shots (the worst case for rapid firing) and each shot has the same I²t; real coils cool between shots, so this is a lower bound; −1: no current"})
	}
	// Skin depth at the pulse's ringing frequency f ≈ 1/(4 t_peak): δ = √(ρ/(π f μ0)).
	if pn.TimeToPeak > 0 {
		f := 1 / (4 * pn.TimeToPeak)
		delta := math.Sqrt(m.Resistivity20 / (math.Pi * f * em.Mu0))
		qs = append(qs, Quantity{Name: "coil.skin_depth_ratio", Value: cm.WireRadius / delta, Unit: "1", Formula: "r_wire / δ, δ = √(ρ20/(π f μ0)), f = 1/(4 t_peak)",
			Inputs: []Input{{"r_wire", "coil.wire_diameter/2", cm.WireRadius, "m"}, {"f", "1/(4·pulse.time_to_peak)", f, "Hz"}, {"ρ20", m.Name, m.Resistivity20, "Ω·m"}},
			Basis:  "skin depth of a good conductor (e.g. Cheng, Field and Wave Electromagnetics, 2nd ed., §8-3)",
			Note:   "above about 1 the current crowds to the surface: the DC resistance understates the loss and the surface runs hotter than the adiabatic average"})
	}
	return addAll(a, qs...)
}
