// Package render draws the engine's graphs as SVG text: directly-follows graphs (edge width by
// frequency, nodes and edges coloured by a counts ramp or a durations ramp), Petri nets (places
// as circles with their tokens, transitions as boxes, silent ones filled) and process trees. It
// lays them out with package layout and escapes every label, so an activity called
// <script>alert(1)</script> or "a & b" is drawn as that text.
//
// The three colour ramps are our own: counts run from a pale sage to a deep pine, durations from a
// pale sand to a deep rust, deviations from a pale lilac to a deep plum. All are sequential with lightness falling steadily, so they read the
// same for people with any kind of colour vision deficiency, and in grey print.
package render

import (
	"fmt"
	"html"
	"math"
	"strings"
	"unicode/utf8"

	"tracewright/core/layout"
)

// Ramp is a sequential colour scale between two colours.
type Ramp struct{ From, To [3]uint8 }

// Our ramps (see the package doc).
var (
	CountRamp     = Ramp{From: [3]uint8{0xe4, 0xef, 0xe9}, To: [3]uint8{0x1d, 0x4f, 0x43}}
	DurationRamp  = Ramp{From: [3]uint8{0xf8, 0xec, 0xd9}, To: [3]uint8{0x8c, 0x32, 0x12}}
	DeviationRamp = Ramp{From: [3]uint8{0xf1, 0xea, 0xf4}, To: [3]uint8{0x5b, 0x1f, 0x5e}}
)

// At returns the colour at t in [0, 1] as #rrggbb.
func (r Ramp) At(t float64) string {
	t = math.Max(0, math.Min(1, t))
	var c [3]uint8
	for i := range c {
		c[i] = uint8(math.Round(float64(r.From[i]) + t*(float64(r.To[i])-float64(r.From[i]))))
	}
	return fmt.Sprintf("#%02x%02x%02x", c[0], c[1], c[2])
}

// ink is the text colour readable on a ramp colour at t.
func ink(t float64) string {
	if t > 0.55 {
		return "#ffffff"
	}
	return "#1d2327"
}

// esc escapes text for SVG content and attribute values.
func esc(s string) string { return html.EscapeString(s) }

// textWidth estimates the width of a label at 12 px in a sans-serif face (about 7 px per
// character; measured text is not available without a browser).
func textWidth(s string) float64 { return float64(utf8.RuneCountInString(s))*7 + 20 }

// svg collects SVG elements.
type svg struct {
	b      strings.Builder
	marker string // the arrowhead's id: distinct per kind of drawing, since a page shows several
}

func (s *svg) f(format string, args ...any) { fmt.Fprintf(&s.b, format, args...) }

func (s *svg) open(kind string, w, h float64, title string) {
	s.marker = "tw-arrow-" + kind
	s.f(`<svg xmlns="http://www.w3.org/2000/svg" viewBox="-20 -20 %.1f %.1f" width="%.0f" height="%.0f" role="img" font-family="system-ui, sans-serif" font-size="12">`,
		w+40, h+40, w+40, h+40)
	s.f(`<title>%s</title>`, esc(title))
	s.f(`<defs><marker id="%s" viewBox="0 0 10 10" refX="9" refY="5" markerWidth="9" markerHeight="9" markerUnits="userSpaceOnUse" orient="auto-start-reverse"><path d="M0,0 L10,5 L0,10 z" fill="#5c666d"/></marker></defs>`, s.marker)
}

func (s *svg) path(p []layout.Point, width float64, color string, attrs string) {
	if len(p) == 0 {
		return
	}
	var d strings.Builder
	fmt.Fprintf(&d, "M%.1f,%.1f", p[0].X, p[0].Y)
	for i := 1; i+2 < len(p); i += 3 {
		fmt.Fprintf(&d, " C%.1f,%.1f %.1f,%.1f %.1f,%.1f", p[i].X, p[i].Y, p[i+1].X, p[i+1].Y, p[i+2].X, p[i+2].Y)
	}
	s.f(`<path d="%s" fill="none" stroke="%s" stroke-width="%.2f" marker-end="url(#%s)"%s/>`, d.String(), color, width, s.marker, attrs)
}

func (s *svg) String() string { return s.b.String() + "</svg>" }
