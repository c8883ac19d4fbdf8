package document

import (
	"bufio"
	"bytes"
	"encoding/json"
	"fmt"
	"io"

	"github.com/joinery-cae/joinery/geom"
)

// header is what every document starts with.
type header struct {
	Schema  string `json:"schema"`
	Version int    `json:"version"`
}

// decode reads one JSON document of the given schema and version into v.
// A document of another schema or version, or one that is not JSON, is
// an input error naming the file.
func decode(r io.Reader, name, schema string, version int, v any) error {
	_, err := decodeRaw(r, name, schema, version, v)
	return err
}

// decodeRaw is decode, returning the bytes read.
func decodeRaw(r io.Reader, name, schema string, version int, v any) ([]byte, error) {
	data, err := io.ReadAll(bufio.NewReader(r))
	if err != nil {
		return nil, fmt.Errorf("document: reading %s: %w", name, err)
	}
	h, ok := quickHeader(data)
	if !ok {
		if err := json.Unmarshal(data, &h); err != nil {
			return nil, jsonError(name, data, err)
		}
	}
	if err := checkHeader(name, h, schema, version); err != nil {
		return nil, err
	}
	if err := json.Unmarshal(data, v); err != nil {
		return nil, jsonError(name, data, err)
	}
	return data, nil
}

// checkHeader refuses a document whose header h is not of the schema
// and version asked for.
func checkHeader(name string, h header, schema string, version int) error {
	switch {
	case h.Schema != schema:
		return geom.FileError(name, "not a %s document (schema %q)", schema, geom.Excerpt(h.Schema))
	case h.Version != version:
		return geom.FileError(name, "%s version %d; this Joinery reads version %d", schema, h.Version, version)
	}
	return nil
}

// quickHeader reads the schema and version of a document from the
// first keys of its top-level object, where Joinery writes them, without
// a pass over the rest (a connectors.json of a large body is megabytes);
// ok is false when that fails, and the caller reads the whole document.
func quickHeader(data []byte) (header, bool) {
	var h header
	dec := json.NewDecoder(bytes.NewReader(data))
	if t, err := dec.Token(); err != nil || t != json.Delim('{') {
		return h, false
	}
	var hasSchema, hasVersion bool
	for dec.More() && !(hasSchema && hasVersion) {
		key, err := dec.Token()
		if err != nil {
			return h, false
		}
		switch key {
		case "schema":
			hasSchema = dec.Decode(&h.Schema) == nil
			if !hasSchema {
				return h, false
			}
		case "version":
			hasVersion = dec.Decode(&h.Version) == nil
			if !hasVersion {
				return h, false
			}
		default:
			var skip json.RawMessage
			if dec.Decode(&skip) != nil {
				return h, false
			}
		}
	}
	return h, hasSchema && hasVersion
}

// jsonError turns a JSON syntax or type error into an input error at its
// line.
func jsonError(name string, data []byte, err error) error {
	off := int64(-1)
	switch e := err.(type) {
	case *json.SyntaxError:
		off = e.Offset
	case *json.UnmarshalTypeError:
		off = e.Offset
	}
	if off >= 0 && off <= int64(len(data)) {
		return geom.LineError(name, 1+bytes.Count(data[:off], []byte("\n")), "%v", err)
	}
	return geom.FileError(name, "%v", err)
}

// errWriter keeps the first error of a sequence of writes.
type errWriter struct {
	w   io.Writer
	err error
}

func (e *errWriter) Write(p []byte) (int, error) {
	if e.err != nil {
		return 0, e.err
	}
	n, err := e.w.Write(p)
	e.err = err
	return n, err
}

func (e *errWriter) printf(format string, args ...any) { fmt.Fprintf(e, format, args...) }

// EncodeJSON writes v as indented JSON followed by a newline. Map keys
// come sorted and floats in Go's shortest round-trip form, so equal
// values give equal bytes.
func EncodeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(v)
}
