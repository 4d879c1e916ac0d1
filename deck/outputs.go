package deck

import (
	"fmt"
	"strings"
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
// and a multiblock index (structured meshes only); preview is preview.svg,
// png preview.png; manifest is deck.yaml. quality.json and deck.yaml are
// always written (deck.yaml carries the caution statement and the record a
// check of the deck needs), so manifest may be named or left out alike.
func decodeOutputs(top *object) (outputSpec, error) {
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
		list, err := fv.strings()
		if err != nil {
			return out, err
		}
		if out.formats, err = ParseFormats(list); err != nil {
			return out, fv.wrap(err)
		}
	}
	return out, o.done()
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
			known := false
			for _, k := range Formats {
				known = known || k == f
			}
			if !known {
				hint := ""
				if c := closest(f, Formats); c != "" {
					hint = fmt.Sprintf("; did you mean %q?", c)
				}
				return nil, fmt.Errorf("%w: unknown output format %q%s (formats: %s)", ErrInput, f, hint, strings.Join(Formats, ", "))
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
