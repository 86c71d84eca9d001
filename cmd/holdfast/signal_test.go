package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

func TestTerminatedRunLeavesNoOutput(t *testing.T) {
	// A run stopped by SIGTERM must end within a second and leave none of
	// its output files or folders (common practice for batch tools, no
	// source).
	if testing.Short() {
		t.Skip("builds the binary")
	}
	dir := t.TempDir()
	bin := filepath.Join(dir, "holdfast")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("build: %v\n%s", err, out)
	}
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
