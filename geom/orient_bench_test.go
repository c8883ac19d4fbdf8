package geom

import "testing"

// BenchmarkOrientNormals orients a 2,000,000-quad grid (one part).
func BenchmarkOrientNormals(b *testing.B) {
	if testing.Short() {
		b.Skip("heavy")
	}
	m := quadGrid(1414, 1414, 5, nil)
	adj := NodeElements(m)
	b.ResetTimer()
	for b.Loop() {
		OrientNormals(m, adj)
	}
}
