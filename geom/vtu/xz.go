package vtu

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"hash/crc32"
	"io"

	"github.com/ulikunitz/xz"
	"github.com/ulikunitz/xz/lzma"
)

// VTK's LZMA compressor (vtkLZMADataCompressor, liblzma's
// lzma_easy_buffer_encode) writes every block of an array as a whole .xz
// stream ("The .xz File Format", version 1.0.4, Tukaani project): a
// 12-byte stream header, the blocks, an index and a 12-byte footer.
// Python's lzma module, which meshio uses, writes the same container.
//
// A decoder sets aside the dictionary size written in each block header,
// up to 4 GiB; liblzma's presets write 8 MiB to 64 MiB whatever the size
// of the data. No LZMA match can reach farther back than the data decoded
// so far, so a dictionary as large as the block's uncompressed size
// decodes it exactly: newXZReader lowers the dictionary size of every
// block header to that (the xz package would otherwise allocate the
// written size for each of thousands of small blocks, and a hostile header
// could ask for gigabytes), and checks the stream's index against the
// declared size before anything is decoded.

const (
	xzHeaderLen = 12 // stream header and stream footer
	xzLZMA2     = 0x21
	// xzMaxDictCode is the largest dictionary-size code (4 GiB - 1).
	xzMaxDictCode = 40
)

var xzMagic = []byte{0xfd, '7', 'z', 'X', 'Z', 0}

// newXZReader returns a reader of the one .xz stream in block, which must
// decode to raw bytes.
func newXZReader(block []byte, raw int) (io.Reader, error) {
	if len(block) < 2*xzHeaderLen || !bytes.Equal(block[:6], xzMagic) {
		return nil, errors.New("not an .xz stream (VTK's LZMA compressor writes one per block)")
	}
	footer := block[len(block)-xzHeaderLen:]
	if string(footer[10:]) != "YZ" {
		return nil, errors.New(".xz stream: no stream footer where the block ends (one stream per block, nothing after it)")
	}
	indexLen := (int64(binary.LittleEndian.Uint32(footer[4:8])) + 1) * 4
	indexAt := int64(len(block)) - xzHeaderLen - indexLen
	if indexAt < xzHeaderLen {
		return nil, errors.New(".xz stream: index larger than the stream")
	}
	sizes, unpadded, err := xzIndex(block[indexAt : indexAt+indexLen])
	if err != nil {
		return nil, err
	}
	var total uint64
	for _, s := range sizes {
		total += s
		if total > uint64(raw) {
			break
		}
	}
	if total != uint64(raw) {
		return nil, fmt.Errorf(".xz stream: its index gives %d uncompressed bytes, the size header %d", total, raw)
	}
	// Lower the dictionary size of every block header; block i starts
	// where block i-1's padded size ends.
	patched := bytes.Clone(block)
	pos := int64(xzHeaderLen)
	for i := range sizes {
		if pos >= indexAt {
			return nil, errors.New(".xz stream: blocks overrun the index")
		}
		if err := capDict(patched[pos:indexAt], sizes[i]); err != nil {
			return nil, fmt.Errorf(".xz block %d: %w", i, err)
		}
		pos += (int64(unpadded[i]) + 3) &^ 3
	}
	if pos != indexAt {
		return nil, errors.New(".xz stream: blocks and index do not fill the stream")
	}
	return xz.ReaderConfig{SingleStream: true}.NewReader(bytes.NewReader(patched))
}

// xzIndex reads an .xz index: per block its uncompressed size and its
// unpadded size (header, data and check). Its CRC32 is checked by the xz
// package while decoding.
func xzIndex(idx []byte) (sizes, unpadded []uint64, err error) {
	if len(idx) < 8 || idx[0] != 0 {
		return nil, nil, errors.New(".xz stream: no index before the footer")
	}
	r := bytes.NewReader(idx[1 : len(idx)-4])
	n, err := xzVarint(r)
	if err != nil || n > uint64(len(idx)/2) {
		return nil, nil, errors.New(".xz stream: bad index record count")
	}
	sizes, unpadded = make([]uint64, n), make([]uint64, n)
	for i := range sizes {
		if unpadded[i], err = xzVarint(r); err != nil {
			return nil, nil, errors.New(".xz stream: bad index record")
		}
		if sizes[i], err = xzVarint(r); err != nil {
			return nil, nil, errors.New(".xz stream: bad index record")
		}
		if unpadded[i] < 5 || unpadded[i] > uint64(len(idx))<<32 {
			return nil, nil, errors.New(".xz stream: bad block size in the index")
		}
	}
	return sizes, unpadded, nil
}

// xzVarint reads an .xz multibyte integer: 7 bits per byte, low bits
// first, at most 9 bytes.
func xzVarint(r io.ByteReader) (uint64, error) {
	var v uint64
	for i := 0; i < 9; i++ {
		b, err := r.ReadByte()
		if err != nil {
			return 0, err
		}
		v |= uint64(b&0x7f) << (7 * i)
		if b&0x80 == 0 {
			if b == 0 && i > 0 {
				return 0, errors.New("non-minimal multibyte integer")
			}
			return v, nil
		}
	}
	return 0, errors.New("multibyte integer too long")
}

// capDict lowers the dictionary size in the block header at the start of
// b to the smallest one that holds raw bytes (at least the 4 KiB minimum
// of the lzma package), and recomputes the header's CRC32. A header it
// cannot read is left for the xz package to report.
func capDict(b []byte, raw uint64) error {
	if len(b) == 0 || b[0] == 0 {
		return errors.New("missing block header")
	}
	n := (int(b[0]) + 1) * 4
	if n > len(b) {
		return errors.New("block header runs past the stream")
	}
	h := b[:n]
	flags := h[1]
	r := bytes.NewReader(h[2 : n-4])
	for _, present := range []bool{flags&0x40 != 0, flags&0x80 != 0} { // compressed, uncompressed size
		if present {
			if _, err := xzVarint(r); err != nil {
				return errors.New("bad block header")
			}
		}
	}
	for range int(flags&3) + 1 {
		id, err1 := xzVarint(r)
		size, err2 := xzVarint(r)
		if err1 != nil || err2 != nil || size > uint64(r.Len()) {
			return errors.New("bad filter in the block header")
		}
		at := len(h) - 4 - r.Len()
		r.Seek(int64(size), io.SeekCurrent)
		if id != xzLZMA2 || size != 1 {
			continue // the xz package reports filters it does not read
		}
		code := h[at]
		if code > xzMaxDictCode {
			return nil // reported by the xz package
		}
		want := byte(0)
		for want < code && xzDictSize(want) < max(raw, lzma.MinDictCap) {
			want++
		}
		if want < code {
			h[at] = want
			binary.LittleEndian.PutUint32(h[n-4:], crc32.ChecksumIEEE(h[:n-4]))
		}
	}
	return nil
}

// xzDictSize returns the dictionary size of an LZMA2 dictionary-size code
// (the .xz format's LZMA2 filter properties): 2^(c/2+12), times 1.5 for
// odd codes.
func xzDictSize(c byte) uint64 { return uint64(2|c&1) << (c/2 + 11) }
