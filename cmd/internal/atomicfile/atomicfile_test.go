package atomicfile

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"
)

// TestWrite: a finished write replaces the file; a failed one leaves the
// old content and no temporary file behind.
func TestWrite(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "out.csv")
	if err := WriteBytes(path, []byte("first\n")); err != nil {
		t.Fatal(err)
	}
	boom := errors.New("disk full")
	err := Write(path, func(w io.Writer) error {
		io.WriteString(w, "partial")
		return boom
	})
	if !errors.Is(err, boom) {
		t.Fatalf("error %v, want it to wrap %v", err, boom)
	}
	got, err := os.ReadFile(path)
	if err != nil || string(got) != "first\n" {
		t.Errorf("after a failed write the file holds %q (%v), want the old content", got, err)
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Errorf("directory holds %d entries, want only the target", len(ents))
	}
	if err := WriteBytes(path, []byte("second\n")); err != nil {
		t.Fatal(err)
	}
	if got, _ := os.ReadFile(path); string(got) != "second\n" {
		t.Errorf("file holds %q, want the new content", got)
	}
}
