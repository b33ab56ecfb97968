package engage

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"github.com/chipband/chipband/geom"
)

// Defaults of the material model.
const (
	// DefaultCellSize is the grid spacing of a Material in mm.
	DefaultCellSize = 0.2
	// DefaultMaxCells bounds the number of cells of a Material (16 bytes
	// each, so the default allows about 480 MB).
	DefaultMaxCells = 30_000_000
	// bytesPerCell is what one cell costs: height, cut field, wall field and
	// stock field, float32 each.
	bytesPerCell = 16
	// epsZ is the height tolerance: material thinner than this above the
	// tool bottom does not count.
	epsZ = 1e-3
	// onOutline is the distance within which a cell centre counts as on a
	// region's outline, mm: far above rounding, far below any machining
	// tolerance.
	onOutline = 1e-6
)

// ErrCellBudget is wrapped by the error NewMaterial returns when the grid
// would exceed the cell budget.
var ErrCellBudget = errors.New("material grid exceeds the cell budget")

// ErrSampleBudget is wrapped by the error Simulate returns when the path
// would need more samples than SimOptions.MaxSamples allows.
var ErrSampleBudget = errors.New("sample budget exceeded")

// MaterialOptions sets the resolution and memory bound of a Material. The
// zero value selects the defaults.
type MaterialOptions struct {
	CellSize float64 // grid spacing in mm (default DefaultCellSize)
	MaxCells int     // most cells allowed (default DefaultMaxCells)
}

// Material is the material left in a block of stock: a 2.5D height field
// with a sub-cell distance field for the boundary (see the package
// documentation). It is not safe for concurrent use.
type Material struct {
	x0, y0 float64 // lower-left corner of the grid
	cell   float64
	inv    float64 // 1/cell
	nx, ny int
	top    float64 // highest material Z
	band   float32 // width of the exact-distance band around boundaries
	c      []cell
	// circle holds (sin ψ, cos ψ) on the engagement grid of the full circle.
	circle [2 * engageSamples][2]float64
}

// NewMaterial returns the material of a stock of outline stock (regions with
// holes) and top height top, not yet cut.
func NewMaterial(stock geom.Shape, top float64, opt MaterialOptions) (*Material, error) {
	if opt.CellSize == 0 {
		opt.CellSize = DefaultCellSize
	}
	if opt.MaxCells == 0 {
		opt.MaxCells = DefaultMaxCells
	}
	if !finite(opt.CellSize) || opt.CellSize <= 0 {
		return nil, fmt.Errorf("material cell size must be positive, got %v", opt.CellSize)
	}
	if opt.MaxCells < 0 {
		return nil, fmt.Errorf("material cell budget must be positive, got %d", opt.MaxCells)
	}
	if !finite(top) {
		return nil, fmt.Errorf("stock top must be a finite number, got %v", top)
	}
	if err := checkShape(stock, "stock"); err != nil {
		return nil, err
	}
	stock = stock.Normalized()
	bb := stock.Bounds()
	c := opt.CellSize
	pad := 4 * c
	w := bb.Width() + 2*pad
	hgt := bb.Height() + 2*pad
	nx := int(math.Ceil(w / c))
	ny := int(math.Ceil(hgt / c))
	cells := float64(nx) * float64(ny)
	if cells > float64(opt.MaxCells) {
		suggest := c * math.Sqrt(cells/float64(opt.MaxCells)) * 1.05
		return nil, fmt.Errorf("%w: %d × %d cells of %g mm for a %.1f × %.1f mm stock is more than %d; use a coarser resolution (cell size ≥ %.3g mm) or raise the budget",
			ErrCellBudget, nx, ny, c, bb.Width(), bb.Height(), opt.MaxCells, suggest)
	}
	n := nx * ny
	m := &Material{
		x0: bb.Min.X - pad, y0: bb.Min.Y - pad,
		cell: c, inv: 1 / c, nx: nx, ny: ny, top: top,
		band: float32(5 * c),
		c:    make([]cell, n),
	}
	for k := range m.circle {
		sn, cs := math.Sincos(float64(k) * math.Pi / engageSamples)
		m.circle[k] = [2]float64{sn, cs}
	}
	win := m.fullWindow()
	sd := m.signedDistance(stock, win, float64(m.band))
	negInf := float32(math.Inf(-1))
	for k, d := range sd {
		// d is positive inside the stock.
		m.c[k].s = -d
		m.c[k].b = -d
		if d > 0 {
			m.c[k].h = float32(top)
			m.c[k].a = m.band
		} else {
			m.c[k].h = negInf
			m.c[k].a = -d
		}
	}
	return m, nil
}

// checkShape validates the coordinates and area of a shape.
func checkShape(s geom.Shape, what string) error {
	if len(s) == 0 {
		return fmt.Errorf("%s shape is empty", what)
	}
	for i, g := range s {
		if len(g.Outer) < 3 {
			return fmt.Errorf("%s region %d: outer ring has %d points, need at least 3", what, i, len(g.Outer))
		}
		for ri, r := range g.Rings() {
			for pi, p := range r {
				if !finite(p.X, p.Y) {
					return fmt.Errorf("%s region %d ring %d point %d: coordinates must be finite, got (%v, %v)", what, i, ri, pi, p.X, p.Y)
				}
			}
		}
	}
	if !(s.Area() > 0) {
		return fmt.Errorf("%s shape has no area", what)
	}
	return nil
}

// CellSize returns the grid spacing in mm.
func (m *Material) CellSize() float64 { return m.cell }

// Top returns the highest Z of the stock.
func (m *Material) Top() float64 { return m.top }

// Size returns the number of cells along X and Y.
func (m *Material) Size() (nx, ny int) { return m.nx, m.ny }

// Bytes returns the memory held by the grids of m.
func (m *Material) Bytes() int { return m.nx * m.ny * bytesPerCell }

// Bounds returns the area covered by the grid.
func (m *Material) Bounds() geom.Rect {
	return geom.Rect{Min: geom.Pt(m.x0, m.y0), Max: geom.Pt(m.x0+float64(m.nx)*m.cell, m.y0+float64(m.ny)*m.cell)}
}

// Clone returns an independent copy of m.
func (m *Material) Clone() *Material {
	c := *m
	c.c = append([]cell(nil), m.c...)
	return &c
}

// HeightAt returns the top Z of the material in the cell holding p, and
// false when there is no material there (outside the stock or the grid).
func (m *Material) HeightAt(p geom.Point) (float64, bool) {
	i := int(math.Floor((p.X - m.x0) * m.inv))
	j := int(math.Floor((p.Y - m.y0) * m.inv))
	if i < 0 || j < 0 || i >= m.nx || j >= m.ny {
		return 0, false
	}
	h := m.c[j*m.nx+i].h
	if math.IsInf(float64(h), -1) {
		return 0, false
	}
	return float64(h), true
}

// Remove takes away the material inside region down to floor, as a feature
// or an earlier cut that is already machined. Sub-cell boundaries come from
// the exact distance to the region.
func (m *Material) Remove(region geom.Shape, floor float64) error {
	if !finite(floor) {
		return fmt.Errorf("remove: floor must be a finite number, got %v", floor)
	}
	if err := checkShape(region, "removed region"); err != nil {
		return fmt.Errorf("remove: %w", err)
	}
	region = region.Normalized()
	win, ok := m.window(region.Bounds(), float64(m.band)+m.cell)
	if !ok {
		return nil
	}
	sd := m.signedDistance(region, win, float64(m.band))
	fl := float32(floor)
	for jj := 0; jj < win.ny; jj++ {
		row := (win.j0+jj)*m.nx + win.i0
		for ii := 0; ii < win.nx; ii++ {
			k := row + ii
			d := sd[jj*win.nx+ii]
			h := m.c[k].h
			if d > 0 {
				switch {
				case h > fl+epsZ:
					m.c[k].h = fl
					m.c[k].a = d
					m.c[k].b = m.c[k].s
				case h >= fl-epsZ:
					m.c[k].a = max(m.c[k].a, d)
				}
			} else if fl < h-epsZ {
				m.c[k].b = max(m.c[k].b, d)
			}
		}
	}
	return nil
}

// cell is one grid cell of a Material. The four values sit together so
// that a bilinear lookup touches two cache lines.
type cell struct {
	h float32 // top Z of the material (−Inf: none)
	a float32 // r − d of the cut that set h (positive: removed)
	b float32 // r − d of the nearest deeper pass that did not reach (negative)
	s float32 // signed distance outside the stock outline (positive outside)
}

// window is a rectangle of cells.
type window struct{ i0, j0, nx, ny int }

func (m *Material) fullWindow() window { return window{0, 0, m.nx, m.ny} }

// window returns the cells of r grown by pad, clipped to the grid.
func (m *Material) window(r geom.Rect, pad float64) (window, bool) {
	i0 := int(math.Floor((r.Min.X - pad - m.x0) * m.inv))
	j0 := int(math.Floor((r.Min.Y - pad - m.y0) * m.inv))
	i1 := int(math.Ceil((r.Max.X + pad - m.x0) * m.inv))
	j1 := int(math.Ceil((r.Max.Y + pad - m.y0) * m.inv))
	i0, j0 = max(i0, 0), max(j0, 0)
	i1, j1 = min(i1, m.nx), min(j1, m.ny)
	if i1 <= i0 || j1 <= j0 {
		return window{}, false
	}
	return window{i0, j0, i1 - i0, j1 - j0}, true
}

// cx and cy return the centre of cell column i and row j.
func (m *Material) cx(i int) float64 { return m.x0 + (float64(i)+0.5)*m.cell }
func (m *Material) cy(j int) float64 { return m.y0 + (float64(j)+0.5)*m.cell }

// inside rasterises the non-zero winding membership of a normalised shape
// over a window of cells (cell centres).
func (m *Material) inside(s geom.Shape, win window) []bool {
	out := make([]bool, win.nx*win.ny)
	type xing struct {
		x float64
		d int
	}
	var xs []xing
	rings := s.Rings()
	for jj := 0; jj < win.ny; jj++ {
		y := m.cy(win.j0 + jj)
		xs = xs[:0]
		for _, r := range rings {
			n := len(r)
			for i := 0; i < n; i++ {
				p, q := r[i], r[(i+1)%n]
				var d int
				switch {
				case p.Y <= y && q.Y > y:
					d = 1
				case q.Y <= y && p.Y > y:
					d = -1
				default:
					continue
				}
				x := p.X + (y-p.Y)/(q.Y-p.Y)*(q.X-p.X)
				xs = append(xs, xing{x, d})
			}
		}
		if len(xs) == 0 {
			continue
		}
		sort.Slice(xs, func(a, b int) bool { return xs[a].x < xs[b].x })
		// Winding at x is minus the sum of the crossings left of x.
		w := 0
		k := 0
		for ii := 0; ii < win.nx; ii++ {
			x := m.cx(win.i0 + ii)
			for k < len(xs) && xs[k].x <= x {
				w += xs[k].d
				k++
			}
			if w != 0 {
				out[jj*win.nx+ii] = true
			}
		}
	}
	return out
}

// signedDistance returns, over a window, the signed distance from each cell
// centre to the boundary of s (positive inside), exact within band of the
// boundary and clamped to ±band beyond.
func (m *Material) signedDistance(s geom.Shape, win window, band float64) []float32 {
	in := m.inside(s, win)
	d := make([]float32, len(in))
	for k := range d {
		d[k] = float32(band)
	}
	for _, r := range s.Rings() {
		n := len(r)
		for i := 0; i < n; i++ {
			m.edgeDistance(r[i], r[(i+1)%n], win, band, d)
		}
	}
	for k, v := range in {
		if !v {
			d[k] = -d[k]
		}
	}
	return d
}

// edgeDistance lowers d to the distance from each cell centre of win to the
// segment pq, for cells within band of it.
func (m *Material) edgeDistance(p, q geom.Point, win window, band float64, d []float32) {
	bb := geom.EmptyRect().Extend(p).Extend(q)
	w, ok := m.window(bb, band+m.cell)
	if !ok {
		return
	}
	// Clip to win.
	i0, j0 := max(w.i0, win.i0), max(w.j0, win.j0)
	i1, j1 := min(w.i0+w.nx, win.i0+win.nx), min(w.j0+w.ny, win.j0+win.ny)
	for j := j0; j < j1; j++ {
		y := m.cy(j)
		for i := i0; i < i1; i++ {
			dist := geom.SegmentDistance(geom.Pt(m.cx(i), y), p, q)
			if dist < band {
				k := (j-win.j0)*win.nx + (i - win.i0)
				if f := float32(dist); f < d[k] {
					d[k] = f
				}
			}
		}
	}
}

// value returns the boundary field of cell k at tool-bottom height zt
// (already raised by epsZ): positive where there is no material.
func (m *Material) value(k int, zt float32) float32 {
	if m.c[k].h <= zt {
		return m.c[k].a
	}
	return m.c[k].b
}

// field interpolates the boundary field at (x, y) for tool-bottom height zt
// and returns the highest and lowest material tops among the four cells
// around it (−Inf when none).
func (m *Material) field(x, y float64, zt float32) (v, hmax, hlo float32) {
	gx := (x-m.x0)*m.inv - 0.5
	gy := (y-m.y0)*m.inv - 0.5
	if !(gx >= 0 && gy >= 0 && gx < float64(m.nx-1) && gy < float64(m.ny-1)) {
		return m.band, float32(math.Inf(-1)), float32(math.Inf(-1))
	}
	i, j := int(gx), int(gy)
	fx, fy := float32(gx-float64(i)), float32(gy-float64(j))
	k := j*m.nx + i
	r0 := m.c[k : k+2 : k+2]
	r1 := m.c[k+m.nx : k+m.nx+2 : k+m.nx+2]
	c00, c10, c01, c11 := &r0[0], &r0[1], &r1[0], &r1[1]
	var v00, v10, v01, v11 float32
	inf := float32(math.Inf(1))
	hmax, hlo = float32(math.Inf(-1)), inf
	if c00.h <= zt {
		v00 = c00.a
	} else {
		v00 = c00.b
		hmax, hlo = c00.h, c00.h
	}
	if c10.h <= zt {
		v10 = c10.a
	} else {
		v10 = c10.b
		hmax, hlo = max(hmax, c10.h), min(hlo, c10.h)
	}
	if c01.h <= zt {
		v01 = c01.a
	} else {
		v01 = c01.b
		hmax, hlo = max(hmax, c01.h), min(hlo, c01.h)
	}
	if c11.h <= zt {
		v11 = c11.a
	} else {
		v11 = c11.b
		hmax, hlo = max(hmax, c11.h), min(hlo, c11.h)
	}
	if hlo == inf {
		hlo = hmax
	}
	v0 := v00 + (v10-v00)*fx
	v1 := v01 + (v11-v01)*fx
	return v0 + (v1-v0)*fy, hmax, hlo
}

// topAt returns the top of the material at (x, y), a point known to be in
// material at tool height zt, when the cells around it hold material of
// different heights between lo and hi: the highest level at which the
// point itself is still surely inside material by the sub-cell field (see
// sureField).
func (m *Material) topAt(x, y float64, zt, lo, hi, tol float32) float32 {
	gx := (x-m.x0)*m.inv - 0.5
	gy := (y-m.y0)*m.inv - 0.5
	if !(gx >= 0 && gy >= 0 && gx < float64(m.nx-1) && gy < float64(m.ny-1)) {
		return hi
	}
	k := int(gy)*m.nx + int(gx)
	hs := [4]float32{m.c[k].h, m.c[k+1].h, m.c[k+m.nx].h, m.c[k+m.nx+1].h}
	h := hi
	for {
		v := m.sureField(gx, gy, h-2*epsZ)
		if v+tol < 0 || h <= lo {
			return h
		}
		// Next lower height among the cells, still above the tool.
		next := lo
		for _, c := range hs {
			if c < h-epsZ && c > zt && c > next {
				next = c
			}
		}
		h = next
	}
}

// sureField interpolates the boundary field at level zt (positive where
// there is no material) at grid coordinates (gx, gy) (cell units from the
// first cell centre, inside the grid), taking each cut cell as cut as far
// as its material neighbours allow.
//
// A cell lowered below zt keeps in a the cut distance of the cut that
// lowered it last, which is only a lower bound of its distance into the
// region cut below zt when an earlier, higher cut reached farther (a helix
// revolution below the one before it, a slot below a wider pocket): the
// field then puts material at zt where there is none, by up to a cell.
// The field r − d is 1-Lipschitz (d a distance), and a material cell y
// keeps in b that value for the passes below it, so a cut cell x is inside
// the cut by at most b(y) + |x − y| (elementary geometry: the triangle
// inequality). sureField takes for each cut cell the larger of a and the
// least such bound over the material cells of the 2 × 2 block, so that a
// point it puts in material is in material for any cut history the cells
// allow. topAt uses it to take ap only from material that is surely there.
func (m *Material) sureField(gx, gy float64, zt float32) float32 {
	i, j := int(gx), int(gy)
	fx, fy := float32(gx-float64(i)), float32(gy-float64(j))
	k := j*m.nx + i
	cs := [4]*cell{&m.c[k], &m.c[k+1], &m.c[k+m.nx], &m.c[k+m.nx+1]}
	var v [4]float32
	var solid [4]bool
	for q, c := range cs {
		if c.h > zt {
			v[q], solid[q] = c.b, true
		} else {
			v[q] = c.a
		}
	}
	side, diag := float32(m.cell), float32(m.cell*math.Sqrt2)
	var w [4]float32
	for q := range cs {
		w[q] = v[q]
		if solid[q] {
			continue
		}
		ub := float32(math.Inf(1))
		for y := range cs {
			if !solid[y] {
				continue
			}
			dist := side
			if q^y == 3 { // 0–3 and 1–2 are the diagonals of the block
				dist = diag
			}
			ub = min(ub, v[y]+dist)
		}
		if !math.IsInf(float64(ub), 1) {
			w[q] = max(v[q], ub)
		}
	}
	v0 := w[0] + (w[1]-w[0])*fx
	v1 := w[2] + (w[3]-w[2])*fx
	return v0 + (v1-v0)*fy
}

// Residual is what is left of a target region after cutting.
type Residual struct {
	UncutArea  float64 // mm², cells whose material top is above the floor by more than the tolerance
	MaxAbove   float64 // mm, the most material left above the floor
	FloorGouge float64 // mm, the deepest cut below the floor (0 if none)
	Area       float64 // mm², cells of the region inside the grid
}

// Residual measures the material left inside region above floor (more than
// tol) and any cut below floor (more than tol). Cells count by their centre;
// a centre within 1e-6 mm of the region's outline is on the boundary of both
// the region and any cut sized exactly to it, so it counts neither as uncut
// nor as cut below the floor.
//
// Resolution: the areas are those of the cells whose centres lie in the
// uncut set, so for a set bounded by curves of total length P the figure is
// within about c·P + 4c² per closed curve of the exact area (c the cell
// size: every cell the boundary crosses may go either way). Material thinner
// than half a cell between a cut and the outline may be missed or counted
// as a whole cell row.
func (m *Material) Residual(region geom.Shape, floor, tol float64) (Residual, error) {
	if !finite(floor, tol) || tol < 0 {
		return Residual{}, fmt.Errorf("residual: floor and tolerance must be finite and the tolerance not negative, got %v and %v", floor, tol)
	}
	if err := checkShape(region, "target region"); err != nil {
		return Residual{}, fmt.Errorf("residual: %w", err)
	}
	region = region.Normalized()
	var res Residual
	win, ok := m.window(region.Bounds(), 0)
	if !ok {
		return res, nil
	}
	sd := m.signedDistance(region, win, m.cell)
	ca := m.cell * m.cell
	lowest := math.Inf(1)
	for jj := 0; jj < win.ny; jj++ {
		for ii := 0; ii < win.nx; ii++ {
			d := sd[jj*win.nx+ii]
			if d <= 0 {
				continue
			}
			k := (win.j0+jj)*m.nx + win.i0 + ii
			h := float64(m.c[k].h)
			if math.IsInf(h, -1) {
				continue
			}
			res.Area += ca
			if d < onOutline {
				continue
			}
			if h > floor+tol {
				res.UncutArea += ca
				res.MaxAbove = math.Max(res.MaxAbove, h-floor)
			}
			lowest = math.Min(lowest, h)
		}
	}
	if lowest < floor-tol {
		res.FloorGouge = floor - lowest
	}
	return res, nil
}

// A Patch is a copy of the cells of a Material over a rectangle, which
// Restore puts back: an undo for trial cuts that stay inside it, cheaper
// than a Clone of the whole grid.
type Patch struct {
	win   window
	cells []cell
}

// Save returns the cells of m over r grown by pad, mm. A cut changes the
// cells within the tool radius of its path and within the exact-distance
// band beyond, so a Patch of the path's bounds grown by the radius plus
// BandWidth holds all it changes.
func (m *Material) Save(r geom.Rect, pad float64) Patch {
	win, ok := m.window(r, pad)
	if !ok {
		return Patch{}
	}
	p := Patch{win: win, cells: make([]cell, 0, win.nx*win.ny)}
	for j := win.j0; j < win.j0+win.ny; j++ {
		row := j*m.nx + win.i0
		p.cells = append(p.cells, m.c[row:row+win.nx]...)
	}
	return p
}

// SaveBytes returns the memory a Save of r grown by pad would hold.
func (m *Material) SaveBytes(r geom.Rect, pad float64) int {
	win, ok := m.window(r, pad)
	if !ok {
		return 0
	}
	return win.nx * win.ny * bytesPerCell
}

// Bytes returns the memory p holds.
func (p Patch) Bytes() int { return len(p.cells) * bytesPerCell }

// Restore puts the cells of p back into m, the Material (or a clone of the
// Material) p was saved from.
func (m *Material) Restore(p Patch) {
	for j := 0; j < p.win.ny; j++ {
		row := (p.win.j0+j)*m.nx + p.win.i0
		copy(m.c[row:row+p.win.nx], p.cells[j*p.win.nx:(j+1)*p.win.nx])
	}
}

// BandWidth returns the width, mm, of the exact-distance band the
// material keeps around its boundaries (see Save).
func (m *Material) BandWidth() float64 { return float64(m.band) }
