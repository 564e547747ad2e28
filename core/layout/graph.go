package layout

// Graph is what to draw: n nodes with their sizes (width and height in the final drawing's units)
// and weighted directed edges.
type Graph struct {
	Width, Height []float64
	Edges         []Edge
}

// Edge joins two nodes; a heavier edge is kept shorter and straighter.
type Edge struct {
	From, To int
	Weight   int
}

// Direction is the flow of the drawing.
type Direction uint8

// Top to bottom or left to right.
const (
	TopDown Direction = iota
	LeftRight
)

// Options steer the layout.
type Options struct {
	Direction Direction
	NodeSep   float64 // space between neighbours in a rank (default 24)
	RankSep   float64 // space between ranks (default 48)
	// Previous, when set, is the layout of an earlier version of the graph whose nodes are
	// matched by Keys: the order of nodes that stay seeds the new order.
	Previous *Result
	Keys     []string
	Sweeps   int // median sweeps (default 24)
}

// Point is a position in the drawing.
type Point struct{ X, Y float64 }

// Result is a drawing: node centres, and for each edge the control points of a piecewise cubic
// Bézier curve (P0, then three points per segment) from its source to its target.
type Result struct {
	X, Y      []float64
	Rank      []int
	Paths     [][]Point
	Width     float64
	Height    float64
	Crossings int
	Reversed  int // edges turned around to break cycles
	Keys      []string
	order     map[string]float64 // position of each key within its rank, for stability
}

func (o *Options) defaults() {
	if o.NodeSep <= 0 {
		o.NodeSep = 24
	}
	if o.RankSep <= 0 {
		o.RankSep = 48
	}
	if o.Sweeps <= 0 {
		o.Sweeps = 24
	}
}
