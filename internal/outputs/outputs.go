package outputs

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"time"

	"wxstress/internal/atomicfile"
)

// ErrRefused is wrapped by every error about an output path that may not be
// written.
var ErrRefused = errors.New("output refused")

// RefusedError says why an output path may not be written.
type RefusedError struct {
	Path   string
	Reason string
}

func (e *RefusedError) Error() string {
	return fmt.Sprintf("outputs: refusing to write %s: %s", e.Path, e.Reason)
}

func (e *RefusedError) Unwrap() error { return ErrRefused }

// Check reports whether path may be written as an output of a run that
// reads inputs. It refuses, with a *RefusedError, a path that is one of the
// inputs, a symbolic link, an existing non-regular file (directory, device,
// FIFO, socket), or an existing regular file when force is false. A path
// that does not exist and is not an input passes. Errors other than "does
// not exist" from the file system are returned wrapped, without ErrRefused.
func Check(path string, inputs []string, force bool) error {
	refuse := func(format string, a ...any) error {
		return &RefusedError{Path: path, Reason: fmt.Sprintf(format, a...)}
	}
	abs, err := filepath.Abs(path)
	if err != nil {
		return fmt.Errorf("outputs: %s: %w", path, err)
	}
	st, statErr := os.Stat(path) // follows links: a link to an input is that input
	for _, in := range inputs {
		if inAbs, err := filepath.Abs(in); err == nil && inAbs == abs {
			return refuse("it is an input of this run (%s)", in)
		}
		if statErr != nil {
			continue
		}
		if ist, err := os.Stat(in); err == nil && os.SameFile(st, ist) {
			return refuse("it is the same file as the input %s", in)
		}
	}
	lst, err := os.Lstat(path)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return writable(abs, refuse)
	case err != nil:
		return fmt.Errorf("outputs: %w", err)
	}
	if r := notRegular(lst.Mode()); r != "" {
		return refuse("%s", r)
	}
	if !force {
		return refuse("it exists; use --force to replace it")
	}
	return writable(abs, refuse)
}

// writable refuses an output whose directory (or, when that is still to
// be made, its parent) does not take a new file, found by creating and
// removing one: before any work, not after an hour's run.
func writable(abs string, refuse func(string, ...any) error) error {
	dir := filepath.Dir(abs)
	if _, err := os.Stat(dir); errors.Is(err, fs.ErrNotExist) {
		dir = filepath.Dir(dir) // a directory the run will make, one level deep
	}
	f, err := os.CreateTemp(dir, ".wxstress-probe-")
	if errors.Is(err, fs.ErrNotExist) {
		return nil // two levels missing: the run refuses that itself, as a likely typo
	}
	if err != nil {
		var pe *fs.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return refuse("its directory %s does not take new files (%v)", dir, err)
	}
	f.Close()
	os.Remove(f.Name())
	return nil
}

// notRegular describes a file mode that is not a regular file, or returns "".
func notRegular(m fs.FileMode) string {
	switch {
	case m.IsRegular():
		return ""
	case m&fs.ModeSymlink != 0:
		return "it is a symbolic link; name the file itself"
	case m.IsDir():
		return "it is a directory"
	case m&fs.ModeNamedPipe != 0:
		return "it is a named pipe (FIFO)"
	case m&(fs.ModeDevice|fs.ModeCharDevice) != 0:
		return "it is a device"
	case m&fs.ModeSocket != 0:
		return "it is a socket"
	}
	return "it is not a regular file"
}

// NewRunID returns a run id: the UTC time to the second and 8 random hex
// digits, e.g. "20250114T093012Z-5c1e09af".
func NewRunID() string {
	var b [4]byte
	rand.Read(b[:]) // crypto/rand.Read never fails (Go ≥ 1.24)
	return time.Now().UTC().Format("20060102T150405Z") + "-" + hex.EncodeToString(b[:])
}

// Set is a group of output files committed together; see the package
// documentation. The zero value is not usable: call NewSet.
type Set struct {
	runID  string
	stages map[string]string // target directory → its staging directory
	files  []staged
	seen   map[string]bool // absolute targets already added
	err    error           // the first failure; the set is then aborted
	closed bool            // committed or aborted

	// os.Rename and os.Link; tests inject failures.
	rename, link func(oldpath, newpath string) error
}

type staged struct {
	target, tmp string
}

// NewSet returns an empty set for run runID; "" means a fresh NewRunID.
func NewSet(runID string) *Set {
	if runID == "" {
		runID = NewRunID()
	}
	return &Set{runID: runID, stages: map[string]string{}, seen: map[string]bool{}, rename: os.Rename, link: os.Link}
}

// RunID returns the set's run id.
func (s *Set) RunID() string { return s.runID }

// Add writes an output file: fill writes its content, which goes to the
// staging directory beside path (created on first use) and reaches path on
// Commit. If fill or the write fails, the whole set is aborted and the
// error is returned (and returned again by Commit). Adding the same path
// twice, or adding after Commit or Abort, panics.
func (s *Set) Add(path string, fill func(io.Writer) error) error {
	if s.closed {
		panic("outputs: Add after Commit or Abort")
	}
	if s.err != nil {
		return s.err
	}
	abs, err := filepath.Abs(path)
	if err != nil {
		return s.fail(fmt.Errorf("outputs: %s: %w", path, err))
	}
	if s.seen[abs] {
		panic("outputs: " + path + " added twice")
	}
	s.seen[abs] = true
	dir := filepath.Dir(abs)
	stage, ok := s.stages[dir]
	if !ok {
		if stage, err = os.MkdirTemp(dir, ".wxstress-"+s.runID+"-"); err != nil {
			return s.fail(fmt.Errorf("outputs: staging %s: %w", path, err))
		}
		s.stages[dir] = stage
	}
	tmp := filepath.Join(stage, fmt.Sprintf("%03d-%s", len(s.files), filepath.Base(abs)))
	if err := atomicfile.Write(tmp, fill); err != nil {
		return s.fail(fmt.Errorf("outputs: %s: %w", path, err))
	}
	s.files = append(s.files, staged{target: abs, tmp: tmp})
	return nil
}

// fail records err, removes the staging directories and returns err.
func (s *Set) fail(err error) error {
	s.err = err
	s.removeStages()
	return err
}

// Commit moves every added file into place. It refuses to start when ctx is
// done (the set is then aborted); once started it runs to the end, since
// stopping half way would leave a mix of old and new files. Existing targets
// must be regular files. When a rename fails, the files moved so far are
// restored from their backups (or removed when they are new) before the
// error is returned. The staging directories, with the backups, are removed
// in every case. Commit on an empty set does nothing.
func (s *Set) Commit(ctx context.Context) error {
	if s.closed {
		panic("outputs: Commit after Commit or Abort")
	}
	if s.err != nil {
		s.closed = true
		return s.err
	}
	defer s.Abort()
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("outputs: not committing run %s: %w", s.runID, err)
	}
	// Refuse before moving anything.
	backups := make([]string, len(s.files)) // "" when the target is new
	for i, f := range s.files {
		st, err := os.Lstat(f.target)
		if errors.Is(err, fs.ErrNotExist) {
			continue
		}
		if err != nil {
			return fmt.Errorf("outputs: %w", err)
		}
		if r := notRegular(st.Mode()); r != "" {
			return &RefusedError{Path: f.target, Reason: r}
		}
		backups[i] = f.tmp + ".previous"
	}
	for i, f := range s.files {
		err := s.backUp(f.target, backups[i])
		if err == nil {
			err = s.rename(f.tmp, f.target)
		}
		if err != nil {
			// Put back what moved, newest first; the failed one may have
			// been moved aside by backUp without a replacement.
			for j := i; j >= 0; j-- {
				s.restore(s.files[j].target, backups[j], j < i)
			}
			return fmt.Errorf("outputs: committing %s (previous outputs restored): %w", f.target, err)
		}
	}
	for dir := range s.stages {
		syncDir(dir)
	}
	return nil
}

// backUp keeps the current target at backup ("" for a new target): as a
// hard link when the file system allows, so the target never disappears,
// else by renaming it aside.
func (s *Set) backUp(target, backup string) error {
	if backup == "" {
		return nil
	}
	if s.link(target, backup) == nil {
		return nil
	}
	return s.rename(target, backup)
}

// restore undoes one file's commit: the backup goes back over the target;
// a new target that was moved in is removed.
func (s *Set) restore(target, backup string, moved bool) {
	if backup != "" {
		if _, err := os.Lstat(backup); err == nil {
			os.Rename(backup, target)
		}
		return
	}
	if moved {
		os.Remove(target)
	}
}

// Abort removes the staging directories (and any backups in them) and
// leaves the targets as they are. It may be deferred: after Commit or
// another Abort it does nothing.
func (s *Set) Abort() {
	if s.closed {
		return
	}
	s.closed = true
	s.removeStages()
}

func (s *Set) removeStages() {
	for dir, stage := range s.stages {
		os.RemoveAll(stage)
		delete(s.stages, dir)
	}
}

// syncDir flushes a directory's entries (the renames) to disk; failures are
// ignored, since not every file system supports it.
func syncDir(dir string) {
	if d, err := os.Open(dir); err == nil {
		d.Sync()
		d.Close()
	}
}
