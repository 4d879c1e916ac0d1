// Package atomic writes files and whole folders so that a reader, or a run
// interrupted at any instant, sees either the previous version or the new
// one complete, never a part.
//
// A file is written to a temporary file in its target folder, flushed to
// disk (fsync), then renamed over the target; rename(2) within one file
// system replaces the name in one step (POSIX). A folder (a deck) is built
// as a whole in a temporary sibling folder, then swapped in by renames: the
// previous folder is first renamed aside, the new one renamed into place, and
// the previous one removed. An interruption before the swap leaves the
// previous folder; between the two renames it leaves no folder under the
// target name (the previous one survives under its aside name); after them,
// the new one. Temporaries left by an interrupted run start with a dot and
// are removed by the next ReplaceDir of the same folder.
package atomic

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
)

// BufferSize is the size of the buffer WriteFile gives its writer: large
// enough that big binary arrays reach the file in few system calls.
const BufferSize = 1 << 20

// WriteFile writes the file at path through write. write receives a
// *bufio.Writer of BufferSize bytes (writers that wrap it in
// bufio.NewWriterSize with no larger size get the same one back); WriteFile
// flushes it. The data go to a temporary file beside path that is synced and
// then renamed to path with mode 0644, so path holds the previous content or
// the new, never a part. On any error the temporary file is removed and path
// is left untouched.
func WriteFile(path string, write func(w io.Writer) error) (err error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, "."+base+".partial-*")
	if err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
		}
	}()
	bw := bufio.NewWriterSize(f, BufferSize)
	if err = write(bw); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err = bw.Flush(); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err = f.Chmod(0o644); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err = f.Sync(); err != nil {
		return fmt.Errorf("write %s: sync: %w", path, err)
	}
	if err = f.Close(); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err = os.Rename(tmp, path); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	return syncDir(dir)
}

// ReplaceDir replaces the folder dir as a whole by one that build fills.
// build receives the path of an empty temporary folder beside dir (same
// parent, so the final renames stay within one file system) and writes the
// new content there; files written into it need no renames of their own.
// If build fails, the temporary folder is removed and dir is untouched.
// Otherwise the temporary folder is synced and swapped in as the package
// comment describes. Stale temporaries of dir from an interrupted earlier
// run are removed first.
func ReplaceDir(dir string, build func(tmp string) error) (err error) {
	dir = filepath.Clean(dir)
	parent, base := filepath.Split(dir)
	if parent == "" {
		parent = "."
	}
	if base == "" || base == "." || base == ".." || base == string(filepath.Separator) {
		return fmt.Errorf("replace folder %q: need a folder name, not a root or dot path", dir)
	}
	if fi, err := os.Stat(dir); err == nil && !fi.IsDir() {
		return fmt.Errorf("replace folder %s: it exists and is not a folder", dir)
	}
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return fmt.Errorf("replace folder %s: %w", dir, err)
	}
	if err := removeStale(parent, base); err != nil {
		return fmt.Errorf("replace folder %s: %w", dir, err)
	}
	tmp, err := os.MkdirTemp(parent, stalePrefix(base, "partial"))
	if err != nil {
		return fmt.Errorf("replace folder %s: %w", dir, err)
	}
	defer func() {
		if err != nil {
			os.RemoveAll(tmp)
		}
	}()
	if err = os.Chmod(tmp, 0o755); err != nil {
		return fmt.Errorf("replace folder %s: %w", dir, err)
	}
	if err = build(tmp); err != nil {
		return fmt.Errorf("replace folder %s: %w", dir, err)
	}
	if err = syncTree(tmp); err != nil {
		return fmt.Errorf("replace folder %s: %w", dir, err)
	}
	var old string
	if _, serr := os.Lstat(dir); serr == nil {
		old, err = reserveName(parent, stalePrefix(base, "old"))
		if err != nil {
			return fmt.Errorf("replace folder %s: %w", dir, err)
		}
		if err = os.Rename(dir, old); err != nil {
			return fmt.Errorf("replace folder %s: move previous aside: %w", dir, err)
		}
	}
	if err = os.Rename(tmp, dir); err != nil {
		if old != "" {
			// Put the previous folder back so the target keeps a deck.
			if rerr := os.Rename(old, dir); rerr != nil {
				err = errors.Join(err, fmt.Errorf("restore previous folder from %s: %w", old, rerr))
			}
		}
		return fmt.Errorf("replace folder %s: %w", dir, err)
	}
	if err = syncDir(parent); err != nil {
		return fmt.Errorf("replace folder %s: %w", dir, err)
	}
	if old != "" {
		if err = os.RemoveAll(old); err != nil {
			return fmt.Errorf("replace folder %s: remove previous: %w", dir, err)
		}
	}
	return nil
}

// stalePrefix is the name prefix of the temporaries of folder base.
func stalePrefix(base, kind string) string { return "." + base + "." + kind + "-" }

// removeStale removes temporaries of base left in parent by an interrupted
// run: names starting with stalePrefix(base, "partial") or (base, "old").
func removeStale(parent, base string) error {
	ents, err := os.ReadDir(parent)
	if err != nil {
		return err
	}
	for _, e := range ents {
		n := e.Name()
		if strings.HasPrefix(n, stalePrefix(base, "partial")) || strings.HasPrefix(n, stalePrefix(base, "old")) {
			if err := os.RemoveAll(filepath.Join(parent, n)); err != nil {
				return err
			}
		}
	}
	return nil
}

// reserveName returns an unused path in parent starting with prefix.
func reserveName(parent, prefix string) (string, error) {
	d, err := os.MkdirTemp(parent, prefix)
	if err != nil {
		return "", err
	}
	// Free the name again: the previous folder is renamed to it next.
	if err := os.Remove(d); err != nil {
		return "", err
	}
	return d, nil
}

// syncTree fsyncs every regular file and folder under root, so that after
// the swap the new deck's content is on disk, not only its names.
func syncTree(root string) error {
	return filepath.WalkDir(root, func(p string, d os.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if !d.IsDir() && !d.Type().IsRegular() {
			return nil
		}
		f, err := os.Open(p)
		if err != nil {
			return err
		}
		serr := f.Sync()
		cerr := f.Close()
		if serr != nil {
			return fmt.Errorf("sync %s: %w", p, serr)
		}
		return cerr
	})
}

// syncDir fsyncs a folder so that renames within it are durable.
func syncDir(dir string) error {
	f, err := os.Open(dir)
	if err != nil {
		return err
	}
	serr := f.Sync()
	cerr := f.Close()
	if serr != nil {
		return fmt.Errorf("sync folder %s: %w", dir, serr)
	}
	return cerr
}
