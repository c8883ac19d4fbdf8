package vtk_test

import (
	"fmt"
	"log"

	"github.com/joinery-cae/joinery/geom"
	"github.com/joinery-cae/joinery/geom/vtk"
)

func ExampleReadFile() {
	m, err := vtk.ReadFile("../../testdata/formats/small_binary.vtk", geom.ReadOptions{})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(m.NumNodes(), "nodes,", m.NumElems(), "elements, skipped", m.Sources[0].Skipped)
	e, _ := m.ElemIndex(2001)
	fmt.Println("element 2001:", m.Type(int(e)), "part", m.Part(int(e)).ID, "thickness", m.Thickness(int(e)))
	// Output:
	// 12 nodes, 5 elements, skipped vertex (VTK type 1): 1
	// element 2001: tri3 part 20 thickness 1.5
}
