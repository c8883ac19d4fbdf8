//go:build !unix

package native

import "time"

// cpuTime returns 0 where the process CPU time is not available.
func cpuTime() time.Duration { return 0 }
