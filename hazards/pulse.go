package hazards

import (
	"errors"
	"fmt"
	"math"
)

// LoopModel is the series R-L-C discharge loop as later stages use it. Owner: pulse and coil (issue 4).
type LoopModel struct {
	C        float64 // bank capacitance, F
	V0       float64 // initial bank voltage, V
	R        float64 // total loop resistance except the coil: ESR + wiring + switch, Ω
	L        float64 // loop inductance except the coil: wiring stray + switch, H
	CoilL    float64 // coil inductance, H
	CoilR    float64 // coil resistance at 20 °C, Ω
	Drop     float64 // switch forward drop, V
	Topology string  // "unidirectional", "antiparallel-diode" or "crowbar"
	// CrowbarAt is "coil" or "bank" for a crowbar topology.
	CrowbarAt string
}

// PulseResult is the coil-only discharge of a LoopModel.
type PulseResult struct {
	Regime      string  // "underdamped", "critically damped" or "overdamped"
	Zeta        float64 // damping ratio ζ = (R/2)√(C/L)
	PeakCurrent float64 // A, largest coil current
	TimeToPeak  float64 // s
	End         float64 // s, end of the modelled pulse (last current zero, or the current below 1e-4 of its peak)

	seg rlcSegment
}

// rlcSegment is one interval of a series R-L-C loop carrying current in one direction: with u = vC − Vd,
// u” + 2α u' + ω0² u = 0, i = −C u'. S(t) and Cs(t) are the unified sine/hyperbolic-sine pair of the
// damped solution (q = ω0² − α²): S = sin(√q t)/√q, Cs = cos(√q t) for q > 0, the hyperbolic forms for q < 0,
// and their series about q = 0 near critical damping.
type rlcSegment struct {
	t0, l, c, alpha, q, u0, i0, drop float64
}

// sc returns S(t) and Cs(t).
func (s rlcSegment) sc(t float64) (S, Cs float64) {
	x := s.q * t * t
	switch {
	case math.Abs(x) < 1e-6:
		// Taylor series of sin(√q t)/√q and cos(√q t) in q t²: truncation error below 1e-19 relative.
		return t * (1 - x/6 + x*x/120), 1 - x/2 + x*x/24
	case s.q > 0:
		w := math.Sqrt(s.q)
		return math.Sin(w*t) / w, math.Cos(w * t)
	default:
		b := math.Sqrt(-s.q)
		return math.Sinh(b*t) / b, math.Cosh(b * t)
	}
}

// current returns the loop current at time t ≥ t0:
// i = e^{−α τ}[i0 Cs + (u0/L − α i0) S], τ = t − t0.
func (s rlcSegment) current(t float64) float64 {
	tau := t - s.t0
	S, Cs := s.sc(tau)
	return math.Exp(-s.alpha*tau) * (s.i0*Cs + (s.u0/s.l-s.alpha*s.i0)*S)
}

// voltage returns the capacitor voltage: vC = Vd + e^{−α τ}[u0 Cs + (α u0 − i0/C) S].
func (s rlcSegment) voltage(t float64) float64 {
	tau := t - s.t0
	S, Cs := s.sc(tau)
	return s.drop + math.Exp(-s.alpha*tau)*(s.u0*Cs+(s.alpha*s.u0-s.i0/s.c)*S)
}

// ErrLoop is returned (wrapped) for a loop the pulse model cannot evaluate.
var ErrLoop = errors.New("discharge loop cannot be evaluated")

// RLCPulse returns the closed-form discharge of the series R-L-C loop l from V0 with the coil alone (no
// projectile). With total resistance R, inductance L, capacitance C and a constant switch drop Vd, the loop
// obeys L di/dt + R i + Vd = vC, C dvC/dt = −i, whose solution with α = R/2L, ω0² = 1/LC is
//
//	i(t)  = (V0 − Vd)/L · e^{−αt} S(t),   vC(t) = Vd + (V0 − Vd) e^{−αt} [Cs(t) + α S(t)]
//
// with S = sin(ωd t)/ωd, Cs = cos(ωd t) (underdamped, ωd² = ω0² − α² > 0), S = t, Cs = 1 (critically damped),
// sinh/cosh (overdamped) — the standard series-RLC transient (e.g. Nilsson & Riedel, Electric Circuits,
// ch. 8). Units: F, V, Ω, H, s, A. Valid for C, L > 0, R ≥ 0, 0 ≤ Vd < V0.
func RLCPulse(l LoopModel) (PulseResult, error) {
	lt := l.L + l.CoilL
	rt := l.R + l.CoilR
	if !(l.C > 0 && lt > 0 && rt >= 0 && l.V0 > 0 && l.Drop >= 0) || !finite(l.C, lt, rt, l.V0, l.Drop) {
		return PulseResult{}, fmt.Errorf("%w: need C > 0, L > 0, R ≥ 0, V0 > 0, drop ≥ 0 (C %g F, L %g H, R %g Ω, V0 %g V, drop %g V)", ErrLoop, l.C, lt, rt, l.V0, l.Drop)
	}
	if l.Drop >= l.V0 {
		return PulseResult{}, fmt.Errorf("%w: switch drop %g V is not below the bank voltage %g V", ErrLoop, l.Drop, l.V0)
	}
	if l.Topology != "" && l.Topology != "unidirectional" {
		return PulseResult{}, fmt.Errorf("%w: topology %q not yet modelled", ErrLoop, l.Topology)
	}
	alpha := rt / (2 * lt)
	w0sq := 1 / (lt * l.C)
	s := rlcSegment{l: lt, c: l.C, alpha: alpha, q: w0sq - alpha*alpha, u0: l.V0 - l.Drop, drop: l.Drop}
	p := PulseResult{Zeta: alpha / math.Sqrt(w0sq), seg: s}
	switch {
	case p.Zeta < 1:
		p.Regime = "underdamped"
		wd := math.Sqrt(s.q)
		p.TimeToPeak = math.Atan(wd/alpha) / wd
		if alpha == 0 {
			p.TimeToPeak = math.Pi / (2 * wd)
		}
		p.End = math.Pi / wd
	case p.Zeta == 1:
		p.Regime = "critically damped"
		p.TimeToPeak = 1 / alpha
	default:
		p.Regime = "overdamped"
		b := math.Sqrt(-s.q)
		p.TimeToPeak = math.Log((alpha+b)/(alpha-b)) / (2 * b)
	}
	p.PeakCurrent = s.current(p.TimeToPeak)
	if p.Zeta >= 1 {
		// No current zero: end where the slow exponential has fallen to 1e-4 of the peak.
		slow := alpha - math.Sqrt(math.Max(-s.q, 0))
		p.End = p.TimeToPeak + math.Log(1e4)/slow
	}
	return p, nil
}

// Current returns the coil current at time t (s), A; zero outside [0, End].
func (p PulseResult) Current(t float64) float64 {
	if t < 0 || t > p.End {
		return 0
	}
	return p.seg.current(t)
}

// BankVoltage returns the bank (capacitor) voltage at time t (s), V; the final value after End.
func (p PulseResult) BankVoltage(t float64) float64 {
	if t < 0 {
		return p.seg.u0 + p.seg.drop
	}
	if t > p.End {
		t = p.End
	}
	return p.seg.voltage(t)
}

// finite reports whether every value is finite.
func finite(v ...float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

// assessPulse computes the coil-only pulse (DESIGN.md §4.4). PLACEHOLDER until issue 4 lands.
func assessPulse(a *Assessment) error { return nil }
