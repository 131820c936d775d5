package report

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"chargeward/hazards"
)

// The figures are drawn as vector paths straight into the PDF: axes with ticks at 1-2-5 steps, axis titles
// with quantity and prefixed unit, the curves, reference lines, and a legend below the plot. Nothing here
// computes physics: the curves come from the assessment, the reference lines from its targets and the rig.

// series is one curve of a figure.
type series struct {
	curve hazards.Curve
	label string
	rgb   [3]int
	dash  bool
}

// refLine is a horizontal (a y value) or vertical (an x value) reference line.
type refLine struct {
	vertical bool
	v        float64 // SI
	label    string
	rgb      [3]int
}

var (
	blue   = [3]int{0, 80, 160}
	orange = [3]int{210, 100, 0}
	red    = [3]int{200, 16, 46}
	grey   = [3]int{90, 90, 90}
)

func (d *doc) figures() {
	d.section("4  Figures")
	a := d.r.Assessment
	t := a.Targets

	var decay []series
	if c, ok := a.Curve("discharge.decay"); ok {
		decay = append(decay, series{c, "permanent paths (bleeders, balancing, leakage)", blue, false})
	}
	if c, ok := a.Curve("discharge.decay_single_fault"); ok {
		decay = append(decay, series{c, "one permanent path failed open", orange, true})
	}
	var refs []refLine
	if t.SafeVoltage > 0 {
		refs = append(refs, refLine{false, t.SafeVoltage, "safe voltage " + SI(t.SafeVoltage, "V"), red})
	}
	if t.TimeAllowed > 0 {
		refs = append(refs, refLine{true, t.TimeAllowed, "time allowed " + SI(t.TimeAllowed, "s"), grey})
	}
	d.figure("Bank voltage after switch-off through the permanent discharge paths (a dump circuit is not counted)", decay, refs,
		"the discharge curves (discharge.decay, discharge.decay_single_fault)")

	// A rig without a coil (a flash bank) discharges through its load: name the loop, not a coil.
	hasCoil := a.Rig != nil && a.Rig.Coil != nil
	dry, through := "coil only", "Discharge current through the coil"
	if !hasCoil {
		dry, through = "discharge loop", "Discharge current in the loop"
	}
	var cur, volt []series
	if c, ok := a.Curve("pulse.current"); ok {
		if !hasCoil {
			c.YLabel = "loop current (A)"
		}
		cur = append(cur, series{c, dry, blue, false})
	}
	if c, ok := a.Curve("launch.current"); ok {
		cur = append(cur, series{c, "with projectile", orange, true})
	}
	d.figure(through, cur, nil, "the current waveforms (pulse.current, launch.current)")
	if c, ok := a.Curve("pulse.bank_voltage"); ok {
		volt = append(volt, series{c, dry, blue, false})
	}
	if c, ok := a.Curve("launch.bank_voltage"); ok {
		volt = append(volt, series{c, "with projectile", orange, true})
	}
	d.figure("Bank voltage during the discharge", volt, nil, "the bank voltage waveforms (pulse.bank_voltage, launch.bank_voltage)")

	var height []series
	if c, ok := a.Curve("launch.height"); ok {
		height = append(height, series{c, "projectile height", blue, false})
	}
	var hrefs []refLine
	note := ""
	if rm := a.Rig.Room; rm != nil && rm.CeilingHeight != nil {
		hrefs = append(hrefs, refLine{false, *rm.CeilingHeight, "ceiling " + SI(*rm.CeilingHeight, "m"), red})
	} else {
		note = "The ceiling height is not stated in the rig description, so no ceiling line is drawn."
	}
	d.figure("Projectile height above its start against time", height, hrefs, "the flight curve (launch.height)")
	if note != "" {
		d.paragraph(note, "I", 8.5)
	}
}

// Figure geometry, mm.
const (
	figPlotH   = 68.0
	figLeft    = 20.0 // from the margin to the plot area: y-axis title and tick labels
	figRightIn = 3.0
)

// figure draws one numbered figure, or says why it is not drawn.
func (d *doc) figure(title string, ss []series, refs []refLine, what string) {
	d.figNo++
	caption := fmt.Sprintf("Figure %d. %s", d.figNo, title)
	var ok []series
	for _, s := range ss {
		if c := cleanCurve(s.curve); len(c.X) >= 2 {
			s.curve = c
			ok = append(ok, s)
		}
	}
	if len(ok) == 0 {
		ss := d.spans(caption, marginL, contentW, sans, "B", 10)
		ss = append(ss, d.spans("Not drawn: the assessment has no "+what+". Where the rig description leaves out "+
			"what the model needs, the findings and section 1 name it.", marginL, contentW, sans, "I", 9)...)
		d.y += 2
		d.flow(ss, nil)
		d.y += 4
		return
	}

	// Units and scales.
	yUnit := ok[0].curve.YUnit
	xMin, xMax, yMin, yMax := math.Inf(1), math.Inf(-1), 0.0, 0.0
	for _, s := range ok {
		for i := range s.curve.X {
			xMin, xMax = math.Min(xMin, s.curve.X[i]), math.Max(xMax, s.curve.X[i])
			yMin, yMax = math.Min(yMin, s.curve.Y[i]), math.Max(yMax, s.curve.Y[i])
		}
	}
	for _, r := range refs {
		if r.vertical {
			xMax = math.Max(xMax, r.v*1.08)
		} else {
			yMax = math.Max(yMax, r.v*1.08)
			yMin = math.Min(yMin, r.v)
		}
	}
	if xMax <= xMin {
		xMax = xMin + 1
	}
	if yMax <= yMin {
		yMax = yMin + 1
	}
	xa := d.xAxis(ok, refs, xMin, xMax)
	yDiv, yPU := scaleFor(math.Max(math.Abs(yMin), math.Abs(yMax)), yUnit)
	yt := ticks(yMin/yDiv, yMax/yDiv)
	y0, y1 := yt[0], yt[len(yt)-1]

	// Legend entries, to size the block.
	type entry struct {
		label string
		rgb   [3]int
		dash  bool
	}
	var legend []entry
	for _, s := range ok {
		legend = append(legend, entry{s.label, s.rgb, s.dash})
	}
	for _, r := range refs {
		legend = append(legend, entry{r.label, r.rgb, true})
	}
	const legSize = 8.0
	d.setFont(sans, "", legSize)
	legRows, lx := 1, 0.0
	for _, e := range legend {
		w := 10 + d.width(d.clean(e.label)) + 6
		if lx > 0 && lx+w > contentW-figLeft {
			legRows++
			lx = 0
		}
		lx += w
	}
	capLines := d.spans(caption, marginL, contentW, sans, "B", 10)
	tickH := lineH(7.5)
	total := spansHeight(capLines) + 2 + figPlotH + tickH + lineH(8.5) + 1.5 + float64(legRows)*lineH(legSize) + 6
	d.ensure(total)
	d.flow(capLines, nil)
	d.y += 2

	px, py := marginL+figLeft, d.y
	pw, ph := contentW-figLeft-figRightIn, figPlotH
	mapX := func(v float64) float64 { return px + xa.frac(v)*pw }
	mapY := func(v float64) float64 { return py + ph - (v/yDiv-y0)/(y1-y0)*ph }

	// Grid and frame.
	p := d.pdf
	p.SetLineWidth(0.1)
	p.SetDrawColor(215, 215, 215)
	for _, t := range xa.ticks {
		x := px + t.frac*pw
		p.Line(x, py, x, py+ph)
	}
	for _, v := range yt {
		y := py + ph - (v-y0)/(y1-y0)*ph
		p.Line(px, y, px+pw, y)
	}
	p.SetDrawColor(0, 0, 0)
	p.SetLineWidth(0.3)
	p.Rect(px, py, pw, ph, "D")
	d.mark(px, py, pw, ph, "plot")

	// Tick labels.
	d.setFont(sans, "", 7.5)
	yDec := decimals(yt)
	prevRight := math.Inf(-1)
	for _, t := range xa.ticks {
		s := t.label
		w := d.width(s) + 0.4
		x := px + t.frac*pw - w/2
		x = math.Max(px-1, math.Min(x, px+pw+figRightIn-w))
		if x < prevRight+1 { // never let tick labels touch; ticks() keeps them sparse enough in practice
			continue
		}
		d.cell(x, py+ph+0.6, w, tickH, s, "C", "tick")
		prevRight = x + w
	}
	for _, v := range yt {
		s := strconv.FormatFloat(v, 'f', yDec, 64)
		w := d.width(s) + 0.4
		y := py + ph - (v-y0)/(y1-y0)*ph - tickH/2
		y = math.Max(py-tickH/2, math.Min(y, py+ph-tickH/2))
		d.cell(px-1.2-w, y, w, tickH, s, "R", "tick")
	}
	// Axis titles with quantity and prefixed unit.
	d.setFont(sans, "", 8.5)
	xTitle := d.fit(xa.title, pw)
	d.cell(px, py+ph+tickH+0.8, pw, lineH(8.5), xTitle, "C", "axis-title")
	yTitle := d.fit(axisTitle(ok[0].curve.YLabel, yUnit, yPU), ph)
	yw := d.width(yTitle)
	bx := marginL + 3.6 // baseline of the rotated title
	p.TransformBegin()
	p.TransformRotate(90, bx, py+ph/2+yw/2)
	p.Text(bx, py+ph/2+yw/2, yTitle)
	p.TransformEnd()
	lh := lineH(8.5)
	d.boxes = append(d.boxes, box{Page: p.PageNo(), X: bx - lh*0.8, Y: py + ph/2 - yw/2, W: lh, H: yw, Text: yTitle, TextW: lh,
		Kind: "axis-title"})

	// Reference lines and curves, clipped to the plot area.
	p.ClipRect(px, py, pw, ph, false)
	for _, r := range refs {
		p.SetDrawColor(r.rgb[0], r.rgb[1], r.rgb[2])
		p.SetLineWidth(0.35)
		p.SetDashPattern([]float64{1.2, 1.0}, 0)
		if r.vertical {
			x := mapX(r.v)
			p.Line(x, py, x, py+ph)
		} else {
			y := mapY(r.v)
			p.Line(px, y, px+pw, y)
		}
	}
	for _, s := range ok {
		p.SetDrawColor(s.rgb[0], s.rgb[1], s.rgb[2])
		p.SetLineWidth(0.45)
		if s.dash {
			p.SetDashPattern([]float64{2.4, 1.2}, 0)
		} else {
			p.SetDashPattern(nil, 0)
		}
		xs, ys := thin(s.curve.X, s.curve.Y, 1200)
		p.MoveTo(mapX(xs[0]), mapY(ys[0]))
		for i := 1; i < len(xs); i++ {
			p.LineTo(mapX(xs[i]), mapY(ys[i]))
		}
		p.DrawPath("D")
	}
	p.SetDashPattern(nil, 0)
	p.ClipEnd()

	// Legend below the plot.
	d.y = py + ph + tickH + lh + 2.5
	d.setFont(sans, "", legSize)
	lx = 0
	for _, e := range legend {
		label := d.fit(e.label, contentW-figLeft-18)
		w := 10 + d.width(label) + 0.5
		if lx > 0 && lx+w+5.5 > contentW-figLeft {
			d.y += lineH(legSize)
			lx = 0
		}
		x := px + lx
		ly := d.y + lineH(legSize)/2
		p.SetDrawColor(e.rgb[0], e.rgb[1], e.rgb[2])
		p.SetLineWidth(0.45)
		if e.dash {
			p.SetDashPattern([]float64{2.4, 1.2}, 0)
		}
		p.Line(x, ly, x+8, ly)
		p.SetDashPattern(nil, 0)
		d.cell(x+9.5, d.y, w-9.5, lineH(legSize), label, "L", "legend")
		d.mark(x, ly-0.5, 8, 1, "legend-line")
		lx += w + 5.5
	}
	d.y += lineH(legSize) + 6
	p.SetDrawColor(0, 0, 0)
}

// axisTick is one tick of the x axis: its place along the axis (0 to 1) and its label.
type axisTick struct {
	frac  float64
	label string
}

// axis is the x axis of a figure: where an SI value falls along it, its ticks and its title.
type axis struct {
	frac  func(v float64) float64
	ticks []axisTick
	title string
}

// logRatio is the spread of the curves' time spans above which the x axis is logarithmic: a fast and a slow
// decay on one linear axis would leave the fast one as a line on the left edge.
const logRatio = 20

// xAxis chooses a linear axis with SI-prefixed unit, or a logarithmic one (decade ticks, base unit) when the
// curves' spans differ by more than logRatio or a vertical reference line would sit in the first 2 %.
func (d *doc) xAxis(ss []series, refs []refLine, xMin, xMax float64) axis {
	unit, label := ss[0].curve.XUnit, ss[0].curve.XLabel
	minEnd, minPos := math.Inf(1), math.Inf(1)
	for _, s := range ss {
		minEnd = math.Min(minEnd, s.curve.X[len(s.curve.X)-1])
		for _, x := range s.curve.X {
			if x > 0 {
				minPos = math.Min(minPos, x)
				break
			}
		}
	}
	logX := xMin >= 0 && minEnd > 0 && xMax/minEnd > logRatio
	for _, r := range refs {
		if r.vertical && r.v > 0 && r.v < 0.02*xMax && xMin >= 0 {
			logX = true
			minPos = math.Min(minPos, r.v)
		}
	}
	if logX && minPos < math.Inf(1) {
		lo := math.Floor(math.Log10(minPos))
		hi := math.Ceil(math.Log10(xMax))
		if hi <= lo {
			hi = lo + 1
		}
		step := math.Ceil((hi - lo) / 8)
		a := axis{frac: func(v float64) float64 {
			if v <= 0 {
				return 0
			}
			return math.Max(0, (math.Log10(v)-lo)/(hi-lo))
		}}
		for e := lo; e <= hi+1e-9; e += step {
			a.ticks = append(a.ticks, axisTick{(e - lo) / (hi - lo), decade(int(e))})
		}
		a.title = axisTitle(label, unit, unit) + ", logarithmic scale"
		return a
	}
	div, pu := scaleFor(math.Max(math.Abs(xMin), math.Abs(xMax)), unit)
	xt := ticks(xMin/div, xMax/div)
	x0, x1 := xt[0], xt[len(xt)-1]
	a := axis{frac: func(v float64) float64 { return (v/div - x0) / (x1 - x0) }, title: axisTitle(label, unit, pu)}
	dec := decimals(xt)
	for _, v := range xt {
		a.ticks = append(a.ticks, axisTick{(v - x0) / (x1 - x0), strconv.FormatFloat(v, 'f', dec, 64)})
	}
	return a
}

// decade labels 10ⁿ: "1", "10", "100" and otherwise 10 with a superscript exponent.
func decade(e int) string {
	switch e {
	case 0:
		return "1"
	case 1:
		return "10"
	case 2:
		return "100"
	}
	return "10" + superscript.Replace(strconv.Itoa(e))
}

// cleanCurve drops points that are non-finite or unpaired.
func cleanCurve(c hazards.Curve) hazards.Curve {
	n := min(len(c.X), len(c.Y))
	out := c
	out.X, out.Y = nil, nil
	for i := 0; i < n; i++ {
		x, y := c.X[i], c.Y[i]
		if math.IsNaN(x) || math.IsInf(x, 0) || math.IsNaN(y) || math.IsInf(y, 0) {
			continue
		}
		out.X = append(out.X, x)
		out.Y = append(out.Y, y)
	}
	return out
}

// thin keeps at most about n points, keeping the first and last point and, within each bucket of
// consecutive points, the lowest and the highest (so that peaks survive).
func thin(x, y []float64, n int) ([]float64, []float64) {
	if len(x) <= n {
		return x, y
	}
	bucket := (len(x) + n/2 - 1) / (n / 2)
	var ox, oy []float64
	for s := 0; s < len(x); s += bucket {
		e := min(s+bucket, len(x))
		lo, hi := s, s
		for i := s; i < e; i++ {
			if y[i] < y[lo] {
				lo = i
			}
			if y[i] > y[hi] {
				hi = i
			}
		}
		a, b := min(lo, hi), max(lo, hi)
		ox, oy = append(ox, x[a]), append(oy, y[a])
		if b != a {
			ox, oy = append(ox, x[b]), append(oy, y[b])
		}
	}
	if last := len(x) - 1; ox[len(ox)-1] != x[last] {
		ox, oy = append(ox, x[last]), append(oy, y[last])
	}
	return ox, oy
}

// scaleFor returns the divisor and prefixed unit that SI would use for a value of magnitude v.
func scaleFor(v float64, unit string) (float64, string) {
	lo, hi := 0, 0
	switch unit {
	case "V", "A", "F", "H", "Ω", "J", "W", "C", "T", "Hz", "N", "Pa", "VA":
		lo, hi = -12, 9
	case "s":
		lo, hi = -9, 0
	case "m":
		lo, hi = -6, 3
	case "A/s":
		return 1e6, "A/µs"
	default:
		return 1, unit
	}
	if v == 0 {
		return 1, unit
	}
	e := int(math.Floor(math.Log10(round3(v))/3)) * 3
	e = max(lo, min(hi, e))
	return math.Pow(10, float64(e)), prefixes[e] + unit
}

// axisTitle puts the prefixed unit into a label such as "time (s)"; a label without a unit gets one.
func axisTitle(label, unit, prefixed string) string {
	label = strings.TrimSpace(label)
	if label == "" {
		label = "value"
	}
	if unit != "" && strings.HasSuffix(label, "("+unit+")") {
		return strings.TrimSuffix(label, "("+unit+")") + "(" + prefixed + ")"
	}
	if i := strings.LastIndex(label, " ("); i > 0 && strings.HasSuffix(label, ")") {
		label = label[:i]
	}
	if prefixed == "" || prefixed == "1" {
		return label
	}
	return label + " (" + prefixed + ")"
}

// ticks returns tick values at a 1-2-2.5-5 step covering [lo, hi] with four to eight intervals, choosing
// the step whose ticks waste the least of the axis.
func ticks(lo, hi float64) []float64 {
	if !(hi > lo) {
		hi = lo + 1
	}
	mag := math.Pow(10, math.Floor(math.Log10((hi-lo)/6)))
	best, bestSpan := 0.0, math.Inf(1)
	// On a tie the earlier candidate wins: 1-2-5 steps read more easily than 2.5.
	for _, m := range []float64{0.5, 1, 2, 5, 10, 20, 2.5, 25} {
		step := m * mag
		n := math.Ceil(hi/step-1e-9) - math.Floor(lo/step+1e-9)
		if n < 4 || n > 8 {
			continue
		}
		if span := n * step; span < bestSpan*(1-1e-9) {
			best, bestSpan = step, span
		}
	}
	if best == 0 {
		best = mag * 2
	}
	start := math.Floor(lo/best+1e-9) * best
	end := math.Ceil(hi/best-1e-9) * best
	var out []float64
	for i := 0; ; i++ {
		v := start + float64(i)*best
		if math.Abs(v) < best*1e-9 {
			v = 0
		}
		out = append(out, v)
		if v >= end-best*1e-9 || i > 20 {
			break
		}
	}
	return out
}

// decimals is the number of decimals that prints every tick distinctly.
func decimals(t []float64) int {
	if len(t) < 2 {
		return 0
	}
	step := t[1] - t[0]
	d := int(math.Ceil(-math.Log10(step) - 1e-9))
	if step*math.Pow(10, float64(max(d, 0)))-math.Floor(step*math.Pow(10, float64(max(d, 0)))+1e-9) > 1e-6 {
		d++ // a 2.5 step needs one more digit
	}
	return max(d, 0)
}
