// Package samples holds cvdeck's example cases: scenarios of our own, used by
// the README, the demo and the tests. Each case file starts with a comment
// line that describes it; files a case refers to sit beside it.
package samples

import (
	"bufio"
	"bytes"
	"embed"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
)

//go:embed *.yaml data
var files embed.FS

// Sample is one example case.
type Sample struct {
	// Name is the case file's name without ".yaml".
	Name string
	// Description is the first comment line of the case file.
	Description string
	// Files are the data files the case refers to (paths relative to the
	// case file), found as "data/..." references in it.
	Files []string
}

// List returns the samples in name order.
func List() []Sample {
	entries, _ := fs.ReadDir(files, ".")
	var out []Sample
	for _, e := range entries {
		if e.IsDir() || !strings.HasSuffix(e.Name(), ".yaml") {
			continue
		}
		data, _ := files.ReadFile(e.Name())
		out = append(out, Sample{
			Name:        strings.TrimSuffix(e.Name(), ".yaml"),
			Description: description(data),
			Files:       references(data),
		})
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out
}

// Case returns a sample's case file.
func Case(name string) ([]byte, error) {
	for _, s := range List() {
		if s.Name == name {
			return files.ReadFile(name + ".yaml")
		}
	}
	names := make([]string, 0)
	for _, s := range List() {
		names = append(names, s.Name)
	}
	return nil, fmt.Errorf("no sample named %q (samples: %s)", name, strings.Join(names, ", "))
}

// Write writes sample name as dir/name.yaml plus the files it refers to,
// and returns the case file's path. Existing files are not overwritten.
func Write(name, dir string) (string, error) {
	data, err := Case(name)
	if err != nil {
		return "", err
	}
	s := Sample{Name: name, Files: references(data)}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return "", err
	}
	casePath := filepath.Join(dir, name+".yaml")
	todo := map[string][]byte{casePath: data}
	for _, f := range s.Files {
		b, err := files.ReadFile(f)
		if err != nil {
			return "", fmt.Errorf("sample %s refers to %s, which is missing: %w", name, f, err)
		}
		todo[filepath.Join(dir, filepath.FromSlash(f))] = b
	}
	paths := make([]string, 0, len(todo))
	for p := range todo {
		if _, err := os.Stat(p); err == nil {
			return "", fmt.Errorf("%s exists already; remove it or choose another folder", p)
		}
		paths = append(paths, p)
	}
	sort.Strings(paths)
	for _, p := range paths {
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			return "", err
		}
		if err := os.WriteFile(p, todo[p], 0o644); err != nil {
			return "", err
		}
	}
	return casePath, nil
}

// description returns the text of the first comment line.
func description(data []byte) string {
	sc := bufio.NewScanner(bytes.NewReader(data))
	for sc.Scan() {
		line := strings.TrimSpace(sc.Text())
		if strings.HasPrefix(line, "#") {
			return strings.TrimSpace(strings.TrimPrefix(line, "#"))
		}
		if line != "" {
			break
		}
	}
	return ""
}

// references finds the data files a case refers to: quoted or plain values
// that start with "data/".
func references(data []byte) []string {
	seen := map[string]bool{}
	var out []string
	for _, field := range strings.FieldsFunc(string(data), func(r rune) bool {
		return r == ' ' || r == '\n' || r == '"' || r == '\'' || r == ',' || r == '{' || r == '}' || r == '[' || r == ']'
	}) {
		if strings.HasPrefix(field, "data/") && !seen[field] {
			seen[field] = true
			out = append(out, field)
		}
	}
	sort.Strings(out)
	return out
}
