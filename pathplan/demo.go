package pathplan

import (
	_ "embed"
	"fmt"
	"strings"
)

// demoJSON is the built-in demo job: an invented fixture plate.
//
//go:embed demo_job.json
var demoJSON string

// DemoJobJSON returns the job file of the built-in demo part, an invented
// fixture plate of 160 × 100 mm: a 14 mm deep step open on three sides, a
// closed 8 mm pocket around a round boss, and a shallow comb-shaped pocket
// with fingers 1.5 tool diameters wide. It carries a small router with weak
// acceleration as its machine.
func DemoJobJSON() []byte { return []byte(demoJSON) }

// DemoJob returns the built-in demo job (see DemoJobJSON), parsed.
func DemoJob() *Job {
	j, err := ReadJob(strings.NewReader(demoJSON))
	if err != nil {
		// The file is part of the package and tested; this cannot happen
		// in a released build.
		panic(fmt.Sprintf("pathplan: built-in demo job: %v", err))
	}
	return j
}
