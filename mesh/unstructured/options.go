package unstructured

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"
)

// Defaults of Options.
const (
	// DefaultMinAngle is the minimum-angle target in degrees. Ruppert's
	// algorithm is proved to end for targets up to 20.7°; with concentric
	// shells it ends in practice up to about 33° (Shewchuk 2002), and 25°
	// is a common default.
	DefaultMinAngle = 25.0
	// MaxMinAngle is the largest minimum-angle target accepted.
	MaxMinAngle = 33.0
	// MaxGrowth is the largest cell-size growth ratio accepted.
	MaxGrowth = 10.0
	// MaxLayerGrowth is the largest height ratio of consecutive boundary
	// layers accepted, and MaxLayerCount the most layers of one request.
	MaxLayerGrowth = 3.0
	MaxLayerCount  = 200
	// DefaultGrowth is the cell-size growth ratio away from walls (common
	// practice: 1.1 to 1.3).
	DefaultGrowth = 1.2
	// DefaultMaxCells is the cell-count limit checked before and during
	// refinement.
	DefaultMaxCells = 50_000_000
)

// RegionShape says what a refinement Region covers.
type RegionShape int

// Refinement region shapes.
const (
	// Box is the axis-aligned rectangle Min–Max.
	Box RegionShape = iota
	// Circle is the disc of Radius about Center.
	Circle
	// NearTag is every point within Distance of the boundary faces
	// tagged Tag.
	NearTag
)

func (s RegionShape) String() string {
	switch s {
	case Box:
		return "box"
	case Circle:
		return "circle"
	case NearTag:
		return "near-tag"
	}
	return fmt.Sprintf("RegionShape(%d)", int(s))
}

// Region asks for cells no larger than Size inside an area; outside it
// the size grows from Size at the growth ratio.
type Region struct {
	Shape    RegionShape
	Min, Max orb.Point // Box
	Center   orb.Point // Circle
	Radius   float64   // Circle
	Tag      string    // NearTag
	Distance float64   // NearTag
	Size     float64
}

// Layers asks for quadrilateral boundary layers on the walls tagged Tags.
// Layers get fewer (down to none) where they would come within reach of
// another boundary or of other layers. Where a wall ends beside an edge
// that is not a wall, within 50° of the layer normal, the layers grow
// along that edge's first piece (up to 45% of its length); otherwise they
// taper to nothing at the wall's end. Beside the walls' corners and
// tapering ends the mesher adds wall points, the spacing falling from
// the outline's to one set by the layer heights, so that the layer cells
// there stay within the everyday quality limits; the outline's own
// points stay. MeshWithReport says how many layers each request got, and
// why fewer where fewer (LayerReport).
type Layers struct {
	// Tags are the boundary tags the layers grow from.
	Tags []string
	// FirstHeight is the height of the first cell at the wall (> 0).
	FirstHeight float64
	// Growth is the height ratio of consecutive layers; 0 means
	// DefaultGrowth.
	Growth float64
	// Count is the number of layers; when 0, Thickness decides.
	Count int
	// Thickness is the total layer thickness, used when Count is 0: as
	// many layers as fit below it.
	Thickness float64
}

// Options controls the unstructured mesher. The zero value is valid and
// gives the defaults.
type Options struct {
	// MinAngle is the minimum-angle target in degrees, 0 for
	// DefaultMinAngle; at most MaxMinAngle. Triangles at input corners
	// sharper than it keep the corner's angle.
	MinAngle float64
	// Growth is the cell-size growth ratio away from walls (≥ 1), 0 for
	// DefaultGrowth.
	Growth float64
	// MaxSize is the global maximum cell size (edge length), 0 for none.
	MaxSize float64
	// Regions are refinement regions with their own sizes.
	Regions []Region
	// Layers are the boundary-layer requests, one per set of wall tags.
	Layers []Layers
	// QuadDominant pairs triangles into quadrilaterals where that
	// improves the angle quality.
	QuadDominant bool
	// MaxCells is the largest cell count allowed, 0 for DefaultMaxCells.
	MaxCells int
}

// withDefaults returns the options with zero fields replaced by defaults,
// or an error naming the field that is out of range.
func (o Options) withDefaults() (Options, error) {
	if o.MinAngle == 0 {
		o.MinAngle = DefaultMinAngle
	}
	if !(o.MinAngle > 0 && o.MinAngle <= MaxMinAngle) {
		return o, fmt.Errorf("minimum angle %v°: must be above 0 and at most %v°", o.MinAngle, MaxMinAngle)
	}
	if o.Growth == 0 {
		o.Growth = DefaultGrowth
	}
	if !(o.Growth >= 1 && o.Growth <= MaxGrowth) {
		return o, fmt.Errorf("growth ratio %v: must be between 1 and %v", o.Growth, MaxGrowth)
	}
	if o.MaxSize < 0 || math.IsNaN(o.MaxSize) {
		return o, fmt.Errorf("maximum size %v: must be positive, or 0 for no limit", o.MaxSize)
	}
	if o.MaxSize == 0 {
		o.MaxSize = math.Inf(1)
	}
	if o.MaxCells == 0 {
		o.MaxCells = DefaultMaxCells
	}
	if o.MaxCells < 0 {
		return o, fmt.Errorf("maximum cell count %d: must be positive", o.MaxCells)
	}
	for i, r := range o.Regions {
		if !(r.Size > 0) || math.IsInf(r.Size, 0) {
			return o, fmt.Errorf("region %d (%v): size %v must be positive and finite", i, r.Shape, r.Size)
		}
		switch r.Shape {
		case Box:
			if !(r.Max[0] >= r.Min[0] && r.Max[1] >= r.Min[1]) {
				return o, fmt.Errorf("region %d (box): max corner %v must not be below min corner %v", i, r.Max, r.Min)
			}
		case Circle:
			if !(r.Radius >= 0) {
				return o, fmt.Errorf("region %d (circle): radius %v must not be negative", i, r.Radius)
			}
		case NearTag:
			if r.Tag == "" || !(r.Distance >= 0) {
				return o, fmt.Errorf("region %d (near-tag): needs a tag and a distance ≥ 0, got %q and %v", i, r.Tag, r.Distance)
			}
		default:
			return o, fmt.Errorf("region %d: unknown shape %v; valid shapes are box, circle, near-tag", i, r.Shape)
		}
	}
	for i := range o.Layers {
		l := &o.Layers[i]
		if l.Growth == 0 {
			l.Growth = DefaultGrowth
		}
		switch {
		case len(l.Tags) == 0:
			return o, fmt.Errorf("layers %d: no wall tags given", i)
		case !(l.FirstHeight > 0) || math.IsInf(l.FirstHeight, 0):
			return o, fmt.Errorf("layers %d (tags %v): first-cell height %v must be positive", i, l.Tags, l.FirstHeight)
		case !(l.Growth >= 1 && l.Growth <= MaxLayerGrowth):
			return o, fmt.Errorf("layers %d (tags %v): growth ratio %v must be between 1 and %v", i, l.Tags, l.Growth, MaxLayerGrowth)
		case l.Count < 0 || l.Count > MaxLayerCount:
			return o, fmt.Errorf("layers %d (tags %v): count %d must be between 0 and %d", i, l.Tags, l.Count, MaxLayerCount)
		case l.Count == 0 && !(l.Thickness >= l.FirstHeight):
			return o, fmt.Errorf("layers %d (tags %v): give a count, or a total thickness of at least the first height %v (got %v)", i, l.Tags, l.FirstHeight, l.Thickness)
		}
	}
	return o, nil
}
