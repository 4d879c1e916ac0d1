package sweep

import (
	"encoding/json"
	"fmt"
	"io"
)

// listItem is one variant in the JSON form of WriteList.
type listItem struct {
	Index  int                `json:"index"`
	ID     string             `json:"id"`
	Name   string             `json:"name"`
	Params map[string]float64 `json:"params"`
	Level  int                `json:"level,omitempty"`
	Refine float64            `json:"refine"`
}

// WriteList writes the variants of a shard without building them, to
// check a sweep file or plan a job array: a heading, then one line per
// variant (index, id, folder name); with asJSON an array of {index, id,
// name, params, level, refine}.
func WriteList(w io.Writer, f *File, shard Shard, asJSON bool) error {
	all, err := f.Variants()
	if err != nil {
		return err
	}
	vs := Select(all, shard)
	if asJSON {
		items := make([]listItem, len(vs))
		for i, v := range vs {
			items[i] = listItem{v.Index, v.ID, v.Name, v.ParamMap(), v.Level, v.Refine}
		}
		b, err := json.MarshalIndent(items, "", "  ")
		if err != nil {
			return err
		}
		_, err = w.Write(append(b, '\n'))
		return err
	}
	what := "the whole sweep"
	if !shard.Whole() {
		what = "shard " + shard.String()
	}
	if _, err := fmt.Fprintf(w, "%d of %d variants (%s)\n", len(vs), len(all), what); err != nil {
		return err
	}
	for _, v := range vs {
		if _, err := fmt.Fprintf(w, "%6d  %s  %s\n", v.Index, v.ID, v.Name); err != nil {
			return err
		}
	}
	return nil
}
