//go:build !unix

package engage

import "time"

// cpuTime falls back to wall time where process CPU time is not at hand.
func cpuTime() time.Duration { return time.Duration(time.Now().UnixNano()) }
