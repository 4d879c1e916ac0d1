package sweep

import (
	"bufio"
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"sync"
)

// hashRecord is what a sweep records of one deck it built or reused: the
// SHA-256 of the bytes of the files deck.yaml records by content only
// (mesh.cgns), by path, with the variant's id and the deck's input hash.
// A later run reuses the deck only when its files still have those bytes.
type hashRecord struct {
	ID        string            `json:"id"`
	InputHash string            `json:"input_hash"`
	Files     map[string]string `json:"file_sha256"`
}

// HashLogName returns the base name of a shard's hash log:
// summary-hashes.jsonl for the whole sweep, summary-shard-K-of-N-hashes.jsonl
// for a slice. The log gets one line (a hashRecord in JSON) as each deck
// is built, so that the bytes' hashes outlive a run that is killed before
// it writes its summary (a scheduler's time limit, a lost node): the
// summary alone would leave the decks built by then unverifiable, and
// their resume refused. The log is only appended to, a line per build.
func HashLogName(s Shard) string {
	if s.Whole() {
		return "summary-hashes.jsonl"
	}
	return fmt.Sprintf("summary-shard-%d-of-%d-hashes.jsonl", s.K, s.N)
}

// isHashLog reports whether name is the name of a shard's hash log.
func isHashLog(name string) bool {
	if name == HashLogName(Shard{}) {
		return true
	}
	var k, n int
	_, err := fmt.Sscanf(name, "summary-shard-%d-of-%d-hashes.jsonl", &k, &n)
	return err == nil && k >= 1 && k <= n && name == HashLogName(Shard{K: k, N: n})
}

// readHashLog reads the records of a hash log. A line that is not a whole
// record (the last line of a run killed while writing it) is skipped: the
// deck it was about then cannot be verified, and its resume is refused
// rather than taken on trust.
func readHashLog(path string) ([]hashRecord, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	var out []hashRecord
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(nil, len(data)+1)
	for sc.Scan() {
		var rec hashRecord
		if json.Unmarshal(sc.Bytes(), &rec) == nil && rec.ID != "" && rec.InputHash != "" && len(rec.Files) > 0 {
			out = append(out, rec)
		}
	}
	return out, sc.Err()
}

// hashLog appends the records of the decks a run builds to its hash log,
// from any worker. The file is made with the first record, so a run that
// builds nothing leaves the folder as it was.
type hashLog struct {
	path string
	mu   sync.Mutex
	f    *os.File
}

// add appends one record as one line, written with a single call, so that
// a kill leaves at worst the last line torn. An error is not the run's:
// the summary records the same hashes when the run ends, and a deck whose
// record is lost in a run that never writes its summary is refused on
// resume, not reused unverified, so nothing can be lost through it.
func (l *hashLog) add(rec hashRecord) {
	if len(rec.Files) == 0 {
		return
	}
	line, err := json.Marshal(rec)
	if err != nil {
		return
	}
	l.mu.Lock()
	defer l.mu.Unlock()
	if l.f == nil {
		if l.f, err = os.OpenFile(l.path, os.O_WRONLY|os.O_APPEND|os.O_CREATE, 0o644); err != nil {
			l.f = nil
			return
		}
	}
	_, _ = l.f.Write(append(line, '\n'))
}

// close closes the log's file, if the run made one.
func (l *hashLog) close() {
	l.mu.Lock()
	defer l.mu.Unlock()
	if l.f != nil {
		l.f.Close()
		l.f = nil
	}
}
