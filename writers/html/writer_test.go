package html

import (
	"math/rand/v2"
	"net/url"
	"strings"
	"testing"
)

// TestAnchor checks that joint ids become HTML ids that are plain,
// different for different ids, and read back by percent-decoding with
// '_' for '%' (what the page's script does with decodeURIComponent).
func TestAnchor(t *testing.T) {
	for _, c := range []struct{ id, want string }{
		{"W1", "W1"}, {"spot-12", "spot-12"}, {"a b", "a_20b"}, {"_", "_5f"}, {"", "_"},
		{"é", "_c3_a9"}, {`"<x>"`, "_22_3cx_3e_22"}, {"1.5", "1_2e5"},
	} {
		if got := Anchor(c.id); got != c.want {
			t.Errorf("Anchor(%q) = %q, want %q", c.id, got, c.want)
		}
	}
	rng := rand.New(rand.NewPCG(3, 4))
	seen := map[string]string{}
	const alphabet = "aZ09-_ .%é/"
	for range 5000 {
		var b strings.Builder
		for range rng.IntN(6) {
			b.WriteByte(alphabet[rng.IntN(len(alphabet))])
		}
		id := b.String()
		a := Anchor(id)
		if prev, ok := seen[a]; ok && prev != id {
			t.Fatalf("Anchor(%q) = Anchor(%q) = %q", id, prev, a)
		}
		seen[a] = id
		if id == "" {
			continue
		}
		back, err := url.PathUnescape(strings.ReplaceAll(a, "_", "%"))
		if err != nil || back != id {
			t.Fatalf("anchor %q of %q reads back as %q (%v)", a, id, back, err)
		}
		for i := 0; i < len(a); i++ {
			if !anchorByte(a[i]) && a[i] != '_' {
				t.Fatalf("anchor %q holds %q", a, a[i])
			}
		}
	}
}

// TestWriterEscapes checks text and attribute escaping: the five
// characters of markup and control characters, which XML does not allow.
func TestWriterEscapes(t *testing.T) {
	var w Writer
	w.Text("a<b>&\"c'\x01d\te")
	w.Attr("title", `x"y`)
	if got, want := string(w.Bytes()), "a&lt;b&gt;&amp;&quot;c&#39; d\te title=\"x&quot;y\""; got != want {
		t.Errorf("got %q, want %q", got, want)
	}
}
