package report

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
	"time"
	"unicode"

	"github.com/go-pdf/fpdf"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goitalic"
	"golang.org/x/image/font/gofont/gomono"
	"golang.org/x/image/font/gofont/gomonobold"
	"golang.org/x/image/font/gofont/goregular"

	"chargeward/rules"
)

// Page geometry of the review, in millimetres on ISO 216 A4 (210 mm × 297 mm).
const (
	pageW, pageH = 210.0, 297.0
	marginL      = 18.0
	marginR      = 18.0
	contentW     = pageW - marginL - marginR
	headerY      = 9.0   // top of the running header
	bodyTop      = 22.0  // first line of body text
	bodyBottom   = 279.0 // nothing of the body below this
	footerY      = 283.0 // top of the running footer
	ptToMM       = 25.4 / 72
)

// Font families embedded in every review: the Go fonts (Bigelow & Holmes, BSD licence, see LICENSE-gofont),
// which cover WGL4 and so print Ω µ ² ° ≤ ± · × and the superscript digits.
const (
	sans = "gosans"
	mono = "gomono"
)

// FingerprintKey prefixes the fingerprint in the PDF's /Keywords metadata entry, where ReadFingerprint finds it.
const FingerprintKey = "chargeward-fingerprint:"

// ErrNoDate is returned by PDF when Options.Date is zero: a review must carry its date, and a reproducible PDF
// cannot read the clock.
var ErrNoDate = errors.New("report: the review date is required for a PDF review")

// box is one mark in the layout model: a line of text, a check box, a plot area. Tests check that no box
// leaves the page's printable area, that no two boxes on a page overlap, and that no text is wider than its
// box.
type box struct {
	Page       int
	X, Y, W, H float64
	Text       string
	TextW      float64 // width of Text in its font, mm
	Kind       string
}

// doc is one rendering of a review.
type doc struct {
	pdf    *fpdf.Fpdf
	r      *rules.Review
	opt    Options
	fp     string // fingerprint
	total  int    // page count, known on the second pass; 0 on the first
	y      float64
	boxes  []box
	glyphs *cmap // characters every embedded Go font can draw
	figNo  int
}

// PDF writes the review as a PDF document for sign-off: cover with the verdict, counts and fingerprint; key
// quantities; findings by hazard class; calculations; figures; procedure checklist; cautions and sign-off;
// appendices with the rig description as given and the policy in force. The same review and options give
// the same bytes. Options.Date is required; Options.Version enters the fingerprint.
//
// The document is built in memory and written to w only when complete, so a failed rendering writes nothing.
func PDF(w io.Writer, r *rules.Review, opt Options) error {
	b, err := renderPDF(r, opt)
	if err != nil {
		return err
	}
	_, err = w.Write(b)
	return err
}

// renderPDF renders the review in one pass: the footers' page count is fpdf's alias, replaced by the
// number of pages when the document is written (a second layout pass to count the pages took a third of
// the review's time). It returns the bytes.
func renderPDF(r *rules.Review, opt Options) ([]byte, error) {
	d, err := layout(r, opt, 0)
	if err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	if err := d.pdf.Output(&buf); err != nil {
		return nil, fmt.Errorf("report: writing the PDF: %w", err)
	}
	return buf.Bytes(), nil
}

// layout lays the whole review out; total is the page count for the footers (0: fpdf's alias pageAlias,
// replaced by the count on output).
func layout(r *rules.Review, opt Options, total int) (d *doc, err error) {
	if err := check(r); err != nil {
		return nil, err
	}
	if opt.Date.IsZero() {
		return nil, ErrNoDate
	}
	defer func() { // fpdf reports most problems through its error state, but a panic must not escape
		if p := recover(); p != nil {
			d, err = nil, fmt.Errorf("report: laying out the PDF: %v", p)
		}
	}()
	glyphs, gerr := fontGlyphs()
	if gerr != nil {
		return nil, fmt.Errorf("report: embedded font: %w", gerr)
	}
	d = &doc{r: r, opt: opt, fp: Fingerprint(r, opt.Version), total: total, glyphs: glyphs}
	p := fpdf.NewCustom(&fpdf.InitType{OrientationStr: "P", UnitStr: "mm", Size: fpdf.SizeType{Wd: pageW, Ht: pageH}})
	d.pdf = p
	p.SetCatalogSort(true)
	p.SetCompression(true)
	date := time.Date(opt.Date.Year(), opt.Date.Month(), opt.Date.Day(), 0, 0, 0, 0, time.UTC)
	p.SetCreationDate(date)
	p.SetModificationDate(date)
	info := r.Assessment.Rig.Rig
	p.SetTitle(d.clean("Hazard review: "+orDash(info.Name)+", revision "+orDash(info.Revision)), true)
	p.SetSubject("chargeward hazard review of a charged-capacitor rig", false)
	if opt.Reviewer != "" {
		p.SetAuthor(d.clean(opt.Reviewer), true)
	}
	p.SetCreator("chargeward "+opt.Version, false)
	p.SetProducer("chargeward "+opt.Version+" with github.com/go-pdf/fpdf", false)
	p.SetKeywords(FingerprintKey+d.fp, false)
	p.SetMargins(marginL, bodyTop, marginR)
	p.SetAutoPageBreak(false, 0)
	p.AliasNbPages(pageAlias)
	// fpdf's subsetter writes into the font bytes it is given, so each rendering gets its own copy: the
	// shared gofont slices stay pristine and the next rendering in this process gives the same bytes.
	p.AddUTF8FontFromBytes(sans, "", bytes.Clone(goregular.TTF))
	p.AddUTF8FontFromBytes(sans, "B", bytes.Clone(gobold.TTF))
	p.AddUTF8FontFromBytes(sans, "I", bytes.Clone(goitalic.TTF))
	p.AddUTF8FontFromBytes(mono, "", bytes.Clone(gomono.TTF))
	p.AddUTF8FontFromBytes(mono, "B", bytes.Clone(gomonobold.TTF))
	p.SetHeaderFunc(d.header)
	p.SetFooterFunc(d.footer)

	d.cover()
	d.summary()
	d.findings()
	d.calculations()
	d.figures()
	d.checklist()
	d.signOff()
	d.appendix()
	if err := p.Error(); err != nil {
		return nil, fmt.Errorf("report: laying out the PDF: %w", err)
	}
	return d, nil
}

// --- page furniture ---

func (d *doc) header() {
	info := d.r.Assessment.Rig.Rig
	d.setFont(sans, "", 8)
	d.pdf.SetTextColor(90, 90, 90)
	right := "revision " + orDash(info.Revision)
	rw := d.width(right) + 0.5
	if max := contentW * 0.45; rw > max { // a very long revision is cut too
		right = d.fit(right, max)
		rw = d.width(right) + 0.5
	}
	left := d.fit("Hazard review · "+orDash(info.Name), contentW-rw-4)
	lh := 4.0
	d.cell(marginL, headerY, contentW-rw-4, lh, left, "L", "header")
	d.cell(pageW-marginR-rw, headerY, rw, lh, right, "R", "header")
	d.pdf.SetDrawColor(150, 150, 150)
	d.pdf.SetLineWidth(0.2)
	d.pdf.Line(marginL, headerY+lh+1.5, pageW-marginR, headerY+lh+1.5)
	d.pdf.SetTextColor(0, 0, 0)
	d.y = bodyTop
}

// pageAlias stands for the page count in the footers until the document is written.
const pageAlias = "{nb}"

func (d *doc) footer() {
	d.setFont(sans, "", 8)
	d.pdf.SetTextColor(90, 90, 90)
	d.pdf.SetDrawColor(150, 150, 150)
	d.pdf.SetLineWidth(0.2)
	d.pdf.Line(marginL, footerY, pageW-marginR, footerY)
	total := pageAlias
	if d.total > 0 {
		total = fmt.Sprint(d.total)
	}
	right := fmt.Sprintf("page %d of %s", d.pdf.PageNo(), total)
	rw := d.width(right) + 0.5
	fp := d.fp
	if len(fp) > 16 {
		fp = fp[:16] + "…"
	}
	left := "chargeward " + d.opt.Version + " · fingerprint " + fp + " · review date " + dateString(d.opt.Date)
	d.cell(marginL, footerY+1.5, contentW-rw-4, 4, d.fit(left, contentW-rw-4), "L", "footer")
	d.cell(pageW-marginR-rw, footerY+1.5, rw, 4, right, "R", "footer")
	d.pdf.SetTextColor(0, 0, 0)
}

// --- text primitives ---

// glyphFallback spells the mathematical signs that the Go fonts lack (outside WGL4) but the formulas and
// notes of the physics use.
var glyphFallback = map[rune]string{
	'∈': "in", '∝': "prop. to", '≪': "<<", '≫': ">>", '⌊': "floor(", '⌋': ")", 'ᵀ': "^T",
}

// clean replaces what the fonts cannot draw (and control characters) so that no glyph prints as a blank box.
func (d *doc) clean(s string) string {
	var b strings.Builder
	for _, r := range s {
		switch {
		case r == '\t':
			b.WriteString("    ")
		case r == '\n':
			b.WriteRune(' ')
		case unicode.IsControl(r) || r == unicode.ReplacementChar:
			b.WriteRune('?')
		case r < 0x80:
			b.WriteRune(r)
		default:
			if d.glyphs.has(r) {
				b.WriteRune(r)
			} else if alt, ok := glyphFallback[r]; ok {
				b.WriteString(alt)
			} else {
				b.WriteRune('?')
			}
		}
	}
	return b.String()
}

func (d *doc) setFont(family, style string, size float64) { d.pdf.SetFont(family, style, size) }

// width is the width of s in the current font, mm.
func (d *doc) width(s string) float64 { return d.pdf.GetStringWidth(s) }

// lineH is the line height for a font size in points, mm.
func lineH(size float64) float64 { return size * ptToMM * 1.3 }

// fit shortens s with an ellipsis so that it fits w in the current font.
func (d *doc) fit(s string, w float64) string {
	s = d.clean(s)
	if d.width(s) <= w {
		return s
	}
	r := []rune(s)
	for len(r) > 0 && d.width(string(r)+"…") > w {
		r = r[:len(r)-1]
	}
	return string(r) + "…"
}

// cell draws s in the box (x, y, w, h) in the current font and records it in the layout model.
func (d *doc) cell(x, y, w, h float64, s, align, kind string) {
	s = d.clean(s)
	d.pdf.SetXY(x, y)
	d.pdf.CellFormat(w, h, s, "", 0, align, false, 0, "")
	// The box is the cell, grown to the font's em height where the cell is shorter: fpdf centres the text
	// vertically in the cell, so lines set closer than their em would touch.
	by, bh := y, h
	if _, em := d.pdf.GetFontSize(); em > h {
		by, bh = y+h/2-em/2, em
	}
	d.boxes = append(d.boxes, box{Page: d.pdf.PageNo(), X: x, Y: by, W: w, H: bh, Text: s, TextW: d.width(s), Kind: kind})
}

// mark records a non-text mark (a check box, a plot area) in the layout model.
func (d *doc) mark(x, y, w, h float64, kind string) {
	d.boxes = append(d.boxes, box{Page: d.pdf.PageNo(), X: x, Y: y, W: w, H: h, Kind: kind})
}

// wrap splits s into lines no wider than w in the given font. Explicit newlines are kept; a word wider than
// w is split between characters.
func (d *doc) wrap(s string, family, style string, size, w float64) []string {
	d.setFont(family, style, size)
	s = strings.ReplaceAll(s, "\t", "    ")
	var out []string
	for _, para := range strings.Split(s, "\n") {
		line := ""
		for _, word := range strings.Fields(d.clean(para)) {
			for d.width(word) > w {
				if line != "" {
					out = append(out, line)
					line = ""
				}
				r := []rune(word)
				n := len(r) - 1
				for n > 1 && d.width(string(r[:n])) > w {
					n--
				}
				out = append(out, string(r[:n]))
				word = string(r[n:])
			}
			switch {
			case line == "":
				line = word
			case d.width(line+" "+word) <= w:
				line += " " + word
			default:
				out = append(out, line)
				line = word
			}
		}
		out = append(out, line)
	}
	return out
}

// span is one wrapped line of a flowing block.
type span struct {
	x, w   float64
	family string
	style  string
	size   float64
	text   string
	rgb    [3]int
	gap    float64 // extra space above the line, mm
	kind   string  // layout-model kind; "" is "text"
}

func (s span) height() float64 { return s.gap + lineH(s.size) }

// spans wraps s into spans at x with width w.
func (d *doc) spans(s string, x, w float64, family, style string, size float64) []span {
	var out []span
	for _, l := range d.wrap(s, family, style, size, w) {
		out = append(out, span{x: x, w: w, family: family, style: style, size: size, text: l})
	}
	return out
}

func spansHeight(ss []span) float64 {
	h := 0.0
	for _, s := range ss {
		h += s.height()
	}
	return h
}

// newPage starts a page; the header resets d.y.
func (d *doc) newPage() { d.pdf.AddPage() }

// room reports whether h mm fit below d.y on this page.
func (d *doc) room(h float64) bool { return d.y+h <= bodyBottom+1e-9 }

// ensure starts a new page unless h mm fit on this one.
func (d *doc) ensure(h float64) {
	if !d.room(h) {
		d.newPage()
	}
}

// flow draws spans from d.y, keeping them on one page when they fit on one; bar, when set, is a coloured
// rule drawn at the left of the block on every page it occupies.
func (d *doc) flow(ss []span, bar *[3]int) {
	if h := spansHeight(ss); !d.room(h) && h <= bodyBottom-bodyTop {
		d.newPage()
	}
	start := d.y
	drawBar := func(to float64) {
		if bar != nil && to > start {
			d.pdf.SetFillColor(bar[0], bar[1], bar[2])
			d.pdf.Rect(marginL, start, 1.6, to-start, "F")
		}
	}
	for i, s := range ss {
		if !d.room(s.height()) {
			drawBar(d.y)
			d.newPage()
			start = d.y
		}
		if i > 0 || d.y > bodyTop {
			d.y += s.gap
		}
		d.setFont(s.family, s.style, s.size)
		d.pdf.SetTextColor(s.rgb[0], s.rgb[1], s.rgb[2])
		kind := s.kind
		if kind == "" {
			kind = "text"
		}
		d.cell(s.x, d.y, s.w, lineH(s.size), s.text, "L", kind)
		d.y += lineH(s.size)
	}
	d.pdf.SetTextColor(0, 0, 0)
	drawBar(d.y)
}

// heading starts a section on a new page.
func (d *doc) section(title string) {
	d.newPage()
	d.sectionTitle(title)
}

func (d *doc) sectionTitle(title string) {
	ss := d.spans(title, marginL, contentW, sans, "B", 15)
	for i := range ss {
		ss[i].kind = "heading"
	}
	d.flow(ss, nil)
	d.pdf.SetDrawColor(60, 60, 60)
	d.pdf.SetLineWidth(0.4)
	d.pdf.Line(marginL, d.y+0.8, pageW-marginR, d.y+0.8)
	d.y += 3.5
}

// subheading keeps itself together with at least keep mm of what follows.
func (d *doc) subheading(title string, keep float64) {
	ss := d.spans(title, marginL, contentW, sans, "B", 11.5)
	ss[0].gap = 3
	for i := range ss {
		ss[i].kind = "heading"
	}
	if !d.room(spansHeight(ss) + 1 + keep) {
		d.newPage()
	}
	d.flow(ss, nil)
	d.y += 1
}

// paragraph draws wrapped body text across the content width.
func (d *doc) paragraph(s string, style string, size float64) {
	d.flow(d.spans(s, marginL, contentW, sans, style, size), nil)
	d.y += 1.5
}

// --- tables ---

// column is one column of a table.
type column struct {
	title  string
	w      float64
	family string
	style  string
	size   float64
}

// tableOpt adjusts a table.
type tableOpt struct {
	noHeader bool                         // no header row (a label/value list)
	minRowH  float64                      // minimum row height, mm (room to write by hand)
	decorate func(i int, x, y, h float64) // draws extra marks for row i in the row's rectangle
	title    string                       // printed with "(continued)" above the header on later pages
}

// table draws rows under a header row that is repeated on every page the table spans. Each row keeps
// together.
func (d *doc) table(cols []column, rows [][]string, o tableOpt) {
	const pad = 1.2
	headSize := 8.0
	header := func() {
		x := marginL
		hh := 0.0
		var cells [][]string
		for _, c := range cols {
			l := d.wrap(c.title, sans, "B", headSize, c.w-2*pad)
			cells = append(cells, l)
			hh = math.Max(hh, float64(len(l))*lineH(headSize))
		}
		hh += 2 * pad
		d.pdf.SetFillColor(232, 232, 232)
		d.pdf.Rect(marginL, d.y, contentW, hh, "F")
		d.setFont(sans, "B", headSize)
		for i, c := range cols {
			for j, l := range cells[i] {
				d.cell(x+pad, d.y+pad+float64(j)*lineH(headSize), c.w-2*pad, lineH(headSize), l, "L", "table-head")
			}
			x += c.w
		}
		d.y += hh
	}
	headH := func() float64 {
		if o.noHeader {
			return 0
		}
		hh := 0.0
		for _, c := range cols {
			hh = math.Max(hh, float64(len(d.wrap(c.title, sans, "B", headSize, c.w-2*pad)))*lineH(headSize))
		}
		return hh + 2*pad
	}()
	first := true
	for i, row := range rows {
		var cells [][]string
		rh := 0.0
		for j, c := range cols {
			txt := ""
			if j < len(row) {
				txt = row[j]
			}
			l := []string{}
			if txt != "" {
				l = d.wrap(txt, c.family, c.style, c.size, c.w-2*pad)
			}
			cells = append(cells, l)
			rh = math.Max(rh, float64(len(l))*lineH(c.size))
		}
		rh = math.Max(math.Max(rh, lineH(9))+2*pad, o.minRowH)
		if rh > bodyBottom-bodyTop-headH { // a row taller than a page is cut; never in practice
			rh = bodyBottom - bodyTop - headH
		}
		if first || !d.room(rh) {
			if !d.room(headH + rh) {
				d.newPage()
				if !first && o.title != "" {
					d.flow(d.spans(o.title+" (continued)", marginL, contentW, sans, "B", 9), nil)
					d.y += 0.5
				}
			}
			if !o.noHeader {
				header()
			}
			first = false
		}
		x := marginL
		for j, c := range cols {
			d.setFont(c.family, c.style, c.size)
			for k, l := range cells[j] {
				ly := d.y + pad + float64(k)*lineH(c.size)
				if ly+lineH(c.size) > d.y+rh {
					break
				}
				d.cell(x+pad, ly, c.w-2*pad, lineH(c.size), l, "L", "table")
			}
			x += c.w
		}
		if o.decorate != nil {
			o.decorate(i, marginL, d.y, rh)
		}
		d.pdf.SetDrawColor(200, 200, 200)
		d.pdf.SetLineWidth(0.15)
		d.pdf.Line(marginL, d.y+rh, pageW-marginR, d.y+rh)
		d.y += rh
	}
	d.y += 2
}

// severityRGB is the signal-word colour of ANSI Z535.4 / ISO 3864-2 (red, orange, yellow, blue).
func severityRGB(s rules.Severity) [3]int {
	switch s {
	case rules.Danger:
		return [3]int{200, 16, 46}
	case rules.Warning:
		return [3]int{255, 120, 0}
	case rules.Caution:
		return [3]int{240, 200, 0}
	case rules.Notice:
		return [3]int{0, 90, 170}
	}
	return [3]int{120, 120, 120}
}
