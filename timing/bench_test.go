package timing

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"math/rand/v2"
	"runtime"
	"testing"
)

// synthProgram is an io.Reader that produces an invented program of n
// lines on the fly: a header, then a fixed pattern of incremental (G91)
// feed lines, arcs and rapid hops repeated until n lines are out. Nothing
// but the pattern is stored.
type synthProgram struct {
	pattern []byte
	lines   int // lines still to produce
	off     int
	header  []byte
}

func newSynthProgram(n int) *synthProgram {
	rng := rand.New(rand.NewPCG(7, 11))
	var p []byte
	const k = 1000
	for i := 0; i < k; i++ {
		switch {
		case i == 0:
			p = append(p, "(op: synthetic pocket)\n"...)
		case i%250 == 1:
			p = append(p, "G0 Z5\n"...)
		case i%250 == 2:
			p = append(p, "G0 X3.5 Y-2.25\n"...)
		case i%250 == 3:
			p = append(p, "G1 Z-5 F600\n"...)
		case i%250 == 4:
			p = append(p, "F2400\n"...)
		case i%25 == 0:
			p = fmt.Appendf(p, "G2 X%.3f Y0 I%.3f J0\n", 2.0, 1.0)
		case i%25 == 1:
			p = fmt.Appendf(p, "G3 X%.3f Y%.3f R%.3f\n", 1.5, 1.5, 1.5)
		default:
			x := float64(rng.IntN(20000)-10000) / 1000
			y := float64(rng.IntN(20000)-10000) / 1000
			p = fmt.Appendf(p, "G1 X%.3f Y%.3f\n", x, y)
		}
	}
	return &synthProgram{pattern: p, lines: n - 3, header: []byte("G21 G17 G91\nG1 F2400\nG1 X1\n")}
}

func (s *synthProgram) Read(b []byte) (int, error) {
	n := 0
	if len(s.header) > 0 {
		n = copy(b, s.header)
		s.header = s.header[n:]
		return n, nil
	}
	for n < len(b) && s.lines > 0 {
		// copy up to the end of the pattern or of b, then cut back to the
		// lines still owed
		end := min(len(s.pattern), s.off+len(b)-n)
		chunk := s.pattern[s.off:end]
		if c := bytes.Count(chunk, []byte{'\n'}); c >= s.lines {
			k := 0
			for j, ch := range chunk {
				if ch == '\n' {
					k++
					if k == s.lines {
						chunk = chunk[:j+1]
						break
					}
				}
			}
			s.lines = 0
		} else {
			s.lines -= c
		}
		n += copy(b[n:], chunk)
		s.off += len(chunk)
		if s.off == len(s.pattern) {
			s.off = 0
		}
	}
	if n == 0 {
		return 0, io.EOF
	}
	return n, nil
}

func TestSynthProgramReads(t *testing.T) {
	// the benchmark's generator yields a valid program of the asked length
	r := NewReader(newSynthProgram(5000))
	n := 0
	for {
		_, err := r.Next()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
		n++
	}
	if r.Line() != 5000 || n < 4900 {
		t.Errorf("read %d lines and %d blocks", r.Line(), n)
	}
}

// BenchmarkEstimateProgram parses and plans a synthetic 1,000,000-line
// program generated on the fly, reporting blocks per second and the peak
// heap seen while planning.
func BenchmarkEstimateProgram(b *testing.B) {
	const lines = 1_000_000
	m := testMachine()
	for _, model := range []Model{ModelR1, ModelJerk} {
		b.Run(model.String(), func(b *testing.B) {
			m.Jerk = Axes{20000, 20000, 20000}
			var ms runtime.MemStats
			runtime.GC()
			runtime.ReadMemStats(&ms)
			base := ms.HeapAlloc
			var peak uint64
			var blocks int64
			b.ResetTimer()
			for range b.N {
				n := 0
				opt := Options{Model: model, OnBlock: func(BlockTime) {
					n++
					if n%200_000 == 0 {
						runtime.ReadMemStats(&ms)
						peak = max(peak, ms.HeapAlloc)
					}
				}}
				rep, err := EstimateProgram(context.Background(), newSynthProgram(lines), m, opt)
				if err != nil {
					b.Fatal(err)
				}
				blocks += rep.Blocks
			}
			b.ReportMetric(float64(blocks)/b.Elapsed().Seconds(), "blocks/s")
			if peak > base {
				b.ReportMetric(float64(peak-base)/(1<<20), "peak-heap-MB")
			}
		})
	}
}
