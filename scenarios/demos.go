package scenarios

import (
	"embed"
	"fmt"
	"io/fs"
	"path"
	"slices"
	"strings"
)

// demoFS holds the demo scenarios, one demos/NAME.yaml file each.
//
//go:embed demos
var demoFS embed.FS

// demoDir is the demos folder; CSV files a demo names are read from it.
func demoDir() fs.FS {
	sub, err := fs.Sub(demoFS, "demos")
	if err != nil { // cannot happen: the folder is embedded
		return nil
	}
	return sub
}

// Demos returns the names of the embedded demo scenarios, sorted.
func Demos() []string {
	entries, err := fs.ReadDir(demoFS, "demos")
	if err != nil {
		return nil
	}
	var names []string
	for _, e := range entries {
		if name, ok := strings.CutSuffix(e.Name(), ".yaml"); ok && !e.IsDir() {
			names = append(names, name)
		}
	}
	slices.Sort(names)
	return names
}

// DemoSource returns the YAML text of the named demo, for printing as a
// starting point for a scenario of one's own.
func DemoSource(name string) ([]byte, error) {
	if !slices.Contains(Demos(), name) {
		return nil, unknownDemo(name)
	}
	return demoFS.ReadFile(path.Join("demos", name+".yaml"))
}

// LoadDemo parses the named embedded demo scenario ("lake", "fishery",
// "reactor", "tank"; see Demos). Its File is "demo:NAME". Each call returns
// a new Scenario, which the caller may change (with Set, say).
func LoadDemo(name string) (*Scenario, error) {
	data, err := DemoSource(name)
	if err != nil {
		return nil, err
	}
	return Parse(DemoPrefix+name, data, demoDir())
}

func unknownDemo(name string) error {
	demos := Demos()
	return fmt.Errorf("unknown demo %s%s (demos: %s)", quoteShort(name), didYouMean(name, demos), strings.Join(demos, ", "))
}
