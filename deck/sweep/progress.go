package sweep

import (
	"fmt"
	"io"
	"os"
	"strings"
	"time"
)

// IsTerminal reports whether f is an interactive terminal: a character
// device that is not the null device. Pipes, files and /dev/null are not.
func IsTerminal(f *os.File) bool {
	fi, err := f.Stat()
	if err != nil || fi.Mode()&os.ModeCharDevice == 0 {
		return false
	}
	null, err := os.Stat(os.DevNull)
	return err != nil || !os.SameFile(fi, null)
}

// Bar draws one progress line for a sweep on a terminal, and prints the
// failures above it as they come.
type Bar struct {
	w     io.Writer
	start time.Time
	now   func() time.Time
	width int
}

// NewBar returns a bar writing to w (a terminal).
func NewBar(w io.Writer) *Bar {
	return &Bar{w: w, start: time.Now(), now: time.Now, width: 30}
}

// Update redraws the bar after a variant, printing its error first when
// it failed.
func (b *Bar) Update(p Progress) {
	if p.Row.Status == StatusFailed {
		fmt.Fprintf(b.w, "\r\033[K%s failed: %s\n", p.Row.Name, p.Row.Error)
	}
	fmt.Fprintf(b.w, "\r\033[K%s", b.line(p))
}

// Finish ends the bar's line.
func (b *Bar) Finish() { fmt.Fprint(b.w, "\r\033[K") }

func (b *Bar) line(p Progress) string {
	filled := 0
	if p.Total > 0 {
		filled = b.width * p.Done / p.Total
	}
	elapsed := b.now().Sub(b.start)
	s := fmt.Sprintf("sweep [%s%s] %d/%d", strings.Repeat("#", filled), strings.Repeat("-", b.width-filled), p.Done, p.Total)
	if p.Failed > 0 {
		s += fmt.Sprintf(", %d failed", p.Failed)
	}
	s += ", " + clock(elapsed)
	if p.Done > 0 && p.Done < p.Total {
		left := time.Duration(float64(elapsed) * float64(p.Total-p.Done) / float64(p.Done))
		s += ", about " + clock(left) + " left"
	}
	return s
}

// clock writes a duration as m:ss or h:mm:ss.
func clock(d time.Duration) string {
	t := int(d.Round(time.Second).Seconds())
	if t >= 3600 {
		return fmt.Sprintf("%d:%02d:%02d", t/3600, t/60%60, t%60)
	}
	return fmt.Sprintf("%d:%02d", t/60, t%60)
}

// Tally counts what a run did, for the closing line of the command.
func (s *Summary) Tally() string {
	var built, reused, failed, interrupted, notRun, checks int
	for _, r := range s.Rows {
		switch r.Run {
		case RunBuilt:
			built++
		case RunReused:
			reused++
		case RunFailed:
			failed++
		case RunInterrupted:
			interrupted++
		case RunNotRun:
			notRun++
		}
		if r.Status == StatusOK && !r.Passed {
			checks++
		}
	}
	out := fmt.Sprintf("%d variants: %d built, %d reused, %d failed", len(s.Rows), built, reused, failed)
	if interrupted > 0 {
		out += fmt.Sprintf(", %d stopped while being built", interrupted)
	}
	if notRun > 0 {
		out += fmt.Sprintf(", %d not started", notRun)
	}
	if checks > 0 {
		out += fmt.Sprintf("; %d decks failed their checks", checks)
	}
	return out
}
