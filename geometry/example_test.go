package geometry_test

import (
	"fmt"

	"cvdeck/geometry"
)

// A channel 2 × 0.5 with a circular body: walls clustered towards the
// corners, a body of 48 nodes, discretised with one tag per edge.
func Example() {
	wall, _ := geometry.Clustered(0.005, 0.005, 41)
	side, _ := geometry.Count(11)
	channel, _ := geometry.NewRectangle(0, 0, 2, 0.5, [4]geometry.Attr{
		{Tag: "wall", Spacing: wall}, {Tag: "outflow", Spacing: side},
		{Tag: "wall", Spacing: wall}, {Tag: "inflow", Spacing: side},
	})
	ring, _ := geometry.Count(49)
	body, _ := geometry.NewCircle(0.6, 0.25, 0.05, geometry.Attr{Tag: "body", Spacing: ring})
	o, err := geometry.Outline{Outer: channel, Inner: []geometry.Loop{body}}.Normalise()
	if err != nil {
		fmt.Println(err)
		return
	}
	d, _ := o.Discretise()
	_, starts, _ := o.Outer.Discretise()
	fmt.Println("outer nodes:", len(d.Loops[0].Points), "side starts:", starts)
	fmt.Println("body nodes:", len(d.Loops[1].Points), "tag:", d.Loops[1].Tags[0], "flipped to clockwise:", o.Inner[0].Flipped)
	// Output:
	// outer nodes: 100 side starts: [0 40 50 90]
	// body nodes: 48 tag: body flipped to clockwise: true
}
