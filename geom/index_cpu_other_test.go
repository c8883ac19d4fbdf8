//go:build !linux

package geom

import "testing"

// cpuMetric reports nothing outside Linux.
func cpuMetric(b *testing.B) func() { return func() {} }
