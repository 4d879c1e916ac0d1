package deck

import (
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"

	"cvdeck/export/manifest"
	"cvdeck/quality"
)

// deckFile matches the name of every file cvdeck writes into a deck or a
// check folder (see writeDeck and writeCheck): mesh.cgns, mesh.vtu,
// boundary.vtp, mesh.vtk, mesh-binary.vtk, blocks.vtm and blocks_K.vts,
// preview.svg, preview.png, quality.json and the manifest.
var deckFile = regexp.MustCompile(`^(mesh\.(cgns|vtu|vtk)|mesh-binary\.vtk|boundary\.vtp|blocks\.vtm|blocks_[0-9]+\.vts|preview\.(svg|png)|quality\.json|` + regexp.QuoteMeta(manifest.FileName) + `)$`)

// checkOutDir refuses, before anything is computed, an output folder that
// writing a deck or a check into would lose data: a run replaces its
// folder as a whole (see atomic.ReplaceDir), so dir must not hold any of
// the inputs, and if it exists it must hold nothing but files cvdeck
// writes there, as an earlier deck or check does. A folder with a case
// file, a sketch, notes or a solver's output in it is left alone, and the
// error names what is there. what names the run for the message ("deck",
// "check").
func checkOutDir(dir string, inputs []string, what string) error {
	for _, in := range inputs {
		inside, err := within(in, dir)
		if err != nil {
			return fmt.Errorf("%w: output folder %s: %w", ErrInput, dir, err)
		}
		if inside {
			return fmt.Errorf("%w: %s lies inside %s, which the %s would replace as a whole; write the %s to another folder", ErrInput, in, dir, what, what)
		}
	}
	ents, err := os.ReadDir(dir)
	if os.IsNotExist(err) {
		return nil
	}
	if err != nil {
		if fi, serr := os.Stat(dir); serr == nil && !fi.IsDir() {
			return fmt.Errorf("%w: output folder %s exists and is not a folder", ErrInput, dir)
		}
		return fmt.Errorf("%w: output folder %s: %w", ErrInput, dir, err)
	}
	var foreign []string
	for _, e := range ents {
		if e.IsDir() || !deckFile.MatchString(e.Name()) {
			foreign = append(foreign, e.Name())
		}
	}
	if len(foreign) == 0 {
		return nil
	}
	list := strings.Join(foreign[:min(3, len(foreign))], ", ")
	if len(foreign) > 3 {
		list += fmt.Sprintf(" and %d more", len(foreign)-3)
	}
	return fmt.Errorf("%w: output folder %s holds %s, which cvdeck did not write there; the %s replaces its folder as a whole, so give a new or empty folder, or one that holds an earlier %s only", ErrInput, dir, list, what, what)
}

// inputPaths returns the paths of the files the case read, the case file
// first.
func (c *Case) inputPaths() []string {
	// A bare sketch's case is made in memory: its file is the sketch.
	paths := []string{c.File}
	if c.sketch != "" {
		paths[0] = c.sketch
	}
	for _, in := range c.Inputs {
		p := in.Path
		if !filepath.IsAbs(p) {
			p = filepath.Join(c.Dir, p)
		}
		paths = append(paths, p)
	}
	return paths
}

// AddLimitsFile reads a limits file (--limits) for a run of the case and
// records it among the case's inputs, so that the deck's manifest lists it
// and its input hash, by which a sweep decides whether a deck is current,
// changes with it. The returned patch goes in RunOptions.Limits.
func (c *Case) AddLimitsFile(path string) (*quality.Patch, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("%w: limits file: %w", ErrInput, err)
	}
	p, err := quality.LoadPatch(path)
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrInput, err)
	}
	rel := path
	if a, err := filepath.Abs(path); err == nil {
		if d, err := filepath.Abs(c.Dir); err == nil {
			if r, err := filepath.Rel(d, a); err == nil {
				rel = filepath.ToSlash(r)
			}
		}
	}
	c.Inputs = append(c.Inputs, InputFile{Path: rel, SHA256: hashBytes(data)})
	c.InputHash = c.hashInputs()
	return &p, nil
}
