// Package engage knows how hard a milling cutter works along any 2.5D
// toolpath. It holds a model of the material left in the stock, measures the
// radial engagement of a flat end mill at any position (engagement angle φ,
// entry and exit angles, radial width ae and axial depth ap), simulates whole
// toolpaths through the model and derives cutting data from the result: chip
// thinning, feed scheduling, Kienzle force and power and a flute-wear profile.
//
// # Material model
//
// A [Material] is a 2.5D height field on a square grid: for every cell it
// keeps the top Z of the remaining material (the stock top is usually Z = 0,
// cuts go to Z < 0, outside the stock there is no material). A plain height
// raster only knows the material boundary to a cell; engagement tests at
// small stepovers need it to a few microns. So every cell also keeps a
// cut-distance value: r − d, where d is the distance from the cell centre to
// the nearest tool-centre position that cut it (positive inside the cut), and
// for cells that still hold material the same value for the nearest deeper
// tool position that passed by without reaching it (negative). The material
// boundary at a height is the zero iso-line of that field, found by bilinear
// interpolation. Distance fields of straight tool-centre paths are linear and
// those of arcs nearly so, so the boundary comes out to well under a micron
// from 0.1–0.2 mm cells. Stock outlines and already removed regions start the
// field with their exact signed distance.
//
// Known limits of the field (each cell keeps one record per kind):
//   - Several levels: when a cut lowers a cell, its "passed by" value is
//     reset to the stock distance, so a wall of a deeper region next to it
//     (a Remove or an earlier deeper cut) is then known only to the cell at
//     heights between that deeper floor and the new top: a later shallower
//     cut that lowers cells beside the wall of a deeper pre-removed region
//     leaves that wall, below the shallower cut, at cell-size accuracy
//     (up to one cell of error in ae for a tool working along it there).
//     Keeping it exact needs the height of the passed-by record per cell
//     (4 more bytes a cell), not done.
//   - Ramps and helices: the cut distance of a cell is the one of the last
//     stretch that lowered it, which may be shorter than the distance to
//     the whole path, and a cell a helix lowers by one revolution keeps only
//     the cut distance of the lower revolution. For the levels above it the
//     field then shows material next to a wall the tool only touches (the
//     outer wall or core of a helix bore). ap therefore takes a higher level
//     only where the point is in material for any cut distance the
//     neighbouring material cells allow (the field is 1-Lipschitz), so such
//     a wall no longer reads as ap = depth below the top (it did on about
//     one steady helix sample in eight). The price is on the low side: a
//     point within a cell of two levels reads the lower one, and ap comes
//     from the next points of the arc (TestHelixSteadyAP: within the floor
//     drop over one cell diagonal).
//
// # Simulation
//
// [Simulate] walks a [geom.Toolpath] in small steps. At each sample it
// measures the engagement before removing material at the new position; the
// cut itself is stamped into the model as the exact swept area of the line
// or arc (capsule or annulus sector), lazily and only over the swept band.
// The result is a per-sample profile and a [Summary] with the figures a
// program check needs: engagement maxima and means, the share of cutting
// length inside the radial-engagement band, air cutting, plunges, rapids
// through material (always reported), wall gouges and uncut material.
// Wall and floor gouges are measured from the geometry of the path against
// the Keep shape and the target regions (exact distances from the
// tool-centre lines and arcs to their edges, through a bucket index), not
// from the grid; the grid serves material removal and engagement. A rapid
// below the top that the grid flags is reported only when the tool disk
// surely overlaps material still there: a material cell centre inside the
// disk, or a periphery point outside every disk that the cut distances of
// the cells around it prove cut (the grid alone can put a wall up to a cell
// off after cuts at several levels; TestRapidBesideWall).
//
// Units: millimetres, mm/min for feeds, rpm for spindle speed, radians for
// angles unless a name says degrees, mm³/min for material-removal rates,
// N/mm² for specific cutting force, N, N·m and kW for forces, torques and
// power.
package engage
