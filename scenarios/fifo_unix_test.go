//go:build unix

package scenarios

import (
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

func TestNamedPipesAreRefused(t *testing.T) {
	// A named pipe blocks its reader until someone writes to it (POSIX
	// open(2)): it is refused before it is opened, as scenario and as CSV
	// file, so that a mistaken path cannot hang the tool.
	dir := t.TempDir()
	fifo := filepath.Join(dir, "pipe.yaml")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skip("no named pipes:", err)
	}
	if _, err := Load(fifo); err == nil || !strings.Contains(err.Error(), "named pipe") {
		t.Errorf("named pipe as scenario: %v", err)
	}
	if err := syscall.Mkfifo(filepath.Join(dir, "pipe.csv"), 0o644); err != nil {
		t.Fatal(err)
	}
	piped := filepath.Join(dir, "piped.yaml")
	if err := os.WriteFile(piped, []byte(oneParam("{dist: empirical, file: pipe.csv, column: g}")), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Load(piped); err == nil || !strings.Contains(err.Error(), "not a regular file") {
		t.Errorf("named pipe as CSV file: %v", err)
	}
}
