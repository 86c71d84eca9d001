package scenarios

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestLoad(t *testing.T) {
	dir := t.TempDir()
	write := func(name, data string) string {
		t.Helper()
		p := filepath.Join(dir, name)
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte(data), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	good := write("sub/good.yaml", oneParam("{dist: empirical, file: data/g.csv, column: g}"))
	write("sub/data/g.csv", "g\n1\n2\n3\n")
	s, err := Load(good)
	if err != nil {
		t.Fatal(err)
	}
	if s.File != good || s.Params[0].Dist.Median() != 2 {
		t.Errorf("File %q, median %v", s.File, s.Params[0].Dist.Median())
	}

	// A symbolic link inside the folder that points outside it is refused
	// by os.Root.
	write("outside.csv", "g\n1\n2\n")
	if err := os.Symlink(filepath.Join(dir, "outside.csv"), filepath.Join(dir, "sub", "link.csv")); err != nil {
		t.Skip("no symbolic links:", err)
	}
	escape := write("sub/escape.yaml", oneParam("{dist: empirical, file: link.csv, column: g}"))
	if _, err := Load(escape); err == nil || !strings.Contains(err.Error(), "parameters.a.file: cannot open \"link.csv\"") {
		t.Errorf("symbolic link out of the folder: %v", err)
	}

	big := write("big.yaml", "# "+strings.Repeat("x", MaxFileSize)+"\n")
	if _, err := Load(big); err == nil || err.Error() != big+": scenario file is larger than the 1 MiB limit" {
		t.Errorf("big file: %v", err)
	}
	if _, err := Load(filepath.Join(dir, "missing.yaml")); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("missing file: %v", err)
	}
	if _, err := Load(dir); err == nil || !strings.Contains(err.Error(), "is a folder") {
		t.Errorf("a folder as a scenario: %v", err)
	}
	if _, err := Parse("x.yaml", []byte(strings.Repeat(" ", MaxFileSize+1)), nil); err == nil ||
		err.Error() != "x.yaml: scenario file is larger than the 1 MiB limit" {
		t.Errorf("Parse of big data: %v", err)
	}
}

// TestDeepNesting feeds deeply nested flow collections, which must give an
// error and not exhaust the stack.
func TestDeepNesting(t *testing.T) {
	for _, src := range []string{
		"holdfast: 1\nx: " + strings.Repeat("[", 100000) + strings.Repeat("]", 100000) + "\n",
		"holdfast: 1\nx: " + strings.Repeat("{a: ", 5000) + "1" + strings.Repeat("}", 5000) + "\n",
	} {
		if _, err := Parse("deep.yaml", []byte(src), nil); err == nil {
			t.Error("deep nesting accepted")
		}
	}
}
