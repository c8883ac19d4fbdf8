package vtu

import (
	"bytes"
	"compress/zlib"
	"errors"
	"fmt"
	"io"
	"math/bits"

	"github.com/joinery-cae/joinery/geom"
)

// byteSource hands out the bytes of one binary array payload in order:
// the size header first, then the data.
type byteSource interface {
	// next returns the next n bytes; the slice may alias the input.
	next(n int) ([]byte, error)
	// avail returns an upper bound of the bytes left.
	avail() int
	// offset returns the file offset of the source's position.
	offset() int64
}

// rawSource reads raw appended data straight from the input.
type rawSource struct {
	file, name string
	data       []byte
	pos        int
}

func (s *rawSource) next(n int) ([]byte, error) {
	if n < 0 || n > len(s.data)-s.pos {
		return nil, geom.OffsetError(s.file, int64(s.pos), "array %q: truncated: needs %d bytes, the file has %d left", s.name, n, len(s.data)-s.pos)
	}
	b := s.data[s.pos : s.pos+n]
	s.pos += n
	return b, nil
}

func (s *rawSource) avail() int    { return len(s.data) - s.pos }
func (s *rawSource) offset() int64 { return int64(s.pos) }

// Values in the base64 decoding table that are not digits.
const (
	b64Invalid = 0xff
	b64Pad     = 0xfe
	b64Space   = 0xfd
)

// b64Table maps a character to its base64 value (RFC 4648 standard
// alphabet) or to one of the markers above. A test checks it against the
// alphabet.
const b64Table = "" +
	"\xff\xff\xff\xff\xff\xff\xff\xff\xff\xfd\xfd\xff\xff\xfd\xff\xff" +
	"\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff" +
	"\xfd\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\x3e\xff\xff\xff\x3f" +
	"\x34\x35\x36\x37\x38\x39\x3a\x3b\x3c\x3d\xff\xff\xff\xfe\xff\xff" +
	"\xff\x00\x01\x02\x03\x04\x05\x06\x07\x08\x09\x0a\x0b\x0c\x0d\x0e" +
	"\x0f\x10\x11\x12\x13\x14\x15\x16\x17\x18\x19\xff\xff\xff\xff\xff" +
	"\xff\x1a\x1b\x1c\x1d\x1e\x1f\x20\x21\x22\x23\x24\x25\x26\x27\x28" +
	"\x29\x2a\x2b\x2c\x2d\x2e\x2f\x30\x31\x32\x33\xff\xff\xff\xff\xff" +
	"\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff" +
	"\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff" +
	"\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff" +
	"\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff" +
	"\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff" +
	"\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff" +
	"\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff" +
	"\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff\xff"

// b64Source decodes base64 text as a stream of 4-character groups, each
// giving 1 to 3 bytes, so that padding may appear between separately
// encoded parts (the size header and the data) as well as at the end.
// White space between characters is ignored.
type b64Source struct {
	file, name string
	src        []byte
	base       int64 // file offset of src[0]
	pos        int
	pend       [3]byte // decoded bytes of the current group
	np, pi     int     // bytes in pend, bytes of pend used
}

func (s *b64Source) avail() int    { return (len(s.src)-s.pos+3)/4*3 + s.np - s.pi }
func (s *b64Source) offset() int64 { return s.base + int64(s.pos) }

func (s *b64Source) next(n int) ([]byte, error) {
	if n < 0 || n > s.avail() {
		return nil, geom.OffsetError(s.file, s.offset(), "array %q: truncated: needs %d bytes, the base64 text holds at most %d", s.name, n, s.avail())
	}
	dst := make([]byte, n)
	if err := s.fill(dst); err != nil {
		return nil, err
	}
	return dst, nil
}

// fill decodes len(dst) bytes into dst.
func (s *b64Source) fill(dst []byte) error {
	const t = b64Table
	n := 0
	for n < len(dst) {
		if s.pi < s.np {
			k := copy(dst[n:], s.pend[s.pi:s.np])
			n += k
			s.pi += k
			continue
		}
		// Fast path: whole groups of four digits.
		src := s.src[s.pos:]
		k := 0
		for len(dst)-n >= 3 && k+4 <= len(src) {
			a, b, c, d := t[src[k]], t[src[k+1]], t[src[k+2]], t[src[k+3]]
			if a|b|c|d >= 64 {
				break
			}
			v := uint32(a)<<18 | uint32(b)<<12 | uint32(c)<<6 | uint32(d)
			dst[n], dst[n+1], dst[n+2] = byte(v>>16), byte(v>>8), byte(v)
			n += 3
			k += 4
		}
		s.pos += k
		if n < len(dst) {
			if err := s.group(); err != nil {
				return err
			}
		}
	}
	return nil
}

// group decodes the next group of four characters into pend.
func (s *b64Source) group() error {
	var q [4]byte
	for k := 0; k < 4; {
		if s.pos >= len(s.src) {
			if k == 0 {
				return geom.OffsetError(s.file, s.offset(), "array %q: base64 text ends early", s.name)
			}
			return geom.OffsetError(s.file, s.offset(), "array %q: base64 text ends inside a group of four characters", s.name)
		}
		c := s.src[s.pos]
		v := b64Table[c]
		switch v {
		case b64Space:
			s.pos++
			continue
		case b64Invalid:
			return geom.OffsetError(s.file, s.offset(), "array %q: invalid base64 character %q", s.name, c)
		case b64Pad:
			if k < 2 {
				return geom.OffsetError(s.file, s.offset(), "array %q: misplaced base64 padding", s.name)
			}
		default:
			if k == 3 && q[2] == b64Pad {
				return geom.OffsetError(s.file, s.offset(), "array %q: misplaced base64 padding", s.name)
			}
		}
		q[k] = v
		k++
		s.pos++
	}
	s.np, s.pi = 3, 0
	switch {
	case q[2] == b64Pad:
		s.np = 1
		q[2], q[3] = 0, 0
	case q[3] == b64Pad:
		s.np = 2
		q[3] = 0
	}
	v := uint32(q[0])<<18 | uint32(q[1])<<12 | uint32(q[2])<<6 | uint32(q[3])
	s.pend = [3]byte{byte(v >> 16), byte(v >> 8), byte(v)}
	return nil
}

// rest checks that nothing but white space follows the decoded data.
func (s *b64Source) rest() error {
	if s.pi < s.np {
		return geom.OffsetError(s.file, s.offset(), "array %q: base64 text holds more bytes than its size header declares", s.name)
	}
	for _, c := range s.src[s.pos:] {
		if b64Table[c] != b64Space {
			return geom.OffsetError(s.file, s.offset(), "array %q: base64 text holds more bytes than its size header declares", s.name)
		}
	}
	return nil
}

// maxWord bounds the values of size headers so that sums of them cannot
// overflow; the real bounds come from the bytes present.
const maxWord = 1 << 40

// maxCompression bounds the ratio of the bytes a file's compressed arrays
// inflate to (those Joinery reads, together) to the size of the file,
// so that a small file cannot claim gigabytes through arrays whose sizes
// agree with its counts. Mesh data compresses far less: a 300 x 300 grid
// of quads with regular coordinates, sequential ids and constant part and
// thickness, the most compressible mesh there is, written by VTK 9.1 at
// compression level 9, compresses 7 times with zlib and 20 times with
// LZMA (measured for this limit); ordinary meshes compress 2 to 5 times.
// A compression bomb inflates hundreds of times (the 5.6 MB file of the
// issue that led to this limit: 4 GB, 700 times). compressionSlack lets
// tiny files through whatever their ratio.
const (
	maxCompression   = 128
	compressionSlack = 1 << 20
)

// maxInflate bounds the bytes a zlib stream of n bytes can inflate to:
// deflate codes a match of at most 258 bytes in no fewer than 2 bits
// (RFC 1951), so 1032 bytes per input byte, plus slack for tiny streams.
func maxInflate(n uint64) uint64 { return 1032*n + 1024 }

// source returns the byte source of a binary array.
func (p *parser) source(a *arrayDesc) (byteSource, error) {
	if a.format == formatBinary {
		return &b64Source{file: p.file, name: a.name, src: a.text, base: a.textOff}, nil
	}
	if !p.hasAppended {
		return nil, p.errLine(a.line, "array %q is appended but the file has no AppendedData", a.name)
	}
	size := int64(p.appendedEnd - p.appendedStart)
	if a.offset > size {
		return nil, p.errLine(a.line, "array %q: offset %d is beyond the %d bytes of appended data", a.name, a.offset, size)
	}
	start := p.appendedStart + int(a.offset)
	if p.appendedB64 {
		return &b64Source{file: p.file, name: a.name, src: p.data[start:p.appendedEnd], base: int64(start)}, nil
	}
	return &rawSource{file: p.file, name: a.name, data: p.data, pos: start}, nil
}

// compressor is the compression of a file's binary arrays.
type compressor int8

const (
	compressNone compressor = iota
	compressZlib            // vtkZLibDataCompressor
	compressLZMA            // vtkLZMADataCompressor: each block an .xz stream
)

// payload returns the decoded bytes of a binary (inline or appended)
// array, decompressed when the file says so. check is called with the
// number of bytes the array's headers declare before they are read or
// inflated, so that a size the array cannot have is refused before any
// memory is set aside for it.
func (p *parser) payload(a *arrayDesc, check func(declared int64) error) ([]byte, error) {
	src, err := p.source(a)
	if err != nil {
		return nil, err
	}
	start := src.offset()
	hs := 4
	if p.header64 {
		hs = 8
	}
	word := func(what string) (int, error) {
		off := src.offset()
		b, err := src.next(hs)
		if err != nil {
			return 0, err
		}
		var v uint64
		if hs == 4 {
			v = uint64(order(p.bigEndian).Uint32(b))
		} else {
			v = order(p.bigEndian).Uint64(b)
		}
		if v > maxWord {
			return 0, geom.OffsetError(p.file, off, "array %q: %s %d is larger than the input allows", a.name, what, v)
		}
		return int(v), nil
	}
	var out []byte
	if p.compressor == compressNone {
		n, err := word("byte count")
		if err != nil {
			return nil, err
		}
		if err := check(int64(n)); err != nil {
			return nil, err
		}
		if out, err = src.next(n); err != nil {
			return nil, err
		}
	} else {
		if out, err = p.inflate(a, src, word, start, check); err != nil {
			return nil, err
		}
	}
	if b, ok := src.(*b64Source); ok && a.format == formatBinary {
		if err := b.rest(); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// inflate reads the blocked layout of compressed arrays: a header of block
// count, block size, size of the last block (0 when it is full) and the
// compressed size of every block, followed by the compressed blocks.
// The uncompressed size the header declares is checked (check) before
// any block is read, and each block is inflated into its own place of
// the output, never beyond its declared size.
func (p *parser) inflate(a *arrayDesc, src byteSource, word func(string) (int, error), start int64, check func(int64) error) ([]byte, error) {
	nb, err := word("block count")
	if err != nil {
		return nil, err
	}
	bs, err := word("block size")
	if err != nil {
		return nil, err
	}
	last, err := word("last block size")
	if err != nil {
		return nil, err
	}
	if nb == 0 {
		return nil, check(0)
	}
	if last == 0 {
		last = bs
	}
	if last > bs {
		return nil, geom.OffsetError(p.file, start, "array %q: last block size %d exceeds the block size %d", a.name, last, bs)
	}
	hi, lo := bits.Mul64(uint64(nb-1), uint64(bs))
	if hi != 0 || lo > maxWord {
		return nil, geom.OffsetError(p.file, start, "array %q: %d blocks of %d bytes are more than the input allows", a.name, nb, bs)
	}
	declared := int64(lo) + int64(last)
	if err := check(declared); err != nil {
		return nil, err
	}
	if budget := maxCompression*int64(len(p.data)) + compressionSlack; p.inflated+declared > budget {
		before := ""
		if p.inflated > 0 {
			before = fmt.Sprintf(" (%d with the arrays before it)", p.inflated+declared)
		}
		return nil, geom.OffsetError(p.file, start, "array %q: %d bytes once inflated%s is more than %d times the file's %d bytes, more than mesh data compresses: a damaged file or a compression bomb", a.name, declared, before, maxCompression, len(p.data))
	}
	p.inflated += declared
	hs := 4
	if p.header64 {
		hs = 8
	}
	if nb > src.avail()/hs {
		return nil, geom.OffsetError(p.file, start, "array %q: truncated: %d compressed blocks declared, too many for the input", a.name, nb)
	}
	csize := make([]int, nb)
	var ctotal int
	for i := range csize {
		if csize[i], err = word("compressed block size"); err != nil {
			return nil, err
		}
		raw := bs
		if i == nb-1 {
			raw = last
		}
		if p.compressor == compressZlib && uint64(raw) > maxInflate(uint64(csize[i])) {
			return nil, geom.OffsetError(p.file, start, "array %q: block %d declares %d bytes from %d compressed bytes, more than zlib can produce", a.name, i, raw, csize[i])
		}
		ctotal += csize[i]
		if ctotal > src.avail() {
			return nil, geom.OffsetError(p.file, start, "array %q: truncated: blocks 0..%d need %d compressed bytes, at most %d are left", a.name, i, ctotal, src.avail())
		}
	}
	cstart := src.offset()
	comp, err := src.next(ctotal)
	if err != nil {
		return nil, err
	}
	out := make([]byte, declared)
	var (
		br  bytes.Reader
		zr  io.ReadCloser
		one [1]byte
	)
	name := "zlib"
	if p.compressor == compressLZMA {
		name = "LZMA"
	}
	o, c := 0, 0
	for i, cs := range csize {
		raw := bs
		if i == nb-1 {
			raw = last
		}
		where := func(err error) error {
			if _, isRaw := src.(*rawSource); isRaw {
				return geom.OffsetError(p.file, cstart+int64(c), "array %q: %s block %d: %w", a.name, name, i, err)
			}
			return geom.OffsetError(p.file, start, "array %q: %s block %d (decoded byte %d): %w", a.name, name, i, c, err)
		}
		block := comp[c : c+cs]
		var r io.Reader
		if p.compressor == compressLZMA {
			if r, err = newXZReader(block, raw); err != nil {
				return nil, where(err)
			}
		} else {
			br.Reset(block)
			if zr == nil {
				zr, err = zlib.NewReader(&br)
			} else {
				err = zr.(zlib.Resetter).Reset(&br, nil)
			}
			if err != nil {
				return nil, where(err)
			}
			r = zr
		}
		if _, err := io.ReadFull(r, out[o:o+raw]); err != nil {
			if errors.Is(err, io.ErrUnexpectedEOF) || err == io.EOF {
				err = fmt.Errorf("inflates to fewer than the declared %d bytes", raw)
			}
			return nil, where(err)
		}
		if n, err := r.Read(one[:]); n > 0 {
			return nil, where(fmt.Errorf("inflates to more than the declared %d bytes", raw))
		} else if err != io.EOF {
			if err == nil {
				err = errors.New("stream does not end after the declared size")
			}
			return nil, where(err)
		}
		o += raw
		c += cs
	}
	return out, nil
}
