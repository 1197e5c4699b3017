package atomicfile

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"
)

func TestWriteReplacesWhole(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	p := filepath.Join(dir, "out.csv")
	if err := WriteFile(p, []byte("old\n")); err != nil {
		t.Fatal(err)
	}
	if err := WriteFile(p, []byte("new\n")); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(p); string(b) != "new\n" {
		t.Fatalf("content %q", b)
	}
}

func TestFailedWriteLeavesOldFileAndNoTemp(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	p := filepath.Join(dir, "out.csv")
	if err := WriteFile(p, []byte("old\n")); err != nil {
		t.Fatal(err)
	}
	boom := errors.New("boom")
	err := Write(p, func(w io.Writer) error {
		io.WriteString(w, "half")
		return boom
	})
	if !errors.Is(err, boom) {
		t.Fatalf("err = %v", err)
	}
	if b, _ := os.ReadFile(p); string(b) != "old\n" {
		t.Fatalf("old file changed: %q", b)
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Fatalf("temporary file left behind: %v", ents)
	}
}
