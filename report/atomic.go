package report

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// WriteFileAtomic writes a file whole or not at all: the content goes to a
// temporary file in the target's folder, which is synced and then renamed
// over the target. If write fails, or the target names one of the inputs
// listed in protect, nothing is left behind. Missing folders are created.
func WriteFileAtomic(path string, write func(w io.Writer) error, protect ...string) (err error) {
	abs, err := filepath.Abs(path)
	if err != nil {
		return fmt.Errorf("output %s: %w", path, err)
	}
	for _, p := range protect {
		if p == "" {
			continue
		}
		if same(abs, p) {
			return fmt.Errorf("output %s: refusing to overwrite an input file", path)
		}
	}
	dir := filepath.Dir(abs)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("output %s: %w", path, err)
	}
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(abs)+".tmp-*")
	if err != nil {
		return fmt.Errorf("output %s: %w", path, err)
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	if err = write(tmp); err != nil {
		return fmt.Errorf("output %s: %w", path, err)
	}
	if err = tmp.Sync(); err != nil {
		return fmt.Errorf("output %s: %w", path, err)
	}
	if err = tmp.Close(); err != nil {
		return fmt.Errorf("output %s: %w", path, err)
	}
	if err = os.Chmod(tmp.Name(), 0o644); err != nil {
		return fmt.Errorf("output %s: %w", path, err)
	}
	if err = os.Rename(tmp.Name(), abs); err != nil {
		return fmt.Errorf("output %s: %w", path, err)
	}
	return nil
}

// same reports whether two paths name the same existing file.
func same(a, b string) bool {
	ai, err1 := os.Stat(a)
	bi, err2 := os.Stat(b)
	if err1 != nil || err2 != nil {
		ab, _ := filepath.Abs(b)
		return a == ab
	}
	return os.SameFile(ai, bi)
}
