// Package timing predicts the cycle time of a milling program on a given
// machine. It reads RS-274 G-code as a stream, turns every motion block into
// a segment and plans speeds with a bounded look-ahead window, so memory does
// not grow with the length of the program.
//
// Two speed models are available:
//
//   - [ModelR1] is the reference model of chipband's design notes: per-axis
//     feed and rapid caps, a per-segment acceleration, a junction speed from
//     the machine's corner tolerance, stops at every change between rapid
//     and feed motion, at dwells and at program stops, forward and backward
//     passes and a trapezoid or triangle speed profile per segment.
//   - [ModelJerk] uses the same junction speeds but jerk-limited (S-curve)
//     acceleration phases inside every segment, in the manner of Erkorkmaz
//     and Altintas (2001).
//
// Programs mark operations with a comment of the form "(op: NAME)" (see
// [OpComment]); the report sums time per operation.
//
// Units inside the package are millimetres and seconds; feeds and rapid
// rates are given in mm/min as on the machine's panel.
//
// The package imports nothing from the rest of chipband so that other
// programs can time any G-code with it.
package timing
