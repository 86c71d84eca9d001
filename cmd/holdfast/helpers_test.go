package main

import (
	"bytes"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// holdfast runs the command line in-process and returns stdout, stderr and
// the exit status.
func holdfast(t *testing.T, args ...string) (string, string, int) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return out.String(), errb.String(), code
}

// runOK runs the command line in-process and returns stdout, failing the
// test at once on a non-zero exit status.
func runOK(t *testing.T, args ...string) string {
	t.Helper()
	stdout, stderr, code := holdfast(t, args...)
	if code != exitOK {
		t.Fatalf("%v: exit %d: %s", args, code, stderr)
	}
	return stdout
}

// noTrace fails when output looks like a Go panic or stack trace.
func noTrace(t *testing.T, s string) {
	t.Helper()
	for _, bad := range []string{"panic:", "goroutine ", ".go:", "runtime."} {
		if strings.Contains(s, bad) {
			t.Errorf("output contains %q:\n%s", bad, s)
		}
	}
}

// runBad runs a command line that must be refused as bad input: exit
// status 2, nothing on stdout, no stack trace. It returns stderr.
func runBad(t *testing.T, args ...string) string {
	t.Helper()
	stdout, stderr, code := holdfast(t, args...)
	if code != exitBad {
		t.Errorf("%v: exit %d, want 2 (%s)", args, code, stderr)
	}
	if stdout != "" {
		t.Errorf("%v: wrote to stdout: %q", args, stdout)
	}
	noTrace(t, stderr)
	return stderr
}

// expectBad runs a command line that must be refused as bad input (see
// runBad) with a message that mentions want.
func expectBad(t *testing.T, args []string, want string) {
	t.Helper()
	if stderr := runBad(t, args...); !strings.Contains(stderr, want) {
		t.Errorf("%v: message %q does not mention %q", args, stderr, want)
	}
}

// expectBadCatalogue runs every malformed scenario of testdata/bad (at
// least 40 cases) through each command, given as its name and then the
// flags that follow the scenario: each is refused as bad input (see runBad)
// with the case's expected first error line (FILE.want). The test runs in
// testdata/bad from then on.
func expectBadCatalogue(t *testing.T, commands ...[]string) {
	t.Helper()
	dir, err := filepath.Abs(filepath.Join("..", "..", "testdata", "bad"))
	if err != nil {
		t.Fatal(err)
	}
	t.Chdir(dir)
	files, _ := filepath.Glob("*.yaml")
	if len(files) < 40 {
		t.Fatalf("catalogue holds %d cases", len(files))
	}
	for _, file := range files {
		raw, err := os.ReadFile(strings.TrimSuffix(file, ".yaml") + ".want")
		if err != nil {
			t.Fatal(err)
		}
		want := "holdfast: " + strings.TrimRight(string(raw), "\n")
		for _, cmd := range commands {
			args := append([]string{cmd[0], file}, cmd[1:]...)
			stderr := runBad(t, args...)
			if first, _, _ := strings.Cut(stderr, "\n"); first != want {
				t.Errorf("%v:\n got: %s\nwant: %s", args, first, want)
			}
		}
	}
}

// noneLeft fails when dir holds anything but the entries named in keep:
// refused commands must write no file.
func noneLeft(t *testing.T, dir string, keep ...string) {
	t.Helper()
	entries, _ := os.ReadDir(dir)
	var left []string
	for _, e := range entries {
		if !slices.Contains(keep, e.Name()) {
			left = append(left, e.Name())
		}
	}
	if len(left) != 0 {
		t.Errorf("bad input left files behind: %v", left)
	}
}

// sameAcrossWorkers runs the command line, which must succeed, with each
// --workers value given and fails when stdout differs between them.
func sameAcrossWorkers(t *testing.T, args []string, workers ...string) {
	t.Helper()
	first := runOK(t, append(slices.Clip(args), "--workers", workers[0])...)
	for _, w := range workers[1:] {
		if got := runOK(t, append(slices.Clip(args), "--workers", w)...); got != first {
			t.Errorf("%v: output differs between %s and %s workers", args, workers[0], w)
		}
	}
}

// inTempDir makes a fresh temporary folder the test's working folder and
// returns its path.
func inTempDir(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	t.Chdir(dir)
	return dir
}

// lakeWithoutCurrent writes the lake demo's scenario without its current
// state to dir/name and returns the path. It reads the demo relative to
// the package folder, so call it before any t.Chdir.
func lakeWithoutCurrent(t *testing.T, dir, name string) string {
	t.Helper()
	lake := mustRead(t, filepath.Join("..", "..", "scenarios", "demos", "lake.yaml"))
	text := strings.Replace(string(lake), "  current: 1.2\n", "", 1)
	if text == string(lake) {
		t.Fatal("the lake demo has no line \"  current: 1.2\"")
	}
	path := filepath.Join(dir, name)
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// mustRead returns the file's bytes, failing the test at once when it
// cannot be read.
func mustRead(t *testing.T, p string) []byte {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return b
}
