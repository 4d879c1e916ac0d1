// Package manifest writes and reads deck.yaml, the table of contents of a
// cvdeck deck: what the deck holds, with units beside every physical value,
// the hashes of its inputs and outputs, the cvdeck version, the verdict of
// the checks and the caution about validation. People read it; scripts
// parse it (the schema is documented in the README).
//
// The manifest holds no time and no host name, so the same inputs give the
// same bytes. A CGNS file is recorded by the hash of the arrays written into
// it (its HDF5 layer stamps object times into the file bytes).
package manifest

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"gopkg.in/yaml.v3"

	"cvdeck/bc"
)

// FileName is the manifest's name inside a deck folder.
const FileName = "deck.yaml"

// Schema is the manifest schema version; it changes when a key changes
// meaning or disappears.
const Schema = 1

// Caution is the statement every deck carries.
const Caution = "Mesh checks do not validate a simulation. Before results inform a design decision, " +
	"verification, validation and review by a qualified engineer under the applicable codes come first."

// Manifest is the content of deck.yaml.
type Manifest struct {
	Schema     int         `yaml:"schema"`
	Caution    string      `yaml:"caution"`
	Cvdeck     string      `yaml:"cvdeck_version"`
	Case       Case        `yaml:"case"`
	InputHash  string      `yaml:"input_hash"`
	Inputs     []File      `yaml:"inputs"`
	Parameters []Parameter `yaml:"parameters,omitempty"`
	Mesh       Mesh        `yaml:"mesh"`
	Tags       []Tag       `yaml:"boundary_tags"`
	Conditions *bc.Record  `yaml:"conditions,omitempty"`
	Advice     bc.Entries  `yaml:"mesh_advice,omitempty"`
	Checks     Checks      `yaml:"checks"`
	Files      []File      `yaml:"files"`
}

// Case names the case the deck came from.
type Case struct {
	Name   string  `yaml:"name"`
	File   string  `yaml:"file"`
	Units  string  `yaml:"units"`
	Refine float64 `yaml:"refinement_factor"`
}

// File is an input or output file with its SHA-256. For CGNS files
// ContentSHA256 replaces SHA256: a hash of the arrays written, since the
// file bytes carry HDF5 time stamps.
type File struct {
	Path          string `yaml:"path"`
	Format        string `yaml:"format,omitempty"`
	Bytes         int64  `yaml:"bytes,omitempty"`
	SHA256        string `yaml:"sha256,omitempty"`
	ContentSHA256 string `yaml:"content_sha256,omitempty"`
}

// Parameter is a resolved case parameter, in case units.
type Parameter struct {
	Name  string  `yaml:"name"`
	Value float64 `yaml:"value"`
}

// Quantity is a value with its unit.
type Quantity struct {
	Value float64 `yaml:"value"`
	Unit  string  `yaml:"unit"`
}

// Mesh summarises the mesh.
type Mesh struct {
	Kind          string         `yaml:"kind"`
	Nodes         int            `yaml:"nodes"`
	Cells         int            `yaml:"cells"`
	Faces         int            `yaml:"faces"`
	InteriorFaces int            `yaml:"interior_faces"`
	BoundaryFaces int            `yaml:"boundary_faces"`
	CellShapes    map[string]int `yaml:"cell_shapes"`
	Area          Quantity       `yaml:"area"`
	Blocks        []Block        `yaml:"blocks,omitempty"`
	Notes         []string       `yaml:"notes,omitempty"`
}

// Block is one structured block: node counts in i and j.
type Block struct {
	Name string `yaml:"name"`
	NI   int    `yaml:"ni"`
	NJ   int    `yaml:"nj"`
}

// Tag is one boundary tag with its face range [first_face, first_face+faces).
type Tag struct {
	Tag       string `yaml:"tag"`
	FirstFace int    `yaml:"first_face"`
	Faces     int    `yaml:"faces"`
	// FirstCellHeight spreads the height of the tag's cells normal to
	// its faces (none for a tag without faces).
	FirstCellHeight *Spread `yaml:"first_cell_height,omitempty"`
	// Yplus, on a no-slip wall of a case with a target y+, spreads the
	// y+ those heights give by the estimate behind the advised height.
	Yplus *Spread `yaml:"yplus_estimate,omitempty"`
}

// Spread is the smallest, mean and largest of a set of values, with
// their unit.
type Spread struct {
	Min  float64 `yaml:"min"`
	Mean float64 `yaml:"mean"`
	Max  float64 `yaml:"max"`
	Unit string  `yaml:"unit"`
}

// Checks summarises the quality report (quality.json holds all of it).
type Checks struct {
	Verdict string `yaml:"verdict"`
	Profile string `yaml:"profile,omitempty"`
	// ChangedLimits names the limits that differ from the profile's.
	ChangedLimits []string `yaml:"changed_limits,omitempty"`
	FailedCells   int      `yaml:"failed_cells"`
	WarnedCells   int      `yaml:"warned_cells"`
	Metrics       []Metric `yaml:"metrics,omitempty"`
	Messages      []string `yaml:"messages,omitempty"`
}

// Metric is one line of the checks summary.
type Metric struct {
	Name   string  `yaml:"name"`
	Min    float64 `yaml:"min"`
	Max    float64 `yaml:"max"`
	Unit   string  `yaml:"unit"`
	Failed int     `yaml:"cells_failed"`
	Warned int     `yaml:"cells_warned"`
}

// Encode writes m as YAML with a heading comment.
func Encode(w io.Writer, m *Manifest) error {
	var buf bytes.Buffer
	buf.WriteString("# cvdeck deck manifest: what this deck holds, where it came from, and whether it passed its checks.\n")
	enc := yaml.NewEncoder(&buf)
	enc.SetIndent(2)
	if err := enc.Encode(m); err != nil {
		return fmt.Errorf("manifest: %w", err)
	}
	if err := enc.Close(); err != nil {
		return fmt.Errorf("manifest: %w", err)
	}
	_, err := w.Write(buf.Bytes())
	return err
}

// Read reads dir/deck.yaml.
func Read(dir string) (*Manifest, error) {
	data, err := os.ReadFile(filepath.Join(dir, FileName))
	if err != nil {
		return nil, err
	}
	var m Manifest
	if err := yaml.Unmarshal(data, &m); err != nil {
		return nil, fmt.Errorf("%s: %w", filepath.Join(dir, FileName), err)
	}
	return &m, nil
}
