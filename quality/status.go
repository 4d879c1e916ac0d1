package quality

import (
	"fmt"
	"math"
	"strconv"
)

// Status is the outcome of one check: pass, warn or fail. Larger is worse.
type Status uint8

// The three outcomes.
const (
	Pass Status = iota
	Warn
	Fail
)

var statusNames = [...]string{"pass", "warn", "fail"}

func (s Status) String() string {
	if int(s) < len(statusNames) {
		return statusNames[s]
	}
	return fmt.Sprintf("status(%d)", s)
}

// MarshalText writes the status as "pass", "warn" or "fail".
func (s Status) MarshalText() ([]byte, error) {
	if int(s) >= len(statusNames) {
		return nil, fmt.Errorf("quality: status %d is not pass, warn or fail", s)
	}
	return []byte(statusNames[s]), nil
}

// Number is a float64 that marshals to JSON as null when it is NaN or
// infinite (JSON has no such numbers), and otherwise in Go's shortest
// round-trip form.
type Number float64

// MarshalJSON writes n, or null when n is not finite.
func (n Number) MarshalJSON() ([]byte, error) {
	f := float64(n)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, f, 'g', -1, 64), nil
}
