package timing

import (
	"context"
	"errors"
	"io"
)

// checkEvery is how many blocks pass between checks of the context.
const checkEvery = 4096

// EstimateProgram reads the G-code program in r as a stream and predicts
// its cycle time on machine m. Memory stays bounded by the look-ahead
// window whatever the program's length. Errors in the program are
// *LineError values naming the line.
func EstimateProgram(ctx context.Context, r io.Reader, m Machine, opt Options) (Report, error) {
	p, err := NewPlanner(m, opt)
	if err != nil {
		return Report{}, err
	}
	rd := NewReader(r)
	for n := 0; ; n++ {
		if n%checkEvery == 0 {
			if err := ctx.Err(); err != nil {
				return Report{}, err
			}
		}
		b, err := rd.Next()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return Report{}, err
		}
		if err := p.Add(b); err != nil {
			return Report{}, err
		}
	}
	return p.Finish(), nil
}

// Estimate predicts the time of a path held in memory, for paths that never
// become G-code text. Blocks must follow one another (each move's From is
// where the tool is); build them with Rapid, Line, Arc and Dwell.
func Estimate(ctx context.Context, blocks []Block, m Machine, opt Options) (Report, error) {
	p, err := NewPlanner(m, opt)
	if err != nil {
		return Report{}, err
	}
	for i, b := range blocks {
		if i%checkEvery == 0 {
			if err := ctx.Err(); err != nil {
				return Report{}, err
			}
		}
		if err := p.Add(b); err != nil {
			return Report{}, err
		}
	}
	return p.Finish(), nil
}
