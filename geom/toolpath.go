package geom

import "math"

// Point3 is a position in space, in millimetres. Z = 0 is the top of the
// stock; cutting happens at negative Z.
type Point3 struct {
	X, Y, Z float64
}

// XY returns the projection of p on the XY plane.
func (p Point3) XY() Point { return Point{p.X, p.Y} }

// MoveKind tells what a move is for. Rapids are positioning moves at the
// machine's rapid rate (G0); every other kind is a feed move.
type MoveKind uint8

// The kinds of move in a Toolpath.
const (
	Rapid  MoveKind = iota // positioning at rapid rate, never through material
	Feed                   // cutting move of a roughing pass
	Entry                  // ramp, helix or plunge that takes the tool down into material
	Link                   // feed move between passes at depth, through cut material
	Lift                   // feed move up out of the cut (retract at feed)
	Finish                 // finishing pass along walls and floor
)

// String returns the lower-case name of k.
func (k MoveKind) String() string {
	switch k {
	case Rapid:
		return "rapid"
	case Feed:
		return "feed"
	case Entry:
		return "entry"
	case Link:
		return "link"
	case Lift:
		return "lift"
	case Finish:
		return "finish"
	}
	return "unknown"
}

// Move is one straight or circular step of a toolpath from the end of the
// previous move to To. An arc turns about Center in the XY plane (clockwise
// when CW is set) and may change Z linearly (a helix); an arc whose end equals
// its start is a full turn.
type Move struct {
	Kind   MoveKind
	To     Point3
	Arc    bool
	Center Point   // arc centre, absolute XY; used when Arc is set
	CW     bool    // clockwise arc (G2) when set, counter-clockwise (G3) otherwise
	Feed   float64 // mm/min; ignored for rapids
}

// Operation names a run of moves of a toolpath, typically one feature.
type Operation struct {
	Name  string
	First int // index in Toolpath.Moves of the operation's first move
}

// Toolpath is a sequence of moves that starts at Start.
type Toolpath struct {
	Start Point3
	Moves []Move
	Ops   []Operation
}

// Length returns the total length of the path in space.
func (t *Toolpath) Length() float64 {
	var l float64
	from := t.Start
	for _, m := range t.Moves {
		l += MoveLength(from, m)
		from = m.To
	}
	return l
}

// MoveLength returns the length in space of m starting from from.
func MoveLength(from Point3, m Move) float64 {
	dz := m.To.Z - from.Z
	if !m.Arc {
		return math.Sqrt((m.To.X-from.X)*(m.To.X-from.X) + (m.To.Y-from.Y)*(m.To.Y-from.Y) + dz*dz)
	}
	r := from.XY().Dist(m.Center)
	sweep := ArcSweep(from.XY(), m.To.XY(), m.Center, m.CW)
	return math.Hypot(r*sweep, dz)
}

// ArcSweep returns the unsigned angle in radians swept by an arc from a to b
// about c, clockwise when cw is set. Equal ends give a full turn (2π).
func ArcSweep(a, b, c Point, cw bool) float64 {
	a0 := math.Atan2(a.Y-c.Y, a.X-c.X)
	a1 := math.Atan2(b.Y-c.Y, b.X-c.X)
	d := a1 - a0
	if cw {
		d = -d
	}
	for d <= 1e-12 {
		d += 2 * math.Pi
	}
	for d > 2*math.Pi+1e-12 {
		d -= 2 * math.Pi
	}
	return d
}
