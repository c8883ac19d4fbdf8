package native

import (
	"fmt"
	"io"
	"math"
	"runtime"
	"strconv"
	"strings"
	"sync"

	"github.com/joinery-cae/joinery/geom"
)

// nativeBlock is the number of records formatted as one piece by one
// goroutine.
const nativeBlock = 16384

// Write writes m in Joinery's native mesh format (version 1,
// docs/native-format.md): the header, one part record per part, the nodes
// and then the shells, each in index order. Coordinates and thicknesses
// are written in the shortest form that reads back to the same float64,
// so reading the output with native.Read gives back the same mesh, with
// two exceptions: part names lose leading and trailing blanks, and
// Part.Mesh is not written (it belongs in a parts table).
//
// The output depends only on m. Write checks m first and writes
// nothing when it cannot be written as a valid file: slices of mismatched
// lengths, ids that are not positive, non-finite coordinates, thicknesses
// that are neither positive nor unset, elements other than 3, 4, 6, 8 or 9 nodes,
// node or part indices out of range, control characters in a part name, or
// blanks and control characters in a material. It does not look for
// duplicate ids, which a Mesh that has been indexed does not hold.
func Write(w io.Writer, m *geom.Mesh) error {
	if err := checkNative(m); err != nil {
		return fmt.Errorf("native: writing: %w", err)
	}
	buf := make([]byte, 0, 4096)
	buf = append(buf, "joinery-mesh 1\n"...)
	for _, p := range m.Parts {
		buf = appendNativePart(buf, &p)
	}
	if len(m.Parts) > 0 {
		buf = append(buf, '\n')
	}
	if _, err := w.Write(buf); err != nil {
		return fmt.Errorf("native: writing: %w", err)
	}
	err := writeNativeBlocks(w, m.NumNodes(), func(dst []byte, lo, hi int) []byte {
		for i := lo; i < hi; i++ {
			p := m.Coords[i]
			dst = append(dst, "node "...)
			dst = strconv.AppendInt(dst, m.NodeIDs[i], 10)
			dst = append(dst, ' ')
			dst = strconv.AppendFloat(dst, p.X, 'g', -1, 64)
			dst = append(dst, ' ')
			dst = strconv.AppendFloat(dst, p.Y, 'g', -1, 64)
			dst = append(dst, ' ')
			dst = strconv.AppendFloat(dst, p.Z, 'g', -1, 64)
			dst = append(dst, '\n')
		}
		if hi == m.NumNodes() && m.NumElems() > 0 {
			dst = append(dst, '\n')
		}
		return dst
	})
	if err != nil {
		return err
	}
	return writeNativeBlocks(w, m.NumElems(), func(dst []byte, lo, hi int) []byte {
		for e := lo; e < hi; e++ {
			dst = append(dst, "shell "...)
			dst = strconv.AppendInt(dst, m.ElemIDs[e], 10)
			dst = append(dst, ' ')
			dst = strconv.AppendInt(dst, m.Parts[m.ElemPart[e]].ID, 10)
			for _, n := range m.ElemNodes(e) {
				dst = append(dst, ' ')
				dst = strconv.AppendInt(dst, m.NodeIDs[n], 10)
			}
			if m.ElemThickness != nil {
				if t := m.ElemThickness[e]; !math.IsNaN(t) {
					dst = append(dst, " t="...)
					dst = strconv.AppendFloat(dst, t, 'g', -1, 64)
				}
			}
			dst = append(dst, '\n')
		}
		return dst
	})
}

// appendNativePart appends the part record of p.
func appendNativePart(dst []byte, p *geom.Part) []byte {
	dst = append(dst, "part "...)
	dst = strconv.AppendInt(dst, p.ID, 10)
	if p.Thickness != 0 {
		dst = append(dst, " thickness="...)
		dst = strconv.AppendFloat(dst, p.Thickness, 'g', -1, 64)
	}
	if p.Surface != geom.SurfaceMid {
		dst = append(dst, " surface="...)
		dst = append(dst, p.Surface.String()...)
	}
	if p.Material != "" {
		dst = append(dst, " material="...)
		dst = append(dst, p.Material...)
	}
	if name := strings.Trim(p.Name, " \t\r"); name != "" {
		dst = append(dst, " name="...)
		dst = append(dst, name...)
	}
	return append(dst, '\n')
}

// writeNativeBlocks formats records [0, n) in blocks of nativeBlock, several
// blocks at a time in parallel, and writes the blocks in order.
func writeNativeBlocks(w io.Writer, n int, format func(dst []byte, lo, hi int) []byte) error {
	workers := max(1, min(runtime.GOMAXPROCS(0), 4))
	nb := (n + nativeBlock - 1) / nativeBlock
	bufs := make([][]byte, workers)
	for b0 := 0; b0 < nb; b0 += workers {
		k := min(workers, nb-b0)
		block := func(j int) {
			lo := (b0 + j) * nativeBlock
			bufs[j] = format(bufs[j][:0], lo, min(n, lo+nativeBlock))
		}
		if k == 1 {
			block(0)
		} else {
			var wg sync.WaitGroup
			for j := range k {
				wg.Go(func() { block(j) })
			}
			wg.Wait()
		}
		for _, b := range bufs[:k] {
			if _, err := w.Write(b); err != nil {
				return fmt.Errorf("native: writing: %w", err)
			}
		}
	}
	return nil
}

// checkNative reports the first reason m cannot be written as a valid
// native file.
func checkNative(m *geom.Mesh) error {
	nn, ne := len(m.NodeIDs), len(m.ElemIDs)
	switch {
	case len(m.Coords) != nn:
		return fmt.Errorf("%d coordinates for %d node ids", len(m.Coords), nn)
	case len(m.ElemPart) != ne:
		return fmt.Errorf("%d element parts for %d element ids", len(m.ElemPart), ne)
	case m.ElemThickness != nil && len(m.ElemThickness) != ne:
		return fmt.Errorf("%d element thicknesses for %d element ids", len(m.ElemThickness), ne)
	case ne > 0 && len(m.ElemStart) != ne+1:
		return fmt.Errorf("%d element starts for %d element ids", len(m.ElemStart), ne)
	}
	for i, p := range m.Parts {
		if p.ID <= 0 {
			return fmt.Errorf("part %d: id %d is not positive", i, p.ID)
		}
		if t := p.Thickness; t != 0 && !(t > 0 && !math.IsInf(t, 0)) {
			return fmt.Errorf("part %d: thickness %g is neither positive nor unset (0)", p.ID, t)
		}
		if strings.ContainsFunc(p.Name, nativeControl) {
			return fmt.Errorf("part %d: name %q has a control character", p.ID, p.Name)
		}
		if strings.ContainsFunc(p.Material, func(r rune) bool { return r == ' ' || nativeControl(r) }) {
			return fmt.Errorf("part %d: material %q has a blank or a control character", p.ID, p.Material)
		}
	}
	for i, id := range m.NodeIDs {
		if id <= 0 {
			return fmt.Errorf("node %d: id %d is not positive", i, id)
		}
		p := m.Coords[i]
		if !nativeFinite(p.X) || !nativeFinite(p.Y) || !nativeFinite(p.Z) {
			return fmt.Errorf("node %d: coordinate (%g, %g, %g) is not finite", id, p.X, p.Y, p.Z)
		}
	}
	if ne == 0 {
		return nil
	}
	if m.ElemStart[0] != 0 || int(m.ElemStart[ne]) != len(m.Conn) {
		return fmt.Errorf("element starts run from %d to %d over %d connectivity entries", m.ElemStart[0], m.ElemStart[ne], len(m.Conn))
	}
	for e, id := range m.ElemIDs {
		if id <= 0 {
			return fmt.Errorf("element %d: id %d is not positive", e, id)
		}
		if k := m.ElemStart[e+1] - m.ElemStart[e]; !geom.ElemType(min(k, 127)).Valid() {
			return fmt.Errorf("element %d: %d nodes (want 3, 4, 6, 8 or 9)", id, k)
		}
		for _, n := range m.ElemNodes(e) {
			if n < 0 || int(n) >= nn {
				return fmt.Errorf("element %d: node index %d outside 0..%d", id, n, nn-1)
			}
		}
		if p := m.ElemPart[e]; p < 0 || int(p) >= len(m.Parts) {
			return fmt.Errorf("element %d: part index %d outside 0..%d", id, p, len(m.Parts)-1)
		}
		if m.ElemThickness != nil {
			if t := m.ElemThickness[e]; !math.IsNaN(t) && !(t > 0 && !math.IsInf(t, 0)) {
				return fmt.Errorf("element %d: thickness %g is neither positive nor unset (NaN)", id, t)
			}
		}
	}
	return nil
}

func nativeControl(r rune) bool { return r < 0x20 || r == 0x7f }

func nativeFinite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
