package deck

import (
	"fmt"
	"strconv"
	"strings"

	"cvdeck/export/manifest"
	"cvdeck/quality"
)

// checkSpec is the decoded checks section: a limit profile and overrides.
type checkSpec struct {
	patch quality.Patch
}

// decodeChecks reads the checks section, whose keys are those of a limits
// file (see quality.Patch: profile, then per-metric {warn, fail} bounds):
//
//	checks:
//	  profile: tight
//	  non_orthogonality: {warn: 50, fail: 70}
//
// quality.DecodePatch's errors begin with the place they concern,
// "file:line:column: ", which is taken apart into the InputError's own
// fields (so that the file is named once); an error without one is
// placed at the checks section.
func decodeChecks(v value) (*checkSpec, error) {
	p, err := quality.DecodePatch(v.n, v.d.file)
	if err != nil {
		ie := &InputError{File: v.d.file, Line: v.n.Line, Col: v.n.Column, Path: v.path, Msg: err.Error(), Err: err}
		if line, col, msg, ok := splitPlace(err.Error(), v.d.file); ok {
			ie.Line, ie.Col, ie.Msg = line, col, msg
		}
		return nil, ie
	}
	return &checkSpec{patch: p}, nil
}

// splitPlace takes "file:line:column: message" apart, for the given file;
// ok is false when s does not start so.
func splitPlace(s, file string) (line, col int, msg string, ok bool) {
	rest, found := strings.CutPrefix(s, file+":")
	if !found {
		return 0, 0, "", false
	}
	parts := strings.SplitN(rest, ":", 3)
	if len(parts) != 3 || !strings.HasPrefix(parts[2], " ") {
		return 0, 0, "", false
	}
	line, err1 := strconv.Atoi(parts[0])
	col, err2 := strconv.Atoi(parts[1])
	if err1 != nil || err2 != nil || line < 1 || col < 1 {
		return 0, 0, "", false
	}
	return line, col, parts[2][1:], true
}

// checkSummary condenses the quality report for the manifest.
func checkSummary(rep *quality.Report) manifest.Checks {
	s := manifest.Checks{
		Verdict:       rep.Verdict.String(),
		Profile:       rep.Profile,
		ChangedLimits: rep.ChangedLimits,
		FailedCells:   rep.FailedCells,
		WarnedCells:   rep.WarnedCells,
	}
	for _, ms := range rep.Metrics {
		s.Metrics = append(s.Metrics, manifest.Metric{
			Name: ms.Name, Min: float64(ms.Min), Max: float64(ms.Max), Unit: ms.Unit,
			Failed: ms.Failed, Warned: ms.Warned,
		})
	}
	for _, cr := range rep.Connectivity {
		if cr.Status != quality.Pass {
			msg := fmt.Sprintf("%s: %d defects", cr.Name, cr.Count)
			if len(cr.Problems) > 0 {
				msg += "; first: " + cr.Problems[0].Message
			}
			s.Messages = append(s.Messages, msg)
		}
	}
	return s
}
