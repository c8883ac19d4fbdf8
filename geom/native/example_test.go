package native_test

import (
	"fmt"
	"strings"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/native"
)

func ExampleRead() {
	const file = `joinery-mesh 1
part 10 thickness=1.2 material=DC04 name=floor panel
node 1 0 0 0
node 2 10 0 0
node 3 10 10 0
node 4 0 10 0
shell 100 10 1 2 3 4
shell 101 10 1 3 4 t=0.8   # a thicker patch
`
	m, err := native.Read(strings.NewReader(file), "floor.jmesh", geom.ReadOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	for e := range m.NumElems() {
		p := m.Part(e)
		fmt.Printf("shell %d: %s, part %d %q, %g mm\n", m.ElemIDs[e], m.Type(e), p.ID, p.Name, m.Thickness(e))
	}

	_, err = native.Read(strings.NewReader("joinery-mesh 1\nnode 1 0 0\n"), "bad.jmesh", geom.ReadOptions{})
	fmt.Println(err)
	// Output:
	// shell 100: quad4, part 10 "floor panel", 1.2 mm
	// shell 101: tri3, part 10 "floor panel", 0.8 mm
	// bad.jmesh:2: node record needs an id and 3 coordinates, has 3 fields
}
