package deck

import (
	"fmt"
	"slices"
	"strings"

	"gopkg.in/yaml.v3"
)

// Formats are the deck outputs a run can write.
var Formats = []string{"cgns", "vtu", "vtk", "vtk-binary", "vts", "preview", "png", "manifest"}

// DefaultFormats are written when neither the case nor --format says.
var DefaultFormats = []string{"cgns", "vtu", "preview", "manifest"}

// outputSpec is the decoded outputs section.
type outputSpec struct {
	formats []string
}

// decodeOutputs reads the optional outputs section:
//
//	outputs:
//	  formats: [cgns, vtu, vtk, vtk-binary, vts, preview, png, manifest]
//
// vtu also writes boundary.vtp; vts writes one structured grid per block
// and a multiblock index (structured meshes only, so that it is refused at
// its entry for an unstructured mesh: decodeOutputs comes after the mesh
// section); preview is preview.svg, png preview.png; manifest is
// deck.yaml. quality.json and deck.yaml are always written (deck.yaml
// carries the caution statement and the record a check of the deck
// needs), so manifest may be named or left out alike. An entry may also
// be a comma-separated list, as --format takes; errors point at the entry.
func decodeOutputs(c *Case, top *object) (outputSpec, error) {
	out := outputSpec{formats: DefaultFormats}
	v, ok := top.get("outputs")
	if !ok {
		return out, nil
	}
	o, err := v.object()
	if err != nil {
		return out, err
	}
	if fv, ok := o.get("formats"); ok {
		entries := []value{fv}
		if fv.n.Kind != yaml.ScalarNode {
			if entries, err = fv.list(); err != nil {
				return out, err
			}
		}
		var list []string
		for _, it := range entries {
			s, err := it.str()
			if err != nil {
				return out, err
			}
			for _, f := range strings.Split(s, ",") {
				f = strings.TrimSpace(f)
				if msg := formatProblem(f); msg != "" {
					return out, it.errf("%s", msg)
				}
				if f == "vts" && c.Mesh != nil && c.Mesh.unstructured != nil {
					return out, it.errf("%s", vtsUnstructured)
				}
			}
			list = append(list, s)
		}
		if out.formats, err = ParseFormats(list); err != nil {
			return out, fv.errf("%s", strings.TrimPrefix(err.Error(), ErrInput.Error()+": "))
		}
	}
	return out, o.done()
}

// vtsUnstructured says why the vts format does not go with an unstructured
// mesh.
const vtsUnstructured = "the vts format writes the blocks of a structured mesh, and this case's mesh is unstructured: choose vtu or vtk"

// formatProblem says what is wrong with one format name, "" when it is
// one of Formats or empty (an empty piece of a comma-separated list, which
// ParseFormats skips).
func formatProblem(f string) string {
	if f == "" || slices.Contains(Formats, f) {
		return ""
	}
	hint := ""
	if c := closest(f, Formats); c != "" {
		hint = fmt.Sprintf("; did you mean %q?", c)
	}
	return fmt.Sprintf("unknown output format %q%s (formats: %s)", f, hint, strings.Join(Formats, ", "))
}

// ParseFormats checks a list of format names (from the case file or
// --format, where a comma-separated list is split first) and removes
// repeats, keeping the order.
func ParseFormats(list []string) ([]string, error) {
	var out []string
	seen := map[string]bool{}
	for _, item := range list {
		for _, f := range strings.Split(item, ",") {
			f = strings.TrimSpace(f)
			if f == "" {
				continue
			}
			if msg := formatProblem(f); msg != "" {
				return nil, fmt.Errorf("%w: %s", ErrInput, msg)
			}
			if !seen[f] {
				seen[f] = true
				out = append(out, f)
			}
		}
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("%w: no output format given (formats: %s)", ErrInput, strings.Join(Formats, ", "))
	}
	return out, nil
}

func hasFormat(list []string, f string) bool {
	for _, x := range list {
		if x == f {
			return true
		}
	}
	return false
}
