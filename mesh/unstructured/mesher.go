// Package unstructured is cvdeck's unstructured mesher: robust Delaunay
// triangulation, constrained edges, quality refinement with a size field,
// boundary layers and an optional quad-dominant pass, turning a
// discretised outline into a mesh.Mesh.
package unstructured

import (
	"fmt"
	"math"

	"cvdeck/geometry"
	"cvdeck/mesh"
	"github.com/paulmach/orb"
)

// Mesh meshes the region inside the outline's outer loop and outside its
// inner loops. The outline's points and edges are kept (refinement may
// split edges; the pieces keep the edge's tag), every boundary face
// carries its edge's tag, and cells are counter-clockwise.
//
// The steps: validate and flatten the outline; constrained Delaunay
// triangulation of its points and edges; Delaunay refinement to the
// minimum angle and the size field (see refiner and sizeField); boundary
// layers and quad pairing when asked for; mesh.Build.
func Mesh(out geometry.DiscreteOutline, opt Options) (*mesh.Mesh, error) {
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, fmt.Errorf("unstructured: %w", err)
	}
	g, err := flatten(out)
	if err != nil {
		return nil, fmt.Errorf("unstructured: %w", err)
	}
	tr, err := triangulateOutline(g, opt)
	if err != nil {
		return nil, err
	}
	in := tr.meshInput(g)
	tr = nil
	m, err := mesh.Build(in)
	if err != nil {
		return nil, fmt.Errorf("unstructured: building the mesh: %w", err)
	}
	return m, nil
}

// triangulateOutline returns the refined constrained Delaunay
// triangulation of the flattened outline.
func triangulateOutline(g *pslg, opt Options) (*triangulation, error) {
	size, err := newSizeField(g, opt)
	if err != nil {
		return nil, fmt.Errorf("unstructured: %w", err)
	}
	est := size.estimateTriangles(g)
	if est > float64(opt.MaxCells) {
		return nil, fmt.Errorf("unstructured: the sizes ask for about %.3g cells, above the limit of %d; raise the limit or the sizes", est, opt.MaxCells)
	}
	capTri := int(math.Min(1.15*est, float64(opt.MaxCells))) + 4*len(g.pts) + 16
	pts := make([]orb.Point, len(g.pts), capTri/2+len(g.pts))
	copy(pts, g.pts)
	g2 := *g
	g2.pts = pts
	tr, err := constrainedTriangulation(&g2, capTri)
	if err != nil {
		return nil, fmt.Errorf("unstructured: %w", err)
	}
	// Ghost and outside triangles are not cells; allow for them in the
	// cell limit.
	r := newRefiner(tr, g, size, opt.MinAngle, opt.MaxCells+4*len(g.pts)+16)
	if err := r.run(); err != nil {
		return nil, fmt.Errorf("unstructured: %w", refineError(err, opt.MaxCells))
	}
	return tr, nil
}

// newSizeField builds the size field of the options over the outline.
func newSizeField(g *pslg, opt Options) (*sizeField, error) {
	s := &sizeField{slope: opt.Growth - 1, maxSize: opt.MaxSize}
	for i, p := range g.pts {
		a, c := g.pts[g.prevPt[i]], g.pts[g.nextPt[i]]
		h := 0.5 * (math.Hypot(p[0]-a[0], p[1]-a[1]) + math.Hypot(p[0]-c[0], p[1]-c[1]))
		s.src = append(s.src, sizeSource{p: p, h: h})
	}
	for ri, r := range opt.Regions {
		switch r.Shape {
		case Box:
			s.boxes = append(s.boxes, r)
		case Circle:
			s.circles = append(s.circles, r)
		case NearTag:
			found := false
			for e, ti := range g.edgeTag {
				if g.tags[ti] != r.Tag {
					continue
				}
				found = true
				// Sample the edge at most Size apart so the cone union
				// follows the edge, not just its end points.
				a, b := g.pts[e], g.pts[g.nextPt[e]]
				l := math.Hypot(b[0]-a[0], b[1]-a[1])
				n := int(math.Ceil(l / r.Size))
				if n > 1000 {
					n = 1000
				}
				for k := 0; k < max(n, 1); k++ {
					t := float64(k) / float64(max(n, 1))
					s.src = append(s.src, sizeSource{p: orb.Point{a[0] + t*(b[0]-a[0]), a[1] + t*(b[1]-a[1])}, h: r.Size, r: r.Distance})
				}
			}
			if !found {
				return nil, fmt.Errorf("region %d (near-tag): no boundary edge is tagged %q; tags are %q", ri, r.Tag, g.tags)
			}
		}
	}
	s.build(orb.MultiPoint(g.pts).Bound())
	return s, nil
}

// estimateTriangles estimates the triangle count of the refined mesh: the
// integral over the domain of 1/(a·h²), with a = 0.30 h² the mean triangle
// area refinement gives for the size target h (measured on test domains;
// an equilateral triangle of edge h has √3/4·h² ≈ 0.43 h²). The domain is
// integrated on the size field's grid cells whose centres lie inside the
// outline (even-odd rule).
func (s *sizeField) estimateTriangles(g *pslg) float64 {
	b := orb.MultiPoint(g.pts).Bound()
	const n = 128
	dx, dy := (b.Max[0]-b.Min[0])/n, (b.Max[1]-b.Min[1])/n
	// Crossings of each sample row with the outline edges, by row.
	sum := 0.0
	xs := make([]float64, 0, 64)
	for j := 0; j < n; j++ {
		y := b.Min[1] + (float64(j)+0.5)*dy
		xs = xs[:0]
		for e := range g.pts {
			p, q := g.pts[e], g.pts[g.nextPt[e]]
			if (p[1] <= y) != (q[1] <= y) {
				xs = append(xs, p[0]+(y-p[1])/(q[1]-p[1])*(q[0]-p[0]))
			}
		}
		for i := 0; i < n; i++ {
			x := b.Min[0] + (float64(i)+0.5)*dx
			c := 0
			for _, xc := range xs {
				if xc < x {
					c++
				}
			}
			if c%2 == 1 {
				h := s.at(orb.Point{x, y})
				sum += dx * dy / (0.30 * h * h)
			}
		}
	}
	return sum + 2*float64(len(g.pts))
}

// meshInput turns the inside triangles into a mesh.Input: nodes are the
// triangulation's vertices in insertion order, cells the inside triangles
// in slot order, and every segment half-edge of an inside triangle a
// tagged boundary edge.
func (tr *triangulation) meshInput(g *pslg) mesh.Input {
	nt := tr.numTri()
	in := mesh.Input{Nodes: tr.pts, Tags: g.tags}
	count := 0
	for t := int32(0); t < nt; t++ {
		if tr.flag[t]&flagInside != 0 {
			count++
		}
	}
	in.CellStart = make([]int32, 0, count+1)
	in.CellNodes = make([]int32, 0, 3*count)
	in.CellStart = append(in.CellStart, 0)
	for t := int32(0); t < nt; t++ {
		if tr.flag[t]&flagInside == 0 {
			continue
		}
		in.CellNodes = append(in.CellNodes, tr.v[3*t:3*t+3]...)
		in.CellStart = append(in.CellStart, int32(len(in.CellNodes)))
		for k := int32(0); k < 3; k++ {
			if s := tr.seg[3*t+k]; s != noSeg {
				in.Edges = append(in.Edges, mesh.TaggedEdge{A: tr.v[3*t+k], B: tr.v[next(3*t+k)], Tag: s})
			}
		}
	}
	return in
}
