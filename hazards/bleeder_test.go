package hazards

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"chargeward/schema"
)

// TestResidualTarget checks the residual-voltage targets against NFPA 70 (NEC) 2023: 460.6(A), 50 V within
// 1 min for capacitors rated 1000 V or less; 460.28(A), 50 V within 5 min above 1000 V.
func TestResidualTarget(t *testing.T) {
	for _, tc := range []struct{ v, safe, within float64 }{{680, 50, 60}, {1000, 50, 60}, {1000.1, 50, 300}, {5000, 50, 300}} {
		if s, w, _ := ResidualTarget(tc.v); s != tc.safe || w != tc.within {
			t.Errorf("%g V: got %g V within %g s, want %g V within %g s", tc.v, s, w, tc.safe, tc.within)
		}
	}
}

// TestSizeBleederMeetsBounds checks that every plan's choices meet the request at the tolerance corners and
// that they are the largest standard values that do (the next value up misses the time limit).
func TestSizeBleederMeetsBounds(t *testing.T) {
	reqs := []BleederRequest{
		{Capacitance: 1100e-6, Voltage: 680, SafeVoltage: 50, TimeAllowed: 60, Series: 2, ElementVoltage: 350},
		{Capacitance: 2200e-6, Voltage: 745, SafeVoltage: 50, TimeAllowed: 60, Series: 2, ElementVoltage: 250},
		{Capacitance: 94e-6, Voltage: 330, SafeVoltage: 50, TimeAllowed: 60, PowerRating: 1},
		{Capacitance: 600e-6, Voltage: 400, SafeVoltage: 50, TimeAllowed: 60, PowerRating: 10, ChargerCurrent: 20e-3, ChargerShare: 1},
		{Capacitance: 50e-6, Voltage: 3000, SafeVoltage: 50, TimeAllowed: 300, ElementVoltage: 500, PowerRating: 3},
	}
	for i, req := range reqs {
		t.Run(fmt.Sprintf("%d: %g F at %g V", i, req.Capacitance, req.Voltage), func(t *testing.T) {
			p, err := SizeBleeder(req)
			if err != nil {
				t.Fatalf("got error %v, want a plan", err)
			}
			r := p.Request
			if len(p.Choices) == 0 {
				t.Fatal("got no choices")
			}
			if r.ElementVoltage > 0 && p.ElementVoltage > r.ElementVoltage*(1+1e-12) {
				t.Errorf("element voltage: got %g V, want ≤ %g V", p.ElementVoltage, r.ElementVoltage)
			}
			if p.Elements%r.Series != 0 {
				t.Errorf("got %d resistors for %d cells, want a multiple", p.Elements, r.Series)
			}
			for _, c := range p.Choices {
				if c.TimeToSafeWorst > r.TimeAllowed*(1+1e-12) {
					t.Errorf("%s %g Ω: worst time %g s, want ≤ %g s", c.Series, c.Element, c.TimeToSafeWorst, r.TimeAllowed)
				}
				if r.PowerRating > 0 && c.PowerWorst > r.Derating*r.PowerRating*(1+1e-12) {
					t.Errorf("%s %g Ω: worst power %g W, want ≤ %g W", c.Series, c.Element, c.PowerWorst, r.Derating*r.PowerRating)
				}
				if r.ChargerCurrent > 0 && c.Current > r.ChargerShare*r.ChargerCurrent*(1+1e-12) {
					t.Errorf("%s %g Ω: current %g A, want ≤ %g A", c.Series, c.Element, c.Current, r.ChargerShare*r.ChargerCurrent)
				}
				series := E12
				if c.Series == "E24" {
					series = E24
				}
				next, _ := ECeil(series, c.Element*(1+1e-6))
				if nc := p.choice(c.Series, next); nc.TimeToSafeWorst <= r.TimeAllowed {
					t.Errorf("%s: the next value %g Ω also meets the time (%g s), want %g Ω to be the largest", c.Series, next, nc.TimeToSafeWorst, c.Element)
				}
				if c.PowerStandard < c.PowerNeeded {
					t.Errorf("standard rating %g W below the %g W needed", c.PowerStandard, c.PowerNeeded)
				}
			}
		})
	}
}

// TestSizeBleederAgreesWithAssessment checks the solver against the assessment, two separate code paths: a rig
// carrying the chosen bleeder is assessed to the same worst-case time to safe and worst-case element power.
// Tolerance 1e-9 relative: the same formula evaluated in a different order.
func TestSizeBleederAgreesWithAssessment(t *testing.T) {
	req := BleederRequest{Capacitance: 1100e-6, Voltage: 680, SafeVoltage: 50, TimeAllowed: 60, Series: 2, ElementVoltage: 350}
	p, err := SizeBleeder(req)
	if err != nil {
		t.Fatal(err)
	}
	c := p.Choices[len(p.Choices)-1]
	r := &schema.Rig{
		Supply:  &schema.Supply{Kind: "dc-supply", DCVoltage: elF(680)},
		Bank:    schema.Bank{Capacitance: elF(2200e-6), CapacitanceTolerance: elF(0.2), VoltageRating: elF(400), Series: elI(2), Parallel: elI(1)},
		Bleeder: &schema.Bleeder{Resistance: elF(c.Element), ElementsInSeries: elI(p.Elements), Tolerance: elF(0.05)},
	}
	a := elAssess(t, r)
	if got := *elQ(t, a, "discharge.time_to_safe").Worst; !scalar.EqualWithinRel(got, c.TimeToSafeWorst, 1e-9) {
		t.Errorf("worst time: assessment %g s, solver %g s", got, c.TimeToSafeWorst)
	}
	if got := *elQ(t, a, "bleeder.power").Worst; !scalar.EqualWithinRel(got, c.PowerWorst, 1e-9) {
		t.Errorf("worst power: assessment %g W, solver %g W", got, c.PowerWorst)
	}
}

// TestSizeBleederEmptyWindow checks that an impossible request names the winning bound, and that following the
// advice (more resistors in series, or a larger charger) opens the window.
func TestSizeBleederEmptyWindow(t *testing.T) {
	req := BleederRequest{Capacitance: 1100e-6, Voltage: 680, SafeVoltage: 50, TimeAllowed: 60, Series: 2, PowerRating: 2}
	_, err := SizeBleeder(req)
	var we *WindowError
	if !errors.As(err, &we) || !errors.Is(err, ErrBleederWindow) || we.Winner != "power" {
		t.Fatalf("got %v, want a power-bound window error", err)
	}
	// The advice's count opens the window: RMinPower scales as 1/n, and the count must leave an E24 value inside.
	perCell, ok := countThatFits(we.Plan)
	if !ok || !strings.Contains(we.Advice, fmt.Sprintf("(%d per cell)", perCell)) {
		t.Fatalf("got advice %q, want a count of resistors per cell", we.Advice)
	}
	if perCell*2 < int(math.Ceil(float64(we.Plan.Elements)*we.Plan.RMinPower/we.Plan.RMax)) {
		t.Errorf("advised %d per cell: fewer than the power bound allows", perCell)
	}
	req.ElementVoltage = 680 / 2 / float64(perCell)
	if _, err := SizeBleeder(req); err != nil {
		t.Errorf("with %d per cell: got %v, want a plan", perCell, err)
	}
	req.ElementVoltage = 680 / 2 / float64(perCell-1)
	if _, err := SizeBleeder(req); err == nil {
		t.Errorf("with %d per cell: got a plan, want the advised count to be the least", perCell-1)
	}
	ch := BleederRequest{Capacitance: 1100e-6, Voltage: 680, SafeVoltage: 50, TimeAllowed: 600, ChargerCurrent: 20e-3}
	if _, err := SizeBleeder(ch); !errors.As(err, &we) || we.Winner != "charger" {
		t.Fatalf("got %v, want a charger-bound window error", err)
	}
	ch.ChargerCurrent = 50e-3
	if _, err := SizeBleeder(ch); err != nil {
		t.Errorf("with 50 mA: got %v, want a plan", err)
	}
}

// TestSizeBleederMonotone is a property test: more capacitance or less time never raises the upper bound.
func TestSizeBleederMonotone(t *testing.T) {
	prev := math.Inf(1)
	for _, c := range []float64{10e-6, 100e-6, 1e-3, 10e-3} {
		for _, within := range []float64{600, 60} {
			p, err := SizeBleeder(BleederRequest{Capacitance: c, Voltage: 400, SafeVoltage: 50, TimeAllowed: within})
			if err != nil {
				t.Fatal(err)
			}
			if p.RMax > prev {
				t.Errorf("C = %g F, %g s: got RMax %g Ω, want ≤ %g Ω", c, within, p.RMax, prev)
			}
			prev = p.RMax
		}
	}
}

// TestSizeBleederBadRequest checks that invalid requests are errors, not plans.
func TestSizeBleederBadRequest(t *testing.T) {
	ok := BleederRequest{Capacitance: 1e-3, Voltage: 400, SafeVoltage: 50, TimeAllowed: 60}
	tests := map[string]func(*BleederRequest){
		"no capacitance":         func(r *BleederRequest) { r.Capacitance = 0 },
		"NaN voltage":            func(r *BleederRequest) { r.Voltage = math.NaN() },
		"below safe":             func(r *BleederRequest) { r.Voltage = 40 },
		"negative series":        func(r *BleederRequest) { r.Series = -2 },
		"derating above 1":       func(r *BleederRequest) { r.Derating = 1.5 },
		"tolerance 100 %":        func(r *BleederRequest) { r.ResistorTolerance = Worst(1) },
		"infinite time":          func(r *BleederRequest) { r.TimeAllowed = math.Inf(1) },
		"absurd element voltage": func(r *BleederRequest) { r.ElementVoltage = 1e-6 },
	}
	for name, f := range tests {
		t.Run(name, func(t *testing.T) {
			r := ok
			f(&r)
			if _, err := SizeBleeder(r); err == nil {
				t.Errorf("got no error, want one")
			}
		})
	}
	if _, err := SizeBleeder(ok); err != nil {
		t.Errorf("valid request: got %v", err)
	}
}
