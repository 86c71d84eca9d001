package scenarios

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestBadCatalogue loads every malformed scenario in testdata/bad and checks
// that Load fails with exactly the first error line in the matching .want
// file. The files are loaded from inside that folder so that messages name
// them as "NN-name.yaml:line:col".
func TestBadCatalogue(t *testing.T) {
	t.Chdir(filepath.Join("..", "testdata", "bad"))
	files, err := filepath.Glob("*.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if len(files) < 20 {
		t.Fatalf("catalogue holds %d cases, want at least 20", len(files))
	}
	wants, _ := filepath.Glob("*.want")
	if len(wants) != len(files) {
		t.Errorf("%d .yaml cases but %d .want files", len(files), len(wants))
	}
	for _, file := range files {
		t.Run(strings.TrimSuffix(file, ".yaml"), func(t *testing.T) {
			raw, err := os.ReadFile(strings.TrimSuffix(file, ".yaml") + ".want")
			if err != nil {
				t.Fatal(err)
			}
			want := strings.TrimRight(string(raw), "\n")
			s, err := Load(file)
			if err == nil && (strings.Contains(want, ": rate: ") || strings.Contains(want, ": define.")) {
				// A rate-law error: this package keeps expressions as text,
				// and the compiler's tests check these cases.
				t.Skip("rate-law error, checked where the rate law is compiled")
			}
			if err == nil {
				t.Fatalf("Load succeeded (title %q), want error %q", s.Title, want)
			}
			var list ErrorList
			if !errors.As(err, &list) || len(list) == 0 {
				t.Fatalf("error %v (%T) is not an ErrorList", err, err)
			}
			first, _, _ := strings.Cut(err.Error(), "\n")
			if first != want {
				t.Errorf("first error\n got: %s\nwant: %s", first, want)
			}
			if first != list[0].Error() {
				t.Errorf("ErrorList.Error() starts %q, list[0] is %q", first, list[0].Error())
			}
		})
	}
}
