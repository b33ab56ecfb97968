// Package pathplan turns a job — stock, features, tool and cut data — into
// a roughing toolpath, and writes that path as RS-274 G-code and as an SVG
// top view.
//
// A job is read from JSON with [ReadJob] or [LoadJob] (the format of
// chipband's design notes §7) or built in Go and checked with
// [Job.Validate]. [PlanLayered] plans the layered strategy: contour-parallel
// rings at a shallow step-down and a wide stepover, worked from the part of
// the free space farthest from the walls towards the walls — inside-out in
// closed pockets, from the air inwards on open features and outside profiles
// — with ramp or helix entries, links at depth through cut material, lifts
// where a link would touch stock, clean-up passes where a wide stepover
// leaves cusps, and an optional finishing pass. [WriteGCode] and [WriteSVG]
// write the result.
//
// Units are millimetres, mm/min and degrees. Z is measured upwards; the
// stock's top is Stock.Top (0 by convention) and cutting happens below it.
//
// Every program this package writes starts with [SafetyCaution].
package pathplan

// SafetyCaution is the caution that every G-code header, the README and the
// plan command carry (design notes §9).
const SafetyCaution = "Machining can injure. Toolpaths and feeds from chipband are starting points: " +
	"verify every program in a simulator and with an air cut above the part, " +
	"check work holding and tool stick-out, follow the machine maker's and tool " +
	"maker's limits, wear eye protection, and follow local safety regulations and " +
	"the practice of qualified machinists."
