package outputs

import (
	"context"
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

func write(t *testing.T, path, s string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(s), 0o644); err != nil {
		t.Fatal(err)
	}
}

func content(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

func text(s string) func(io.Writer) error {
	return func(w io.Writer) error { _, err := io.WriteString(w, s); return err }
}

// noStaging fails when a staging directory is left in dir.
func noStaging(t *testing.T, dir string) {
	t.Helper()
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range ents {
		if strings.HasPrefix(e.Name(), ".") {
			t.Errorf("%s left in %s", e.Name(), dir)
		}
	}
}

func TestCheck(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	in := filepath.Join(dir, "in.csv")
	old := filepath.Join(dir, "old.csv")
	write(t, in, "date,tavg\n")
	write(t, old, "x\n")
	link := filepath.Join(dir, "link.csv")
	if err := os.Symlink(old, link); err != nil {
		t.Fatal(err)
	}
	linkToInput := filepath.Join(dir, "in-link.csv")
	if err := os.Symlink(in, linkToInput); err != nil {
		t.Fatal(err)
	}
	hard := filepath.Join(dir, "hard.csv")
	if err := os.Link(in, hard); err != nil {
		t.Fatal(err)
	}
	fifo := filepath.Join(dir, "fifo")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	inputs := []string{in, filepath.Join(dir, "not-yet.json")}
	cases := []struct {
		path   string
		force  bool
		reason string // "" = allowed
	}{
		{filepath.Join(dir, "new.csv"), false, ""},
		{old, true, ""},
		{old, false, "exists; use --force"},
		{in, true, "input of this run"},
		{filepath.Join(dir, "sub", "..", "in.csv"), true, "input of this run"},
		{filepath.Join(dir, "not-yet.json"), true, "input of this run"},
		{hard, true, "same file as the input"},
		{linkToInput, true, "same file as the input"},
		{link, true, "symbolic link"},
		{dir, true, "directory"},
		{os.DevNull, true, "device"},
		{fifo, true, "named pipe"},
	}
	for _, c := range cases {
		err := Check(c.path, inputs, c.force)
		if c.reason == "" {
			if err != nil {
				t.Errorf("Check(%s, force %v) = %v, want nil", c.path, c.force, err)
			}
			continue
		}
		if !errors.Is(err, ErrRefused) || !strings.Contains(err.Error(), c.reason) || !strings.Contains(err.Error(), c.path) {
			t.Errorf("Check(%s, force %v) = %v, want a refusal naming the path and %q", c.path, c.force, err, c.reason)
		}
	}
}

func TestSetCommitsAllAcrossDirectories(t *testing.T) {
	t.Parallel()
	a, b := t.TempDir(), t.TempDir()
	write(t, filepath.Join(a, "tails.csv"), "old tails\n")
	s := NewSet("")
	if !strings.Contains(s.RunID(), "-") || len(s.RunID()) != len("20060102T150405Z-")+8 {
		t.Errorf("run id %q", s.RunID())
	}
	defer s.Abort()
	files := map[string]string{
		filepath.Join(a, "tails.csv"):   "new tails\n",
		filepath.Join(a, "paths.csv"):   "paths\n",
		filepath.Join(b, "report.html"): "<html>\n",
	}
	for p, c := range files {
		if err := s.Add(p, text(c)); err != nil {
			t.Fatal(err)
		}
		if _, err := os.Stat(p); c != "new tails\n" && err == nil {
			t.Fatalf("%s visible before Commit", p)
		}
	}
	if got := content(t, filepath.Join(a, "tails.csv")); got != "old tails\n" {
		t.Fatalf("replaced before Commit: %q", got)
	}
	if err := s.Commit(context.Background()); err != nil {
		t.Fatal(err)
	}
	for p, c := range files {
		if got := content(t, p); got != c {
			t.Errorf("%s = %q, want %q", p, got, c)
		}
	}
	noStaging(t, a)
	noStaging(t, b)
}

func TestFailingFillLeavesPreviousFiles(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	first, second := filepath.Join(dir, "a.json"), filepath.Join(dir, "b.csv")
	write(t, first, "old a\n")
	write(t, second, "old b\n")
	s := NewSet("run-1")
	if err := s.Add(first, text("new a\n")); err != nil {
		t.Fatal(err)
	}
	boom := errors.New("renderer failed")
	err := s.Add(second, func(w io.Writer) error { io.WriteString(w, "half"); return boom })
	if !errors.Is(err, boom) {
		t.Fatalf("Add = %v, want the fill error", err)
	}
	if err := s.Commit(context.Background()); !errors.Is(err, boom) {
		t.Fatalf("Commit after a failed Add = %v, want the fill error", err)
	}
	if content(t, first) != "old a\n" || content(t, second) != "old b\n" {
		t.Error("previous files changed")
	}
	noStaging(t, dir)
}

func TestAbortCleansUp(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	p := filepath.Join(dir, "tails.json")
	write(t, p, "old\n")
	s := NewSet("run-2")
	if err := s.Add(p, text("new\n")); err != nil {
		t.Fatal(err)
	}
	if err := s.Add(filepath.Join(dir, "new.csv"), text("x\n")); err != nil {
		t.Fatal(err)
	}
	s.Abort()
	s.Abort() // a second Abort does nothing
	if content(t, p) != "old\n" {
		t.Error("Abort changed the previous file")
	}
	if _, err := os.Stat(filepath.Join(dir, "new.csv")); err == nil {
		t.Error("Abort left a new file")
	}
	noStaging(t, dir)
}

func TestCommitRefusesWhenCancelled(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	p := filepath.Join(dir, "tails.json")
	s := NewSet("run-3")
	if err := s.Add(p, text("new\n")); err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if err := s.Commit(ctx); !errors.Is(err, context.Canceled) {
		t.Fatalf("Commit = %v, want context.Canceled", err)
	}
	if _, err := os.Stat(p); err == nil {
		t.Error("cancelled Commit wrote the file")
	}
	noStaging(t, dir)
}

// TestRenameFailureRestores injects a failure into the third rename into
// place: the two files already moved must get their previous content back
// (or disappear, when they were new).
func TestRenameFailureRestores(t *testing.T) {
	t.Parallel()
	for _, noLinks := range []bool{false, true} {
		t.Run(map[bool]string{false: "hard-link backups", true: "renamed-aside backups"}[noLinks], func(t *testing.T) {
			t.Parallel()
			renameFailureRestores(t, noLinks)
		})
	}
}

func renameFailureRestores(t *testing.T, noLinks bool) {
	dir, other := t.TempDir(), t.TempDir()
	a, b, c := filepath.Join(dir, "a.csv"), filepath.Join(other, "b.csv"), filepath.Join(dir, "c.csv")
	write(t, a, "old a\n")
	write(t, c, "old c\n")
	s := NewSet("run-4")
	for _, p := range []string{a, b, c} {
		if err := s.Add(p, text("new "+filepath.Base(p))); err != nil {
			t.Fatal(err)
		}
	}
	if noLinks {
		s.link = func(string, string) error { return errors.ErrUnsupported }
	}
	injected := errors.New("disk gone")
	intoPlace := 0
	s.rename = func(oldpath, newpath string) error {
		if filepath.Dir(newpath) == dir || filepath.Dir(newpath) == other {
			if intoPlace++; intoPlace == 3 {
				return injected
			}
		}
		return os.Rename(oldpath, newpath)
	}
	if err := s.Commit(context.Background()); !errors.Is(err, injected) {
		t.Fatalf("Commit = %v, want the injected failure", err)
	}
	if content(t, a) != "old a\n" || content(t, c) != "old c\n" {
		t.Errorf("not restored: a %q, c %q", content(t, a), content(t, c))
	}
	if _, err := os.Stat(b); err == nil {
		t.Error("a new file of the failed commit is left in place")
	}
	noStaging(t, dir)
	noStaging(t, other)
}

// TestCommitRefusesADirectoryTarget: a target that became a directory after
// Add is refused before anything moves.
func TestCommitRefusesADirectoryTarget(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	a, d := filepath.Join(dir, "a.csv"), filepath.Join(dir, "d.csv")
	write(t, a, "old a\n")
	s := NewSet("run-5")
	for _, p := range []string{a, d} {
		if err := s.Add(p, text("new\n")); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.Mkdir(d, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := s.Commit(context.Background()); !errors.Is(err, ErrRefused) || !strings.Contains(err.Error(), "directory") {
		t.Fatalf("Commit = %v, want a refusal of the directory", err)
	}
	if content(t, a) != "old a\n" {
		t.Error("previous file changed")
	}
	noStaging(t, dir)
}

func TestAddTwicePanics(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	s := NewSet("run-6")
	defer s.Abort()
	p := filepath.Join(dir, "a.csv")
	if err := s.Add(p, text("x")); err != nil {
		t.Fatal(err)
	}
	defer func() {
		if recover() == nil {
			t.Error("no panic")
		}
	}()
	s.Add(filepath.Join(dir, ".", "a.csv"), text("y"))
}

// TestCheckWritable: an output whose directory takes no new file is refused
// by Check, before any work (a run once found out after its simulation):
// a read-only directory (when not root: root writes anywhere); a "directory"
// that is a regular file is an error too. The probe leaves nothing behind.
func TestCheckWritable(t *testing.T) {
	dir := t.TempDir()
	notDir := filepath.Join(dir, "file")
	write(t, notDir, "x")
	if err := Check(filepath.Join(notDir, "r.html"), nil, false); err == nil || !strings.Contains(err.Error(), "not a directory") {
		t.Errorf("under a regular file: %v", err)
	}
	if os.Geteuid() == 0 {
		t.Log("root writes anywhere: the read-only directory is not checked")
	} else {
		ro := filepath.Join(dir, "ro")
		os.Mkdir(ro, 0o555)
		if err := Check(filepath.Join(ro, "r.html"), nil, false); !errors.Is(err, ErrRefused) ||
			!strings.Contains(err.Error(), "does not take new files") {
			t.Errorf("read-only directory: %v", err)
		}
		os.Chmod(ro, 0o755)
	}
	if err := Check(filepath.Join(dir, "new", "r.html"), nil, false); err != nil {
		t.Errorf("one level to make: %v", err)
	}
	ents, _ := os.ReadDir(dir)
	for _, e := range ents {
		if strings.HasPrefix(e.Name(), ".wxstress-probe-") {
			t.Errorf("probe file left behind: %s", e.Name())
		}
	}
}
