package report

import (
	"encoding/binary"
	"errors"
	"sync"

	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goitalic"
	"golang.org/x/image/font/gofont/gomono"
	"golang.org/x/image/font/gofont/gomonobold"
	"golang.org/x/image/font/gofont/goregular"
)

// fontGlyphs is the set of characters that all five embedded fonts map, read once.
var fontGlyphs = sync.OnceValues(func() (*cmap, error) {
	var all *cmap
	for _, f := range [][]byte{goregular.TTF, gobold.TTF, goitalic.TTF, gomono.TTF, gomonobold.TTF} {
		c, err := parseCmap(f)
		if err != nil {
			return nil, err
		}
		if all == nil {
			all = c
		} else {
			all = all.intersect(c)
		}
	}
	return all, nil
})

// intersect returns the characters in both c and o.
func (c *cmap) intersect(o *cmap) *cmap {
	out := &cmap{}
	for _, a := range c.ranges {
		for _, b := range o.ranges {
			lo, hi := max(a[0], b[0]), min(a[1], b[1])
			if lo <= hi {
				out.ranges = append(out.ranges, [3]uint32{lo, hi, 1})
			}
		}
	}
	return out
}

// cmap is the set of characters a TrueType font maps to a glyph, read from its 'cmap' table (OpenType
// specification 1.9, "cmap — Character to Glyph Index Mapping Table", subtable formats 4 and 12). The
// report uses it to print '?' for a character the embedded font cannot draw instead of an empty box.
type cmap struct {
	ranges [][3]uint32 // start, end, and whether any glyph is non-zero (format 4 with idDelta is assumed mapped)
}

func (c *cmap) has(r rune) bool {
	for _, g := range c.ranges {
		if uint32(r) >= g[0] && uint32(r) <= g[1] {
			return true
		}
	}
	return false
}

var errFont = errors.New("font: no usable cmap subtable")

// parseCmap reads the Unicode cmap of a TrueType font.
func parseCmap(ttf []byte) (*cmap, error) {
	u16 := func(o int) (uint32, bool) {
		if o < 0 || o+2 > len(ttf) {
			return 0, false
		}
		return uint32(binary.BigEndian.Uint16(ttf[o:])), true
	}
	u32 := func(o int) (uint32, bool) {
		if o < 0 || o+4 > len(ttf) {
			return 0, false
		}
		return binary.BigEndian.Uint32(ttf[o:]), true
	}
	n, ok := u16(4)
	if !ok {
		return nil, errFont
	}
	table := -1
	for i := 0; i < int(n); i++ {
		rec := 12 + 16*i
		tag, ok := u32(rec)
		off, ok2 := u32(rec + 8)
		if !ok || !ok2 {
			return nil, errFont
		}
		if tag == 0x636d6170 { // "cmap"
			table = int(off)
		}
	}
	if table < 0 {
		return nil, errFont
	}
	subs, ok := u16(table + 2)
	if !ok {
		return nil, errFont
	}
	best, bestFormat := -1, uint32(0)
	for i := 0; i < int(subs); i++ {
		rec := table + 4 + 8*i
		pid, _ := u16(rec)
		eid, _ := u16(rec + 2)
		off, ok := u32(rec + 4)
		if !ok {
			return nil, errFont
		}
		format, ok := u16(table + int(off))
		if !ok {
			continue
		}
		unicode := pid == 0 || (pid == 3 && (eid == 1 || eid == 10))
		if unicode && (format == 12 || (format == 4 && bestFormat != 12)) {
			best, bestFormat = table+int(off), format
		}
	}
	c := &cmap{}
	switch bestFormat {
	case 4:
		segX2, _ := u16(best + 6)
		ends := best + 14
		starts := ends + int(segX2) + 2
		deltas := starts + int(segX2)
		rangeOffs := deltas + int(segX2)
		for s := 0; s < int(segX2)/2; s++ {
			end, ok1 := u16(ends + 2*s)
			start, ok2 := u16(starts + 2*s)
			delta, _ := u16(deltas + 2*s)
			ro, ok3 := u16(rangeOffs + 2*s)
			if !ok1 || !ok2 || !ok3 {
				return nil, errFont
			}
			if start == 0xFFFF {
				continue
			}
			if ro == 0 {
				// glyph = (code + delta) mod 65536; only a code that maps to glyph 0 is missing.
				for code := start; code <= end; code++ {
					if (code+delta)&0xFFFF != 0 {
						c.add(code)
					}
				}
				continue
			}
			for code := start; code <= end; code++ {
				at := rangeOffs + 2*s + int(ro) + 2*int(code-start)
				g, ok := u16(at)
				if ok && g != 0 {
					c.add(code)
				}
			}
		}
	case 12:
		groups, _ := u32(best + 12)
		for i := 0; i < int(groups); i++ {
			start, ok1 := u32(best + 16 + 12*i)
			end, ok2 := u32(best + 20 + 12*i)
			if !ok1 || !ok2 {
				return nil, errFont
			}
			c.ranges = append(c.ranges, [3]uint32{start, end, 1})
		}
	default:
		return nil, errFont
	}
	return c, nil
}

// add extends the last range by code or starts a new one.
func (c *cmap) add(code uint32) {
	if n := len(c.ranges); n > 0 && c.ranges[n-1][1]+1 == code {
		c.ranges[n-1][1] = code
		return
	}
	c.ranges = append(c.ranges, [3]uint32{code, code, 1})
}
