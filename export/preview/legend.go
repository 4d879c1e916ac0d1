package preview

import "cvdeck/mesh"

// legendGroup is one condition of the boundary legend and the tags that
// carry it; with no conditions given, one group holds every tag.
type legendGroup struct {
	condition string // "" when the preview has no conditions
	tags      []legendTag
}

// legendTag is one line of the boundary legend.
type legendTag struct {
	label  string
	colour rgb
	faces  int
}

// boundaryColours gives each tag its own colour, in tag order, and the
// legend: the tags grouped under their condition when conditions are
// given (the conditions in the order of their first tag, tags without one
// under "no condition"), else one group of every tag; untagged faces are
// black and come last.
func boundaryColours(m *mesh.Mesh, conditions []string) ([]rgb, []legendGroup) {
	colours := make([]rgb, len(m.Tags))
	var groups []legendGroup
	index := map[string]int{}
	for t, tag := range m.Tags {
		colours[t] = boundaryOf[t%len(boundaryOf)]
		key := ""
		if conditions != nil {
			key = conditions[t]
			if key == "" {
				key = "no condition"
			}
		}
		k, ok := index[key]
		if !ok {
			k = len(groups)
			index[key] = k
			groups = append(groups, legendGroup{condition: key})
		}
		groups[k].tags = append(groups[k].tags, legendTag{label: tag, colour: colours[t], faces: int(m.TagStart[t+1] - m.TagStart[t])})
	}
	if lo, hi := m.UntaggedRange(); hi > lo {
		groups = append(groups, legendGroup{tags: []legendTag{{label: "untagged", colour: untagged, faces: hi - lo}}})
	}
	return colours, groups
}
