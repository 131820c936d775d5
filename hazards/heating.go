package hazards

import (
	"fmt"
	"math"
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
