package writers

import (
	"encoding/json"
	"io"
)

// WriteJSON writes v as indented JSON followed by a newline. Map keys come
// sorted and floats in Go's shortest round-trip form, so equal values give
// equal bytes.
func WriteJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(v)
}
