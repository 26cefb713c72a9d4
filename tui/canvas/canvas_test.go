package canvas

import "testing"

func TestDotsToBraille(t *testing.T) {
	c := New(2, 1)
	c.Set(0, 0, 0) // dot 1
	c.Set(1, 3, 0) // dot 8
	c.Set(2, 1, 1) // second cell dot 2
	if got, want := c.String(), string([]rune{0x2881, 0x2802}); got != want {
		t.Errorf("got %q want %q", got, want)
	}
	if l := c.At(1, 0).Layers; l != 2 {
		t.Errorf("layers %b", l)
	}
}

func TestLineAndClip(t *testing.T) {
	c := New(3, 2)
	c.Line(0, 0, 5, 7, 0)
	c.Set(-1, 0, 0)
	c.Set(6, 0, 0)
	c.Text(2, 1, "ab")
	want := "⠱⡀ \n ⠈a" // dots (0,0) (1,1) (1,2) (2,3) (3,4), then text over cell 2
	if got := c.String(); got != want {
		t.Errorf("got\n%s\nwant\n%s", got, want)
	}
}

func TestResizeClears(t *testing.T) {
	c := New(4, 4)
	c.Set(1, 1, 0)
	c.Resize(2, 2)
	if c.String() != "  \n  " {
		t.Errorf("%q", c.String())
	}
}
