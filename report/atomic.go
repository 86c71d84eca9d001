package report

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// Staged is an output file being written: its content goes to a temporary
// file in the target's folder, and only Commit makes it appear, by an
// atomic rename after an fsync. Abort (or a failed Commit) removes the
// temporary file, so a failed or interrupted run leaves no partial output.
type Staged struct {
	path string
	tmp  *os.File
	done bool
	// made lists the folders Stage created, deepest first; Abort removes
	// them again while they are empty.
	made []string
}

// Stage starts writing the file path. It refuses a path that names one of
// the inputs in protect (the scenario, a result file being re-rendered),
// and creates missing folders.
func Stage(path string, protect ...string) (*Staged, error) {
	abs, err := filepath.Abs(path)
	if err != nil {
		return nil, fmt.Errorf("output %s: %w", path, err)
	}
	for _, p := range protect {
		if p != "" && same(abs, p) {
			return nil, fmt.Errorf("output %s: refusing to overwrite an input file", path)
		}
	}
	if fi, err := os.Stat(abs); err == nil && fi.IsDir() {
		return nil, fmt.Errorf("output %s: is a directory", path)
	}
	dir := filepath.Dir(abs)
	made := missingDirs(dir)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("output %s: %w", path, err)
	}
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(abs)+".tmp-*")
	if err != nil {
		removeEmpty(made)
		return nil, fmt.Errorf("output %s: %w", path, err)
	}
	return &Staged{path: abs, tmp: tmp, made: made}, nil
}

// missingDirs lists dir and those of its parents that do not exist yet,
// deepest first.
func missingDirs(dir string) []string {
	var made []string
	for d := filepath.Clean(dir); ; d = filepath.Dir(d) {
		if _, err := os.Stat(d); err == nil || d == filepath.Dir(d) {
			return made
		}
		made = append(made, d)
	}
}

// removeEmpty removes the folders listed, deepest first, as long as they
// are empty (os.Remove leaves a folder that holds anything).
func removeEmpty(dirs []string) {
	for _, d := range dirs {
		os.Remove(d)
	}
}

// Write writes to the temporary file.
func (s *Staged) Write(p []byte) (int, error) { return s.tmp.Write(p) }

// Commit syncs the temporary file and renames it over the target.
func (s *Staged) Commit() error {
	if s.done {
		return errors.New("output " + s.path + ": already finished")
	}
	s.done = true
	err := s.tmp.Sync()
	if err == nil {
		err = s.tmp.Close()
	} else {
		s.tmp.Close()
	}
	if err == nil {
		err = os.Chmod(s.tmp.Name(), 0o644)
	}
	if err == nil {
		err = os.Rename(s.tmp.Name(), s.path)
	}
	if err != nil {
		os.Remove(s.tmp.Name())
		return fmt.Errorf("output %s: %w", s.path, err)
	}
	return nil
}

// Abort discards the temporary file. It is safe to call after Commit (it
// then does nothing), so callers may defer it.
func (s *Staged) Abort() {
	if s == nil || s.done {
		return
	}
	s.done = true
	s.tmp.Close()
	os.Remove(s.tmp.Name())
	removeEmpty(s.made)
}

// WriteFileAtomic writes a file whole or not at all through Stage.
func WriteFileAtomic(path string, write func(w io.Writer) error, protect ...string) error {
	st, err := Stage(path, protect...)
	if err != nil {
		return err
	}
	defer st.Abort()
	if err := write(st); err != nil {
		return fmt.Errorf("output %s: %w", path, err)
	}
	return st.Commit()
}

// SamePath reports whether the paths a and b name the same file (by
// identity when both exist, else by absolute path), as Stage and
// WriteFileAtomic judge an output against the inputs they protect.
func SamePath(a, b string) bool {
	abs, err := filepath.Abs(a)
	return err == nil && same(abs, b)
}

// same reports whether the absolute path a and the path b name the same
// file.
func same(a, b string) bool {
	ai, err1 := os.Stat(a)
	bi, err2 := os.Stat(b)
	if err1 != nil || err2 != nil {
		ab, _ := filepath.Abs(b)
		return a == ab
	}
	return os.SameFile(ai, bi)
}
