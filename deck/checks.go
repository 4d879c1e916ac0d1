package deck

import (
	"fmt"

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
func decodeChecks(v value) (*checkSpec, error) {
	p, err := quality.DecodePatch(v.n, v.d.file)
	if err != nil {
		return nil, &InputError{File: v.d.file, Msg: err.Error(), Err: err}
	}
	return &checkSpec{patch: p}, nil
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
