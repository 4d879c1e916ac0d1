package deck

import (
	"fmt"
	"math"
	"runtime"
	"sort"
	"strings"
	"sync"

	"cvdeck/geometry"
	"cvdeck/mesh"
	"cvdeck/mesh/structured"
)

// smoothSpec is a block's elliptic smoothing request.
type smoothSpec struct {
	opt structured.SmoothOptions
	at  value
}

// decodeSmooth reads a block's smoothing settings:
//
//	smooth:
//	  iterations: 3000       # most sweeps (default 5000)
//	  tolerance: 1e-7        # stop when the largest move over the local cell size is below it (default 1e-6)
//	  south: {first_height: 0.5, orthogonal: true}   # hold the wall spacing and right angles
//	  north: {first_yplus: 1, orthogonal: true}      # the height from a y+ and the reference state
//	  east: {slide: true}    # nodes slide along the side
//
// Sides not named stay fixed, without control.
func decodeSmooth(c *Case, v value) (*smoothSpec, error) {
	o, err := v.object()
	if err != nil {
		return nil, err
	}
	ss := &smoothSpec{at: v}
	if x, ok := o.get("iterations"); ok {
		if ss.opt.MaxIterations, err = x.count(1); err != nil {
			return nil, err
		}
	}
	if x, ok := o.get("tolerance"); ok {
		if ss.opt.Tolerance, err = x.positive(); err != nil {
			return nil, err
		}
	}
	for s := mesh.South; s <= mesh.West; s++ {
		sv, ok := o.get(s.String())
		if !ok {
			continue
		}
		so, err := sv.object()
		if err != nil {
			return nil, err
		}
		var sc structured.SideControl
		if x, ok := so.get("slide"); ok {
			slide, err := x.boolean()
			if err != nil {
				return nil, err
			}
			if slide {
				sc.Mode = structured.Slide
			}
		}
		key, x, err := so.either("first_height", "first_yplus", "each sets the height of the cells at the side")
		if err != nil {
			return nil, err
		}
		switch key {
		case "first_height":
			if sc.FirstHeight, err = x.positiveLength(); err != nil {
				return nil, err
			}
			sc.FirstHeight /= c.Refine
		case "first_yplus":
			h, err := c.wallHeight(x)
			if err != nil {
				return nil, err
			}
			sc.FirstHeight = h / c.Refine
		}
		if x, ok := so.get("orthogonal"); ok {
			if sc.Orthogonal, err = x.boolean(); err != nil {
				return nil, err
			}
		}
		if sc.Mode == structured.Slide && (sc.FirstHeight > 0 || sc.Orthogonal) {
			return nil, sv.errf("a sliding side cannot also hold a first height or orthogonality; those controls need a fixed side")
		}
		if err := so.done(); err != nil {
			return nil, err
		}
		ss.opt.Sides[s] = sc
	}
	return ss, o.done()
}

// growSpec is one hyperbolically marched block (or C-grid family).
type growSpec struct {
	shape string // "o", "c" or "open"
	from  *curveSpec
	opt   structured.MarchOptions
	wake  structured.WakeOptions
	at    value
}

// decodeGrow reads a body-fitted grid grown by hyperbolic marching:
//
//	grow:
//	  - name: wing-grid
//	    from: wing             # a loop (shape o, c) or a curve (shape open)
//	    shape: o               # o: O-grid round a closed body; c: C-grid with a wake cut; open: off an open wall
//	    first_height: 1e-5     # or first_yplus: 1 (with a reference state)
//	    growth: 1.12           # two of growth, layers, outer_distance
//	    outer_distance: 20 * chord
//	    outer_tag: farfield
//	    start_tag: inflow      # open and c: the tags of the two end lines
//	    end_tag: outflow
//	    wake: {length: 10 * chord, cells: 40}   # c only
//	    dissipation: 0.5       # smoothing of the march (default 0.5)
func decodeGrow(c *Case, v value, index int) (growSpec, error) {
	o, err := v.object()
	if err != nil {
		return growSpec{}, err
	}
	gs := growSpec{at: v, shape: "o"}
	gs.opt.Name = fmt.Sprintf("grown%d", index+1)
	if x, ok := o.get("name"); ok {
		if gs.opt.Name, err = x.str(); err != nil {
			return gs, err
		}
	}
	fv, err := o.need("from")
	if err != nil {
		return gs, err
	}
	name, err := fv.str()
	if err != nil {
		return gs, err
	}
	if gs.from, err = c.Geometry.curve(fv, name); err != nil {
		return gs, err
	}
	if x, ok := o.get("shape"); ok {
		if gs.shape, err = x.oneOf("o", "c", "open"); err != nil {
			return gs, err
		}
	}
	if gs.shape != "open" && !gs.from.closed {
		return gs, fv.errf("%q is an open curve; an %s-grid grows round a loop (shape: open grows off an open wall)", name, gs.shape)
	}
	r := c.Refine
	key, hv, err := o.either("first_height", "first_yplus", "each sets the height of the first cell off the body")
	if err != nil {
		return gs, err
	}
	switch key {
	case "first_height":
		if gs.opt.FirstHeight, err = hv.positiveLength(); err != nil {
			return gs, err
		}
	case "first_yplus":
		if gs.opt.FirstHeight, err = c.wallHeight(hv); err != nil {
			return gs, err
		}
	default:
		return gs, v.errf("a grown grid needs the first cell height: first_height (case units) or first_yplus (with a reference state), one of them")
	}
	gs.opt.FirstHeight /= r
	if x, ok := o.get("growth"); ok {
		if gs.opt.Growth, err = x.positive(); err != nil {
			return gs, err
		}
		gs.opt.Growth = math.Pow(gs.opt.Growth, 1/r)
	}
	if x, ok := o.get("layers"); ok {
		n, err := x.count(1)
		if err != nil {
			return gs, err
		}
		gs.opt.Layers = max(1, int(math.Round(float64(n)*r)))
	}
	if x, ok := o.get("outer_distance"); ok {
		if gs.opt.OuterDistance, err = x.positiveLength(); err != nil {
			return gs, err
		}
	}
	tv, err := o.need("outer_tag")
	if err != nil {
		return gs, err
	}
	if gs.opt.OuterTag, err = tv.str(); err != nil {
		return gs, err
	}
	c.noteTag(gs.opt.OuterTag, tv)
	if gs.shape != "o" {
		for _, k := range []struct {
			key string
			dst *string
		}{{"start_tag", &gs.opt.StartTag}, {"end_tag", &gs.opt.EndTag}} {
			x, err := o.need(k.key)
			if err != nil {
				return gs, err
			}
			if *k.dst, err = x.str(); err != nil {
				return gs, err
			}
			c.noteTag(*k.dst, x)
		}
	}
	if x, ok := o.get("dissipation"); ok {
		if gs.opt.Dissipation, err = x.positive(); err != nil {
			return gs, err
		}
	}
	if gs.shape == "c" {
		wv, err := o.need("wake")
		if err != nil {
			return gs, err
		}
		wo, err := wv.object()
		if err != nil {
			return gs, err
		}
		lv, err := wo.need("length")
		if err != nil {
			return gs, err
		}
		if gs.wake.Length, err = lv.positiveLength(); err != nil {
			return gs, err
		}
		if x, ok := wo.get("cells"); ok {
			n, err := x.count(1)
			if err != nil {
				return gs, err
			}
			gs.wake.Cells = max(1, int(math.Round(float64(n)*r)))
		}
		if x, ok := wo.get("growth"); ok {
			if gs.wake.Growth, err = x.positive(); err != nil {
				return gs, err
			}
			gs.wake.Growth = math.Pow(gs.wake.Growth, 1/r)
		}
		if err := wo.done(); err != nil {
			return gs, err
		}
	}
	// Check the layer plan now, so that a first height above the outer
	// distance is an input error located here.
	if _, err := gs.opt.Plan(); err != nil {
		return gs, v.wrap(err)
	}
	return gs, o.done()
}

// estimate returns the cells the grown grid will have, before marching.
func (gs *growSpec) estimate() (int, error) {
	plan, err := gs.opt.Plan()
	if err != nil {
		return 0, gs.at.wrap(err)
	}
	n := 0
	for _, seg := range gs.from.segments {
		k, err := seg.Attr().Spacing.NodeCount(seg.Length())
		if err != nil {
			return 0, gs.at.wrap(err)
		}
		n += k - 1
	}
	if gs.shape == "c" {
		n += 2 * max(gs.wake.Cells, 1)
	}
	return n * plan.Layers, nil
}

// build marches the grid and returns its blocks and a note for the
// manifest.
func (gs *growSpec) build() ([]*structured.Block, string, error) {
	var blocks []*structured.Block
	var rep structured.MarchReport
	switch gs.shape {
	case "o":
		loop := geometry.Loop{Name: gs.from.name, Segments: gs.from.segments}
		d, _, err := loop.Discretise()
		if err != nil {
			return nil, "", gs.at.wrap(err)
		}
		b, r, err := structured.MarchClosed(d, gs.opt)
		if err != nil {
			return nil, "", gs.at.wrap(err)
		}
		blocks, rep = []*structured.Block{b}, r
	case "open", "c":
		ch, err := geometry.DiscretiseChain(gs.from.segments)
		if err != nil {
			return nil, "", gs.at.wrap(err)
		}
		if gs.shape == "open" {
			b, r, err := structured.MarchOpen(ch, gs.opt)
			if err != nil {
				return nil, "", gs.at.wrap(err)
			}
			blocks, rep = []*structured.Block{b}, r
		} else {
			bs, r, err := structured.MarchCGrid(ch, gs.wake, gs.opt)
			if err != nil {
				return nil, "", gs.at.wrap(err)
			}
			blocks, rep = bs, r
		}
	}
	note := fmt.Sprintf("grid %q grown from %q (%s-grid): %d layers, growth %.4g, outer distance %.4g m; %d layers needed extra dissipation",
		gs.opt.Name, gs.from.name, gs.shape, rep.Layers, rep.Growth, rep.OuterDistance, rep.Retried)
	return blocks, note, nil
}

// buildStructured builds the case's structured mesh (see
// meshSpec.buildStructured) and checks, before anything is written, that
// it fills the outline the case gives (see checkCover); the notes are the
// build's, the check's, then those on the block sides (sideNotes).
func (c *Case) buildStructured() (*mesh.Mesh, []string, error) {
	m, notes, err := c.Mesh.buildStructured()
	if err != nil {
		return nil, nil, err
	}
	more, err := c.checkCover(m)
	if err != nil {
		return nil, nil, err
	}
	notes = append(notes, more...)
	return m, append(notes, c.sideNotes(m)...), nil
}

// buildStructured meshes the blocks by transfinite interpolation (then
// elliptic smoothing where asked), grows the hyperbolic grids, and joins
// them all into one face-based mesh. Notes say how smoothing and marching
// went, for the manifest.
func (ms *meshSpec) buildStructured() (*mesh.Mesh, []string, error) {
	n, err := ms.estimateCells()
	if err != nil {
		return nil, nil, err
	}
	for i := range ms.grow {
		k, err := ms.grow[i].estimate()
		if err != nil {
			return nil, nil, err
		}
		n += k
	}
	if n > ms.maxCells {
		return nil, nil, ms.at.errf("the blocks would make %d cells, more than the limit of %d (raise mesh.max_cells in the case file, or --max-cells for one `cvdeck mesh`)", n, ms.maxCells)
	}
	var blocks []*structured.Block
	var notes []string
	for _, bs := range ms.blocks {
		var s [4]geometry.Chain
		for side := range bs.sides {
			if s[side], err = sideChain(bs.sides[side]); err != nil {
				return nil, nil, err
			}
		}
		blk, err := structured.TFI(structured.BlockSides{Name: bs.name, South: s[mesh.South], East: s[mesh.East], North: s[mesh.North], West: s[mesh.West]})
		if err != nil {
			return nil, nil, bs.at.wrap(blockError(bs.name, err))
		}
		blocks = append(blocks, blk)
	}
	if err := ms.smoothBlocks(blocks, &notes); err != nil {
		return nil, nil, err
	}
	for i := range ms.grow {
		bs, note, err := ms.grow[i].build()
		if err != nil {
			return nil, nil, err
		}
		blocks = append(blocks, bs...)
		notes = append(notes, note)
	}
	m, err := structured.Assemble(blocks, structured.AssembleOptions{})
	if err != nil {
		return nil, nil, ms.at.wrap(inMetres(err, ms.at.d.scale))
	}
	return m, notes, nil
}

// smoothBlocks smooths the blocks that ask for it. Each block is smoothed
// with its sides held, unless the case says smooth_across_interfaces:
// then the smoothed blocks are smoothed together and the sides they share
// move with them (grid lines cross the interfaces without a kink); a side
// shared with a block that is not smoothed stays put either way. Where
// three or more blocks meet at a corner, moving the shared sides can skew
// the cells next to it, so joint smoothing is a choice, not the default.
func (ms *meshSpec) smoothBlocks(blocks []*structured.Block, notes *[]string) error {
	var smoothed []*structured.Block
	var opts []structured.SmoothOptions
	var which []int
	for b, bs := range ms.blocks {
		if bs.smooth != nil {
			smoothed = append(smoothed, blocks[b])
			opts = append(opts, bs.smooth.opt)
			which = append(which, b)
		}
	}
	if len(smoothed) == 0 {
		return nil
	}
	var results []structured.SmoothResult
	if ms.jointSmooth {
		r, err := structured.SmoothBlocks(smoothed, opts)
		if err != nil {
			return ms.blocks[which[0]].smooth.at.wrap(err)
		}
		results = r
	} else {
		// Blocks smoothed apart are independent: each moves only its own
		// nodes, its shared sides held. They run side by side, the largest
		// first so that the last to finish is a small one, and the first
		// error in block order is reported, as one after another.
		results = make([]structured.SmoothResult, len(smoothed))
		errs := make([]error, len(smoothed))
		order := make([]int, len(smoothed))
		for k := range order {
			order[k] = k
		}
		size := func(k int) int { return smoothed[k].NI * smoothed[k].NJ }
		sort.SliceStable(order, func(a, b int) bool { return size(order[a]) > size(order[b]) })
		next := make(chan int, len(smoothed))
		for _, k := range order {
			next <- k
		}
		close(next)
		var wg sync.WaitGroup
		for range min(runtime.GOMAXPROCS(0), len(smoothed)) {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for k := range next {
					results[k], errs[k] = structured.Smooth(smoothed[k], opts[k])
				}
			}()
		}
		wg.Wait()
		for k, err := range errs {
			if err != nil {
				bs := ms.blocks[which[k]]
				return bs.smooth.at.wrap(blockError(bs.name, err))
			}
		}
	}
	for k, r := range results {
		*notes = append(*notes, smoothNote(ms.blocks[which[k]].name, r))
	}
	return nil
}

// blockError names the block in a mesher's error, unless the mesher's
// message names it already (most do), so that it is named once.
func blockError(name string, err error) error {
	if strings.Contains(err.Error(), fmt.Sprintf("block %q", name)) {
		return err
	}
	return fmt.Errorf("block %q: %w", name, err)
}

// smoothNote says how a block's smoothing went.
func smoothNote(block string, r structured.SmoothResult) string {
	s := fmt.Sprintf("block %q smoothed: %d iterations, final residual %.3g", block, r.Iterations, r.Residual)
	if !r.Converged {
		s += " (not converged to the tolerance)"
	}
	if r.Damped > 0 {
		s += fmt.Sprintf("; %d updates damped to keep cells from folding", r.Damped)
	}
	if r.FoldedAtStart > 0 {
		s += fmt.Sprintf("; %d cells folded by TFI were untangled", r.FoldedAtStart)
	}
	if r.HeightError > 0 {
		s += fmt.Sprintf("; first-cell height within %.2g%% of the request (mean %.2g%%)", 100*r.HeightError, 100*r.MeanHeightError)
	}
	if r.AngleError > 0 {
		s += fmt.Sprintf("; wall angle within %.2g° of 90° at the inner nodes of its orthogonal sides (mean %.2g°), %.3g° at their ends, where the next side of the block (an interface or another boundary) leaves them", r.AngleError, r.MeanAngleError, r.EndAngleError)
	}
	return s
}
