package writers

import (
	"io"

	"github.com/joinery-cae/joinery/writers/document"
)

// WriteJSON writes v as indented JSON followed by a newline, with map
// keys sorted and floats in Go's shortest round-trip form
// (document.EncodeJSON).
func WriteJSON(w io.Writer, v any) error { return document.EncodeJSON(w, v) }
