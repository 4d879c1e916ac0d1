// Package yamlerr turns the YAML library's syntax errors into located
// messages for users: the library says "yaml: line 13: found character
// that cannot start any token", with no column and no hint of the usual
// cause. Describe finds the line, and where the line (or the one after
// it, which the library sometimes means) holds a tab, which YAML does not
// allow for indentation (YAML 1.2 §6.1), the column of the tab and the
// reason.
package yamlerr

import (
	"bytes"
	"regexp"
	"strconv"
	"strings"
)

var lineRE = regexp.MustCompile(`^yaml: line (\d+): `)

// Describe returns the 1-based line and column of a syntax error err of
// the YAML text data (0 when unknown) and its message without the
// library's "yaml: line N:" prefix, with a hint added when the line holds
// a tab.
func Describe(data []byte, err error) (line, col int, msg string) {
	msg = strings.TrimPrefix(err.Error(), "yaml: ")
	m := lineRE.FindStringSubmatch(err.Error())
	if m == nil {
		return 0, 0, msg
	}
	line, _ = strconv.Atoi(m[1])
	msg = err.Error()[len(m[0]):]
	lines := bytes.Split(data, []byte("\n"))
	if line < 1 || line > len(lines) {
		return line, 0, msg
	}
	// The library may give the line before the one it stopped in (the
	// line of the last token read), so the tab is looked for on both.
	for _, l := range []int{line, line + 1} {
		if l > len(lines) {
			break
		}
		if i := bytes.IndexByte(lines[l-1], '\t'); i >= 0 {
			return l, len([]rune(string(lines[l-1][:i]))) + 1, msg + " (a tab: YAML indents with spaces only)"
		}
	}
	return line, 1, msg
}
