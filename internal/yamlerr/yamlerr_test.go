package yamlerr

import (
	"strings"
	"testing"

	"gopkg.in/yaml.v3"
)

// TestDescribe: a tab in the indentation is named with its line and
// column (YAML 1.2 §6.1 forbids tabs there); another syntax error keeps
// the library's message with its line.
func TestDescribe(t *testing.T) {
	for _, c := range []struct {
		text      string
		line, col int
		tab       bool
	}{
		{"a: 1\nb:\n  c: 2\n\t d: 3\n", 4, 1, true},
		{"name: x\nmesh:\n  structured:\n\tblocks: []\n", 4, 1, true},
		{"a:\n  - 1\n  -\t2\n", 3, 4, true},
		{"a: 1\nb: [1, 2\nc: 3\n", 0, 0, false},
	} {
		var n yaml.Node
		err := yaml.Unmarshal([]byte(c.text), &n)
		if err == nil {
			t.Fatalf("%q parsed", c.text)
		}
		line, col, msg := Describe([]byte(c.text), err)
		if c.line > 0 && (line != c.line || col != c.col) {
			t.Errorf("%q: at %d:%d, want %d:%d (%s)", c.text, line, col, c.line, c.col, msg)
		}
		if got := strings.Contains(msg, "a tab"); got != c.tab {
			t.Errorf("%q: message %q, tab hint %v, want %v", c.text, msg, got, c.tab)
		}
		if strings.Contains(msg, "yaml: line") {
			t.Errorf("%q: message %q keeps the library's prefix", c.text, msg)
		}
	}
}
