package report

import (
	"math"
	"testing"
)

// TestTicks checks the axis ticks: they cover the data range, step by 1, 2, 2.5 or 5 times a power of ten,
// and number four to eight intervals (the layout's choice; no published source).
func TestTicks(t *testing.T) {
	for _, tt := range []struct{ lo, hi float64 }{{0, 69.6}, {0, 6.27}, {0, 1}, {-0.27, 0.75}, {0, 935.9}, {-140, 705}, {0, 3.8}, {0, 1e-3}, {5, 5}} {
		ts := ticks(tt.lo, tt.hi)
		n := len(ts) - 1
		hi := math.Max(tt.hi, tt.lo+1)
		if tt.hi > tt.lo {
			hi = tt.hi
		}
		if n < 4 || n > 8 || ts[0] > tt.lo || ts[n] < hi {
			t.Errorf("ticks(%g, %g) = %v: got %d intervals over [%g, %g], want 4 to 8 covering the range", tt.lo, tt.hi, ts, n, ts[0], ts[n])
			continue
		}
		step := ts[1] - ts[0]
		m := step / math.Pow(10, math.Floor(math.Log10(step)+1e-9))
		ok := false
		for _, c := range []float64{1, 2, 2.5, 5} {
			// 1e-9 relative: the step is a product of exact decimal factors up to rounding of the power of ten
			if math.Abs(m-c) < 1e-9*c {
				ok = true
			}
		}
		if !ok {
			t.Errorf("ticks(%g, %g) = %v: got step %g, want 1, 2, 2.5 or 5 times a power of ten", tt.lo, tt.hi, ts, step)
		}
	}
}

// TestThin checks that thinning a long curve keeps its end points and its extremes.
func TestThin(t *testing.T) {
	var x, y []float64
	for i := 0; i < 10000; i++ {
		x = append(x, float64(i))
		y = append(y, math.Sin(float64(i)/300)*float64(i%977))
	}
	tx, ty := thin(x, y, 1200)
	if len(tx) > 1300 || tx[0] != x[0] || tx[len(tx)-1] != x[len(x)-1] {
		t.Fatalf("got %d points from %g to %g, want ≤ 1300 from %g to %g", len(tx), tx[0], tx[len(tx)-1], x[0], x[len(x)-1])
	}
	maxIn, maxOut := math.Inf(-1), math.Inf(-1)
	for i := range y {
		maxIn = math.Max(maxIn, y[i])
	}
	for i := range ty {
		maxOut = math.Max(maxOut, ty[i])
	}
	if maxIn != maxOut {
		t.Errorf("got peak %g after thinning, want %g", maxOut, maxIn)
	}
}

// TestXAxisScale checks the choice between a linear and a logarithmic time axis, and that the logarithmic
// one places decades evenly (log10 is the definition of the scale).
func TestXAxisScale(t *testing.T) {
	curve := func(end float64) series {
		c := series{}
		c.curve.XUnit, c.curve.XLabel = "s", "time (s)"
		for i := 0; i <= 240; i++ {
			c.curve.X = append(c.curve.X, end*float64(i)/240)
			c.curve.Y = append(c.curve.Y, 1)
		}
		return c
	}
	d, err := layout(fixtureReview(t, 0, "x"), Options{Date: reviewDate}, 0)
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name  string
		ends  []float64
		refs  []refLine
		log   bool
		title string
	}{
		{"one curve", []float64{936}, nil, false, "time (s)"},
		{"close spans", []float64{75, 259}, nil, false, "time (s)"},
		{"fast and slow decay", []float64{75.7, 81878}, nil, true, "time (s), logarithmic scale"},
		{"limit line near zero", []float64{100000}, []refLine{{vertical: true, v: 60}}, true, "time (s), logarithmic scale"},
		{"milliseconds", []float64{0.0063}, nil, false, "time (ms)"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var ss []series
			xMax := 0.0
			for _, e := range tt.ends {
				ss = append(ss, curve(e))
				xMax = math.Max(xMax, e)
			}
			a := d.xAxis(ss, tt.refs, 0, xMax)
			if a.title != tt.title {
				t.Errorf("title: got %q, want %q", a.title, tt.title)
			}
			if tt.log {
				f1, f10, f100 := a.frac(xMax/100), a.frac(xMax/10), a.frac(xMax)
				// equal steps per decade, to rounding
				if math.Abs((f10-f1)-(f100-f10)) > 1e-12 || f10 <= f1 {
					t.Errorf("decades: got %g, %g, %g, want equally spaced and increasing", f1, f10, f100)
				}
			}
			if a.frac(xMax) > 1+1e-12 || a.ticks[0].frac != 0 || a.ticks[len(a.ticks)-1].frac < a.frac(xMax)-1e-12 {
				t.Errorf("ticks %v do not cover the data up to %g (frac %g)", a.ticks, xMax, a.frac(xMax))
			}
		})
	}
}
