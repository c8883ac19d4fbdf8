package native

import (
	"math"
	"strconv"
	"testing"

	"github.com/joinery-cae/joinery/geom"
)

// gridFile returns a native file holding a gently curved sheet of nx by ny
// quads: (nx+1)(ny+1) nodes with ids from 1000001, elements with ids from
// 5000001 in one part per ten rows. Coordinates have up to three decimals,
// as meshing tools commonly write them. With mixed set, the shells come
// before the nodes, every seventh shell has its own thickness and every
// eleventh is split into two triangles.
func gridFile(nx, ny int, mixed bool) []byte { return grid(nx, ny, mixed, false) }

// grid is gridFile; with full set, coordinates carry all 17 significant
// digits, as a mesh that was moved or scaled in double precision does.
func grid(nx, ny int, mixed, full bool) []byte {
	b := make([]byte, 0, 90*(nx+1)*(ny+1))
	b = append(b, "joinery-mesh 1\n# generated grid\n"...)
	for p := 0; p < (ny+9)/10; p++ {
		b = append(b, "part "...)
		b = strconv.AppendInt(b, int64(p+1), 10)
		b = append(b, " thickness=0.8 material=DC04 name=grid band\n"...)
	}
	node := func(i, j int) int64 { return 1000001 + int64(j*(nx+1)+i) }
	nodes := func(b []byte) []byte {
		for j := 0; j <= ny; j++ {
			for i := 0; i <= nx; i++ {
				x, y := float64(i)*4.75, float64(j)*5.125
				z := math.Round(1000*10*math.Sin(x/300)*math.Cos(y/200)) / 1000
				if full {
					x, y, z = x*(1+1e-9)/3, y*(1+1e-9)/3, z/3
				}
				b = append(b, "node "...)
				b = strconv.AppendInt(b, node(i, j), 10)
				b = append(b, ' ')
				b = strconv.AppendFloat(b, x, 'g', -1, 64)
				b = append(b, ' ')
				b = strconv.AppendFloat(b, y, 'g', -1, 64)
				b = append(b, ' ')
				b = strconv.AppendFloat(b, z, 'g', -1, 64)
				b = append(b, '\n')
			}
		}
		return b
	}
	shells := func(b []byte) []byte {
		id := int64(5000001)
		for j := 0; j < ny; j++ {
			for i := 0; i < nx; i++ {
				q := [4]int64{node(i, j), node(i+1, j), node(i+1, j+1), node(i, j+1)}
				corners := [][]int64{q[:]}
				if mixed && id%11 == 0 {
					corners = [][]int64{{q[0], q[1], q[2]}, {q[0], q[2], q[3]}}
				}
				for _, c := range corners {
					b = append(b, "shell "...)
					b = strconv.AppendInt(b, id, 10)
					b = append(b, ' ')
					b = strconv.AppendInt(b, int64(j/10+1), 10)
					for _, n := range c {
						b = append(b, ' ')
						b = strconv.AppendInt(b, n, 10)
					}
					if mixed && id%7 == 0 {
						b = append(b, " t=1.25"...)
					}
					b = append(b, '\n')
					id++
				}
			}
		}
		return b
	}
	if mixed {
		return nodes(shells(b))
	}
	return shells(nodes(b))
}

func benchmarkRead(b *testing.B, nx, ny int, full bool) {
	data := grid(nx, ny, false, full)
	b.SetBytes(int64(len(data)))
	var m *geom.Mesh
	cpu0 := cpuTime()
	for b.Loop() {
		var err error
		if m, err = parse(data, "grid", geom.ReadOptions{}); err != nil {
			b.Fatal(err)
		}
	}
	sec := b.Elapsed().Seconds() / float64(b.N)
	// CPU time tells the cost apart from the wait on a shared machine.
	b.ReportMetric((cpuTime()-cpu0).Seconds()*1000/float64(b.N), "cpu-ms/op")
	b.ReportMetric(float64(m.NumElems())/sec, "elems/s")
	b.ReportMetric(float64(m.Bytes())/float64(m.NumElems()), "meshB/elem")
	b.ReportMetric(float64(len(data))/float64(m.NumElems()), "fileB/elem")
}

// BenchmarkRead200k reads a 200,000-quad grid.
func BenchmarkRead200k(b *testing.B) { benchmarkRead(b, 500, 400, false) }

// BenchmarkRead200kFullPrecision reads the 200,000-quad grid with
// 17-digit coordinates, which the fast float parser hands to strconv.
func BenchmarkRead200kFullPrecision(b *testing.B) { benchmarkRead(b, 500, 400, true) }

// BenchmarkRead2M reads a 2,000,000-quad grid (about 2M nodes).
func BenchmarkRead2M(b *testing.B) {
	if testing.Short() {
		b.Skip("2M-element benchmark skipped in -short mode")
	}
	benchmarkRead(b, 2000, 1000, false)
}

// BenchmarkParseFloat compares the fast float parser with strconv on
// typical coordinate tokens.
func BenchmarkParseFloat(b *testing.B) {
	toks := [][]byte{[]byte("123.456"), []byte("-1.5e-3"), []byte("0"), []byte("2047.125"), []byte("-0.30000000000000004")}
	b.Run("fast", func(b *testing.B) {
		for b.Loop() {
			for _, t := range toks {
				parseFloat(t)
			}
		}
	})
	b.Run("strconv", func(b *testing.B) {
		for b.Loop() {
			for _, t := range toks {
				strconv.ParseFloat(string(t), 64)
			}
		}
	})
}
