package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"
)

// binary builds the holdfast binary once per test process, for the tests
// that run it as separate processes, and returns its path.
func binary(t *testing.T) string {
	t.Helper()
	if testing.Short() {
		t.Skip("builds the binary")
	}
	build.Do(func() {
		dir, err := os.MkdirTemp("", "holdfast-test-bin-")
		if err != nil {
			build.err = err
			return
		}
		build.dir = dir
		build.path = filepath.Join(dir, "holdfast")
		if out, err := exec.Command("go", "build", "-o", build.path, ".").CombinedOutput(); err != nil {
			build.err = err
			build.out = out
		}
	})
	if build.err != nil {
		t.Fatalf("build: %v\n%s", build.err, build.out)
	}
	return build.path
}

var build struct {
	sync.Once
	dir, path string
	out       []byte
	err       error
}

func TestMain(m *testing.M) {
	code := m.Run()
	if build.dir != "" {
		os.RemoveAll(build.dir)
	}
	os.Exit(code)
}

func TestTerminatedRunLeavesNoOutput(t *testing.T) {
	// A run stopped by SIGTERM must end within a second and leave none of
	// its output files or folders (common practice for batch tools, no
	// source).
	dir := t.TempDir()
	bin := binary(t)
	work := filepath.Join(dir, "work")
	if err := os.Mkdir(work, 0o755); err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(bin, "assess", "demo:lake", "--draws", "50000000", "--quiet",
		"--out", "r.json", "--draws-csv", "d.csv", "--report", "r.md", "--report", "out/r.html")
	cmd.Dir = work
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	time.Sleep(1500 * time.Millisecond)
	sent := time.Now()
	if err := cmd.Process.Signal(syscall.SIGTERM); err != nil {
		t.Fatal(err)
	}
	err := cmd.Wait()
	if took := time.Since(sent); took > time.Second {
		t.Errorf("stopped %v after SIGTERM, want within 1 s", took)
	}
	if ee, ok := err.(*exec.ExitError); !ok || ee.ExitCode() != exitFailure {
		t.Errorf("exit %v, want status %d", err, exitFailure)
	}
	if !strings.Contains(stderr.String(), "interrupted") {
		t.Errorf("stderr %q does not say the run was interrupted", stderr.String())
	}
	left, _ := os.ReadDir(work)
	for _, e := range left {
		t.Errorf("left behind: %s", e.Name())
	}
}
