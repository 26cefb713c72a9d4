// Package canvas is a small braille plotting surface for the terminal: each
// character cell holds 2×4 dots, so a w×h cell canvas has 2w×4h dots. Dots
// belong to layers (a curve, an axis line) so that the caller can style each
// cell by the layers in it. It draws nothing itself and imports no UI code.
package canvas

import "strings"

// Canvas is a grid of braille cells. The zero value is empty; use New.
type Canvas struct {
	w, h   int
	dots   []uint8 // braille bit pattern per cell
	layers []uint8 // bit per layer that set a dot in the cell
	text   []rune  // overlay text (0 = none)
}

// New makes a canvas of w×h character cells.
func New(w, h int) *Canvas {
	c := &Canvas{}
	c.Resize(w, h)
	return c
}

// Resize changes the size and clears the canvas, reusing memory.
func (c *Canvas) Resize(w, h int) {
	if w < 0 {
		w = 0
	}
	if h < 0 {
		h = 0
	}
	c.w, c.h = w, h
	n := w * h
	if cap(c.dots) < n {
		c.dots = make([]uint8, n)
		c.layers = make([]uint8, n)
		c.text = make([]rune, n)
	}
	c.dots = c.dots[:n]
	c.layers = c.layers[:n]
	c.text = c.text[:n]
	c.Clear()
}

// Clear removes every dot and text.
func (c *Canvas) Clear() {
	for i := range c.dots {
		c.dots[i], c.layers[i], c.text[i] = 0, 0, 0
	}
}

// Size is the canvas size in cells.
func (c *Canvas) Size() (w, h int) { return c.w, c.h }

// DotSize is the canvas size in dots.
func (c *Canvas) DotSize() (w, h int) { return 2 * c.w, 4 * c.h }

// braille bit for dot (column dx 0..1, row dy 0..3) of a cell (Unicode
// braille patterns: dots 1-2-3-7 left column, 4-5-6-8 right column).
var bits = [2][4]uint8{{0x01, 0x02, 0x04, 0x40}, {0x08, 0x10, 0x20, 0x80}}

// Set turns on the dot at (x, y), y = 0 at the top, in layer (0..7).
// Dots outside the canvas are ignored.
func (c *Canvas) Set(x, y, layer int) {
	if x < 0 || y < 0 || x >= 2*c.w || y >= 4*c.h {
		return
	}
	i := (y/4)*c.w + x/2
	c.dots[i] |= bits[x%2][y%4]
	c.layers[i] |= 1 << uint(layer&7)
}

// VLine sets the dots of column x from y0 to y1 inclusive.
func (c *Canvas) VLine(x, y0, y1, layer int) {
	if y0 > y1 {
		y0, y1 = y1, y0
	}
	for y := y0; y <= y1; y++ {
		c.Set(x, y, layer)
	}
}

// Line draws a straight line between two dots (Bresenham).
func (c *Canvas) Line(x0, y0, x1, y1, layer int) {
	dx, dy := abs(x1-x0), -abs(y1-y0)
	sx, sy := 1, 1
	if x0 > x1 {
		sx = -1
	}
	if y0 > y1 {
		sy = -1
	}
	e := dx + dy
	for {
		c.Set(x0, y0, layer)
		if x0 == x1 && y0 == y1 {
			return
		}
		e2 := 2 * e
		if e2 >= dy {
			e += dy
			x0 += sx
		}
		if e2 <= dx {
			e += dx
			y0 += sy
		}
	}
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// Text writes s at cell (col, row), over any dots; it is clipped.
func (c *Canvas) Text(col, row int, s string) {
	if row < 0 || row >= c.h {
		return
	}
	for _, r := range s {
		if col >= 0 && col < c.w {
			c.text[row*c.w+col] = r
		}
		col++
	}
}

// Cell is what one character cell shows.
type Cell struct {
	Rune   rune
	Layers uint8 // which layers set dots here (0 for text and blanks)
	Text   bool
}

// At is the cell at (col, row).
func (c *Canvas) At(col, row int) Cell {
	i := row*c.w + col
	if t := c.text[i]; t != 0 {
		return Cell{Rune: t, Text: true}
	}
	if c.dots[i] == 0 {
		return Cell{Rune: ' '}
	}
	return Cell{Rune: rune(0x2800 + int(c.dots[i])), Layers: c.layers[i]}
}

// String renders the canvas as plain text rows joined by newlines.
func (c *Canvas) String() string {
	var b strings.Builder
	for row := 0; row < c.h; row++ {
		if row > 0 {
			b.WriteByte('\n')
		}
		for col := 0; col < c.w; col++ {
			b.WriteRune(c.At(col, row).Rune)
		}
	}
	return b.String()
}
