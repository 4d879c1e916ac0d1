package cgns_test

import (
	"fmt"
	"log"
	"os"
	"path/filepath"

	"github.com/paulmach/orb"

	"cvdeck/export/cgns"
	"cvdeck/mesh"
)

// Example writes a unit square of two triangles, its whole boundary a
// wall, and reads it back.
func Example() {
	m, err := mesh.Build(mesh.Input{
		Nodes:     []orb.Point{{0, 0}, {1, 0}, {1, 1}, {0, 1}},
		CellStart: []int32{0, 3, 6},
		CellNodes: []int32{0, 1, 2, 0, 2, 3},
		Tags:      []string{"wall"},
		Edges:     []mesh.TaggedEdge{{A: 0, B: 1}, {A: 1, B: 2}, {A: 2, B: 3}, {A: 3, B: 0}},
	})
	if err != nil {
		log.Fatal(err)
	}
	dir, err := os.MkdirTemp("", "cgns-example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "square.cgns")
	sum, err := cgns.Write(path, &cgns.Deck{Mesh: m, Name: "Square", BCs: []cgns.BC{{Tag: "wall", BCType: "BCWall"}}})
	if err != nil {
		log.Fatal(err)
	}
	back, err := cgns.ReadDeck(path)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("content hash:", len(sum), "hex digits")
	fmt.Println("cells:", back.Mesh.NumCells(), "faces:", back.Mesh.NumFaces(), "boundary:", back.Mesh.NumBoundary())
	fmt.Println("base:", back.Name, "BCs:", back.BCs)
	// Output:
	// content hash: 64 hex digits
	// cells: 2 faces: 5 boundary: 4
	// base: Square BCs: [{wall BCWall}]
}
