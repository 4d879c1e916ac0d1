package quality

import (
	"math"
	"testing"

	"github.com/paulmach/orb"
)

// A uniform square grid is orthogonal and unskewed: each centroid line
// runs along the face normal through the face midpoint (common practice,
// by symmetry), so non-orthogonality and skewness are zero on every face.
func TestUniformGridOrthogonal(t *testing.T) {
	m := build(t, gridNodes(8, 6, orb.Point{-3, 2}, orb.Point{0.25, 0}, orb.Point{0, 0.25}, 0), quadCells(8, 6, false), true)
	r := evaluate(t, m)
	for _, name := range []string{"non_orthogonality", "skewness"} {
		for f, v := range faceField(t, r, name) {
			if v > 1e-12 {
				t.Errorf("%s of face %d = %g, want 0", name, f, v)
			}
		}
	}
	for c, v := range field(t, r, "growth") {
		if v != 1 {
			t.Errorf("growth of cell %d = %g, want 1", c, v)
		}
	}
	if r.Verdict != Pass {
		t.Errorf("uniform grid verdict %s", r.Verdict)
	}
}

func faceField(t *testing.T, r *Report, name string) []float64 {
	for _, f := range r.FaceFields {
		if f.Name == name {
			return f.Values
		}
	}
	t.Fatalf("no face field %q", name)
	return nil
}

// Closure and free-stream preservation hold to rounding on every cell of
// perturbed triangle, quad and mixed meshes, also far from the origin:
// Σ S n over a closed polygon is zero (divergence theorem), so the
// residual of a uniform flux is zero up to rounding (thresholds from the
// issue: 1e-14 closure, 1e-13 free-stream).
func TestClosureAndFreeStream(t *testing.T) {
	for _, tc := range []struct {
		name string
		tri  bool
		o    orb.Point
	}{{"quads", false, orb.Point{0, 0}}, {"triangles", true, orb.Point{0, 0}}, {"triangles far away", true, orb.Point{1e5, -2e5}}} {
		t.Run(tc.name, func(t *testing.T) {
			m := build(t, gridNodes(20, 15, tc.o, orb.Point{0.1, 0.02}, orb.Point{-0.01, 0.1}, 0.3), quadCells(20, 15, tc.tri), true)
			r := evaluate(t, m)
			for c, v := range field(t, r, "closure") {
				if !(v < 1e-14) {
					t.Fatalf("closure of cell %d = %g", c, v)
				}
			}
			for c, v := range field(t, r, "free_stream") {
				if !(v < 1e-13) {
					t.Fatalf("free-stream residual of cell %d = %g", c, v)
				}
			}
			for v, x := range r.NodeFields[0].Values {
				if !(x < 1e-14) {
					t.Fatalf("dual closure of node %d = %g", v, x)
				}
			}
			if b := float64(r.Audit.BoundaryClosure); !(b < 1e-14) {
				t.Errorf("boundary closure %g", b)
			}
			if s, _ := r.Metric("free_stream"); !(float64(s.RMS) <= float64(s.Max)) {
				t.Errorf("rms %g above max %g", s.RMS, s.Max)
			}
		})
	}
}

// On a parallelogram grid the centroids of two neighbours are images of
// each other under the point reflection through their shared face's
// midpoint, so the centroid line crosses the face at its midpoint and
// Green–Gauss with linear interpolation is exact for a linear field
// (common practice). The grid is sheared 30° and stretched; the issue asks
// for 1e-12.
func TestGreenGaussParallelogram(t *testing.T) {
	a := orb.Point{0.2, 0}
	b := orb.Point{0.05 * math.Tan(math.Pi/6), 0.05}
	m := build(t, gridNodes(12, 9, orb.Point{10, 20}, a, b, 0), quadCells(12, 9, false), true)
	r := evaluate(t, m)
	for c, v := range field(t, r, "gradient_error") {
		if !(v < 1e-12) {
			t.Errorf("Green–Gauss error of cell %d = %g", c, v)
		}
	}
	// The non-orthogonality of the j-faces is the shear angle, 30°, on
	// interior faces (the centroid line runs along b, the normal along y).
	no := faceField(t, r, "non_orthogonality")
	seen := false
	for f := 0; f < m.NumInterior; f++ {
		if n := m.Geo.FaceNormal[f]; math.Abs(n[0]) < 1e-12 {
			seen = true
			if !near(no[f], 30, 1e-9) {
				t.Errorf("face %d non-orthogonality %g, want 30", f, no[f])
			}
		}
	}
	if !seen {
		t.Fatal("no horizontal faces found")
	}
}

// On a perturbed triangle mesh the centroid line misses the face midpoints
// and the cell-centred Green–Gauss gradient is no longer exact: the audit
// must see that (a check that it can fail), while the nodal closure stays
// at rounding level.
func TestGreenGaussSeesSkewness(t *testing.T) {
	m := build(t, gridNodes(10, 10, orb.Point{0, 0}, orb.Point{0.1, 0}, orb.Point{0, 0.1}, 0.3), quadCells(10, 10, true), true)
	r := evaluate(t, m)
	s, _ := r.Metric("gradient_error")
	k, _ := r.Metric("skewness")
	if !(float64(s.Max) > 1e-3) || !(float64(k.Max) > 1e-2) {
		t.Errorf("perturbed mesh: gradient error max %g, skewness max %g; both should be clearly non-zero", s.Max, k.Max)
	}
}

// A mixed mesh of quads, triangles and a hexagon (two quads merged, so two
// of its nodes sit on straight sides) keeps closure and free-stream at
// rounding level, and the hexagon is measured as the 1 × 0.5 rectangle its
// four true corners span (cellShape, "Straight corners"): equiangle
// skewness 0 and aspect ratio (1 + 1)/(0.5 + 0.5) = 2 (hand computation).
func TestMixedCells(t *testing.T) {
	nodes := gridNodes(4, 2, orb.Point{5, 5}, orb.Point{0.5, 0}, orb.Point{0, 0.5}, 0)
	id := func(i, j int) int32 { return int32(j*5 + i) }
	cells := [][]int32{
		{id(0, 0), id(1, 0), id(2, 0), id(2, 1), id(1, 1), id(0, 1)}, // hexagon
		{id(2, 0), id(3, 0), id(3, 1), id(2, 1)},
		{id(3, 0), id(4, 0), id(4, 1)}, {id(3, 0), id(4, 1), id(3, 1)},
	}
	for i := 0; i < 4; i++ {
		cells = append(cells, []int32{id(i, 1), id(i+1, 1), id(i+1, 2), id(i, 2)})
	}
	m := build(t, nodes, cells, true)
	r := evaluate(t, m)
	if e := field(t, r, "equiangle_skewness")[0]; !near(e, 0, 1e-12) {
		t.Errorf("hexagon equiangle skewness %g, want 0", e)
	}
	if a := field(t, r, "aspect_ratio")[0]; !near(a, 2, 1e-12) {
		t.Errorf("hexagon aspect ratio %g, want 2", a)
	}
	if a := field(t, r, "area")[0]; !near(a, 0.5, 1e-14) {
		t.Errorf("hexagon area %g, want 0.5", a)
	}
	for c := range cells {
		if v := field(t, r, "closure")[c]; !(v < 1e-14) {
			t.Errorf("closure of cell %d = %g", c, v)
		}
		if v := field(t, r, "free_stream")[c]; !(v < 1e-13) {
			t.Errorf("free-stream residual of cell %d = %g", c, v)
		}
	}
	// The hexagon's top face is split by node (1,1) into two faces, both
	// shared with quads above: every cell edge is a face, no hanging node.
	for _, c := range r.Connectivity {
		if c.Count != 0 {
			t.Errorf("%s: %+v", c.Name, c.Problems)
		}
	}
}

// The metric constants of the cell sweep line up with metricDefs.
func TestMetricOrder(t *testing.T) {
	want := map[int]string{mArea: "area", mFaceLength: "face_length", mAspect: "aspect_ratio", mMinAngle: "min_angle",
		mMaxAngle: "max_angle", mEquiangle: "equiangle_skewness", mJacobian: "scaled_jacobian", mNonOrth: "non_orthogonality",
		mSkewness: "skewness", mGrowth: "growth", mClosure: "closure", mFreeStream: "free_stream", mGradient: "gradient_error",
		numCellMetrics: "dual_closure"}
	for k, name := range want {
		if metricDefs[k].name != name {
			t.Errorf("metricDefs[%d] = %s, want %s", k, metricDefs[k].name, name)
		}
	}
	if len(metricDefs) != numCellMetrics+1 {
		t.Errorf("%d metric definitions", len(metricDefs))
	}
}
