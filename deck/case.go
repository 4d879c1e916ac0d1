// Package deck is cvdeck's pipeline: it loads a case file (parameters,
// expressions, geometry, mesh settings, boundary conditions, reference state,
// limits, outputs), runs geometry → mesh → conditions → checks → export, and
// writes the deck folder. It is the only package that knows the whole
// pipeline; the command line only parses flags and calls it.
package deck

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"runtime/debug"
	"sort"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"

	"cvdeck/internal/yamlerr"
)

// Version is cvdeck's release version.
const Version = "0.1.0"

// Build is Version with the source revision the program was built from,
// when the Go toolchain recorded one (a build inside a git checkout):
// "0.1.0+3f2a9c1b7e4d", the first 12 hex digits of the commit, with
// "-modified" when the checkout had uncommitted changes; Version alone
// otherwise (a test binary, or a build outside a checkout). Every manifest
// records it and every input hash includes it, so that decks made by two
// builds of one version are not taken for each other by a sweep's resume.
var Build = buildID(debug.ReadBuildInfo())

// buildID makes Build from the toolchain's build information.
func buildID(info *debug.BuildInfo, ok bool) string {
	if !ok {
		return Version
	}
	var rev, modified string
	for _, s := range info.Settings {
		switch s.Key {
		case "vcs.revision":
			rev = s.Value
		case "vcs.modified":
			modified = s.Value
		}
	}
	if rev == "" {
		return Version
	}
	id := Version + "+" + rev[:min(12, len(rev))]
	if modified == "true" {
		id += "-modified"
	}
	return id
}

// unitScale gives metres per case length unit. The inch is exactly 0.0254 m
// by the 1959 international yard and pound agreement (common practice).
var unitScale = map[string]float64{"m": 1, "cm": 0.01, "mm": 0.001, "in": 0.0254}

// LoadOptions change how a case is read.
type LoadOptions struct {
	// Params override the case's parameters (from --set or a sweep).
	Params map[string]float64
	// Refine scales every spacing of the case: 2 makes each cell half as
	// long in every direction, 0.5 twice as long. Zero means 1.
	Refine float64
}

// Case is a loaded, fully resolved case: every expression evaluated, every
// length in metres.
type Case struct {
	// File is the case file's path; Dir the folder relative paths start from.
	File, Dir string
	Name      string
	Units     string
	// Params are the resolved parameter values, in case units, and
	// ParamOrder their order of definition.
	Params     map[string]float64
	ParamOrder []string
	Refine     float64

	// Family, when the case file asks for one, is a refinement family:
	// Levels decks, each Ratio times finer than the one before.
	Family *Family

	Geometry   *geometrySpec
	Mesh       *meshSpec
	Boundaries *boundarySpec
	Reference  *referenceSpec
	Checks     *checkSpec
	Outputs    outputSpec

	// Inputs are the files the case read (the case file first) and their
	// SHA-256 hashes; InputHash hashes them together with the parameter
	// values, the refinement factor and the cvdeck build, so that two
	// runs with the same InputHash write the same deck.
	Inputs    []InputFile
	InputHash string

	// sketch is the sketch file when the case was made from one in memory
	// (SketchCase), "" for a case file.
	sketch string
	// yplusNotes are the flat-plate estimate's remarks
	// (bc.WallSpacing.Notes) on the first-cell heights the case sets from
	// a y+ (wallHeight); nil when it sets none. They depend on the
	// reference state and length only, so they are the same for every
	// such height.
	yplusNotes []string
	// tagAt is the first place in the case file that gives each boundary
	// tag to a segment or a grid boundary (see noteTag).
	tagAt map[string]value
}

// Family is a refinement family of one case (the refine section).
type Family struct {
	Levels int
	Ratio  float64
}

// InputFile is one file a case read.
type InputFile struct {
	Path   string `yaml:"path" json:"path"`
	SHA256 string `yaml:"sha256" json:"sha256"`
}

// Load reads and resolves a case file.
func Load(path string, opts LoadOptions) (*Case, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrInput, err)
	}
	return Parse(path, data, opts)
}

// Parse resolves a case from its bytes; path names it in errors and is the
// base for relative file references.
func Parse(path string, data []byte, opts LoadOptions) (*Case, error) {
	var doc yaml.Node
	if err := yaml.Unmarshal(data, &doc); err != nil {
		line, col, msg := yamlerr.Describe(data, err)
		return nil, &InputError{File: path, Line: line, Col: col, Msg: "not valid YAML: " + msg, Err: err}
	}
	if doc.Kind != yaml.DocumentNode || len(doc.Content) == 0 {
		return nil, &InputError{File: path, Line: 1, Col: 1, Msg: "the case file is empty; start from `cvdeck init NAME DIR`"}
	}
	d := &decoder{file: path, scale: 1}
	root := value{d, doc.Content[0], ""}
	top, err := root.object()
	if err != nil {
		if ext := strings.ToLower(filepath.Ext(path)); ext != ".yaml" && ext != ".yml" {
			return nil, fmt.Errorf("%w (cvdeck reads %q files as YAML case files; it knows sketches by their extension: %s)", err, ext, SketchExtensions())
		}
		return nil, err
	}
	c := &Case{File: path, Dir: filepath.Dir(path), Units: "m", Refine: opts.Refine}
	if c.Refine == 0 {
		c.Refine = 1
	}
	if !(c.Refine > 0) {
		return nil, fmt.Errorf("%w: refinement factor must be positive, got %g", ErrInput, c.Refine)
	}
	v, err := top.need("name")
	if err != nil {
		return nil, err
	}
	if c.Name, err = v.str(); err != nil {
		return nil, err
	}
	if v, ok := top.get("units"); ok {
		names := make([]string, 0, len(unitScale))
		for k := range unitScale {
			names = append(names, k)
		}
		sort.Strings(names)
		if c.Units, err = v.oneOf(names...); err != nil {
			return nil, err
		}
	}
	d.scale = unitScale[c.Units]

	var psec *value
	if v, ok := top.get("parameters"); ok {
		psec = &v
	}
	if d.params, c.ParamOrder, err = resolveParams(d, psec, opts.Params); err != nil {
		return nil, err
	}
	c.Params = d.params
	c.Inputs = []InputFile{{Path: filepath.Base(path), SHA256: hashBytes(data)}}

	if v, ok := top.get("reference"); ok {
		if c.Reference, err = decodeReference(v); err != nil {
			return nil, err
		}
	}
	g, err := top.need("geometry")
	if err != nil {
		return nil, err
	}
	if c.Geometry, err = decodeGeometry(c, g); err != nil {
		return nil, err
	}
	m, err := top.need("mesh")
	if err != nil {
		return nil, err
	}
	if c.Mesh, err = decodeMesh(c, m); err != nil {
		return nil, err
	}
	if v, ok := top.get("boundaries"); ok {
		if c.Boundaries, err = decodeBoundaries(c, v); err != nil {
			return nil, err
		}
	}
	if r := c.Reference; r != nil && r.regime != "" && !c.Boundaries.hasNoSlipWall() {
		return nil, r.regimeAt.errf("regime %s applies to the boundary layers of no-slip walls (wall-adiabatic, wall-isothermal), and this case has none: its equations are Euler; remove regime", r.regime)
	}
	// Whole refined counts are chosen once the blocks and periodic pairs
	// that tie segments together are known.
	if err := c.roundCounts(); err != nil {
		return nil, err
	}
	if v, ok := top.get("checks"); ok {
		if c.Checks, err = decodeChecks(v); err != nil {
			return nil, err
		}
	}
	if v, ok := top.get("refine"); ok {
		if c.Family, err = decodeFamily(v); err != nil {
			return nil, err
		}
	}
	if c.Outputs, err = decodeOutputs(c, top); err != nil {
		return nil, err
	}
	if err := top.done(); err != nil {
		return nil, err
	}
	c.InputHash = c.hashInputs()
	return c, nil
}

// hashInputs combines the input file hashes, parameter values, refinement
// factor and version into one SHA-256.
func (c *Case) hashInputs() string {
	var b bytes.Buffer
	fmt.Fprintf(&b, "cvdeck %s\n", Build)
	for _, f := range c.Inputs {
		fmt.Fprintf(&b, "file %s %s\n", f.Path, f.SHA256)
	}
	for _, k := range c.ParamOrder {
		fmt.Fprintf(&b, "param %s %s\n", k, strconv.FormatFloat(c.Params[k], 'g', -1, 64))
	}
	fmt.Fprintf(&b, "refine %s\n", strconv.FormatFloat(c.Refine, 'g', -1, 64))
	return hashBytes(b.Bytes())
}

func hashBytes(b []byte) string {
	h := sha256.Sum256(b)
	return hex.EncodeToString(h[:])
}

// readInput reads a file the case refers to, relative to the case folder,
// and records its hash.
func (c *Case) readInput(at value, rel string) ([]byte, string, error) {
	p := rel
	if !filepath.IsAbs(p) {
		p = filepath.Join(c.Dir, rel)
	}
	data, err := os.ReadFile(p)
	if err != nil {
		return nil, "", at.errf("cannot read %q: %v", rel, err)
	}
	c.Inputs = append(c.Inputs, InputFile{Path: rel, SHA256: hashBytes(data)})
	return data, p, nil
}

// MaxFamilyLevels is the most levels of a refinement family, in a case
// file or a sweep file: at ratio 2 the eighth level has 2^14 = 16384
// times the cells of the first.
const MaxFamilyLevels = 8

// decodeFamily reads a refinement family, refine: {levels: 3, ratio: 2}:
// level 1 as written and each next level ratio times finer in every
// direction. Celik et al. (2008, J. Fluids Eng. 130, 078001) ask for a
// ratio above 1.3 between the levels of a grid-convergence study.
func decodeFamily(v value) (*Family, error) {
	o, err := v.object()
	if err != nil {
		return nil, err
	}
	lv, err := o.need("levels")
	if err != nil {
		return nil, err
	}
	f := &Family{}
	n, err := lv.number()
	if err != nil {
		return nil, err
	}
	if n != math.Trunc(n) || n < 2 || n > MaxFamilyLevels {
		return nil, lv.errf("must be a whole number from 2 to %d, got %g", MaxFamilyLevels, n)
	}
	f.Levels = int(n)
	rv, err := o.need("ratio")
	if err != nil {
		return nil, err
	}
	if f.Ratio, err = rv.number(); err != nil {
		return nil, err
	}
	if !(f.Ratio > 1) || f.Ratio > 4 {
		return nil, rv.errf("the refinement ratio must be above 1 and at most 4, got %g", f.Ratio)
	}
	return f, o.done()
}
