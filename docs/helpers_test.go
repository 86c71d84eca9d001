package docs

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"

	"go.yaml.in/yaml/v3"
)

// This file holds what the tests need to read the examples: a decoder for
// the few Kubernetes kinds the manifests use, a small shell-word splitter for
// the holdfast lines of the scripts, and helpers for command-line flags.

// ---- Kubernetes manifests ------------------------------------------------

// The types below name only the fields the manifests in docs/kubernetes
// use, spelled as in the Kubernetes API (batch/v1 Job, core/v1 Pod and
// PersistentVolumeClaim). Manifests are decoded with KnownFields, so a
// misspelt or misplaced field fails the test instead of being ignored by
// the cluster's client-side defaults or reported only at apply time.

type objectMeta struct {
	Name   string            `yaml:"name"`
	Labels map[string]string `yaml:"labels"`
}

type jobManifest struct {
	APIVersion string     `yaml:"apiVersion"`
	Kind       string     `yaml:"kind"`
	Metadata   objectMeta `yaml:"metadata"`
	Spec       struct {
		CompletionMode       string `yaml:"completionMode"`
		Completions          *int   `yaml:"completions"`
		Parallelism          *int   `yaml:"parallelism"`
		BackoffLimit         *int   `yaml:"backoffLimit"`
		BackoffLimitPerIndex *int   `yaml:"backoffLimitPerIndex"`
		MaxFailedIndexes     *int   `yaml:"maxFailedIndexes"`
		Template             struct {
			Metadata objectMeta `yaml:"metadata"`
			Spec     podSpec    `yaml:"spec"`
		} `yaml:"template"`
	} `yaml:"spec"`
}

type podManifest struct {
	APIVersion string     `yaml:"apiVersion"`
	Kind       string     `yaml:"kind"`
	Metadata   objectMeta `yaml:"metadata"`
	Spec       podSpec    `yaml:"spec"`
}

type pvcManifest struct {
	APIVersion string     `yaml:"apiVersion"`
	Kind       string     `yaml:"kind"`
	Metadata   objectMeta `yaml:"metadata"`
	Spec       struct {
		AccessModes      []string `yaml:"accessModes"`
		StorageClassName *string  `yaml:"storageClassName"`
		Resources        struct {
			Requests map[string]string `yaml:"requests"`
		} `yaml:"resources"`
	} `yaml:"spec"`
}

type podSpec struct {
	RestartPolicy   string `yaml:"restartPolicy"`
	SecurityContext *struct {
		RunAsNonRoot *bool `yaml:"runAsNonRoot"`
		RunAsUser    *int  `yaml:"runAsUser"`
		RunAsGroup   *int  `yaml:"runAsGroup"`
		FSGroup      *int  `yaml:"fsGroup"`
	} `yaml:"securityContext"`
	Containers []container `yaml:"containers"`
	Volumes    []volume    `yaml:"volumes"`
}

type container struct {
	Name      string   `yaml:"name"`
	Image     string   `yaml:"image"`
	Command   []string `yaml:"command"`
	Args      []string `yaml:"args"`
	Resources struct {
		Requests map[string]string `yaml:"requests"`
		Limits   map[string]string `yaml:"limits"`
	} `yaml:"resources"`
	VolumeMounts []struct {
		Name      string `yaml:"name"`
		MountPath string `yaml:"mountPath"`
		ReadOnly  bool   `yaml:"readOnly"`
	} `yaml:"volumeMounts"`
}

type volume struct {
	Name      string `yaml:"name"`
	ConfigMap *struct {
		Name string `yaml:"name"`
	} `yaml:"configMap"`
	PersistentVolumeClaim *struct {
		ClaimName string `yaml:"claimName"`
		ReadOnly  bool   `yaml:"readOnly"`
	} `yaml:"persistentVolumeClaim"`
}

// manifests holds every object of the YAML files in one folder.
type manifests struct {
	jobs map[string]*jobManifest // by file name
	pods map[string]*podManifest
	pvcs map[string]*pvcManifest
}

// loadManifests decodes every *.yaml file in dir: one object per file,
// strictly (unknown fields are errors).
func loadManifests(dir string) (*manifests, error) {
	files, err := filepath.Glob(filepath.Join(dir, "*.yaml"))
	if err != nil {
		return nil, err
	}
	if len(files) == 0 {
		return nil, fmt.Errorf("no *.yaml files in %s", dir)
	}
	m := &manifests{jobs: map[string]*jobManifest{}, pods: map[string]*podManifest{}, pvcs: map[string]*pvcManifest{}}
	for _, f := range files {
		raw, err := os.ReadFile(f)
		if err != nil {
			return nil, err
		}
		var head struct {
			APIVersion string `yaml:"apiVersion"`
			Kind       string `yaml:"kind"`
		}
		if err := yaml.Unmarshal(raw, &head); err != nil {
			return nil, fmt.Errorf("%s: %w", f, err)
		}
		base := filepath.Base(f)
		var target any
		switch head.Kind {
		case "Job":
			j := new(jobManifest)
			m.jobs[base], target = j, j
		case "Pod":
			p := new(podManifest)
			m.pods[base], target = p, p
		case "PersistentVolumeClaim":
			p := new(pvcManifest)
			m.pvcs[base], target = p, p
		default:
			return nil, fmt.Errorf("%s: kind %q is not one the examples use", f, head.Kind)
		}
		dec := yaml.NewDecoder(bytes.NewReader(raw))
		dec.KnownFields(true)
		if err := dec.Decode(target); err != nil {
			return nil, fmt.Errorf("%s: %w", f, err)
		}
		var extra any
		if err := dec.Decode(&extra); err == nil {
			return nil, fmt.Errorf("%s: holds more than one object; the examples keep one per file", f)
		}
	}
	return m, nil
}

// ---- shell words ---------------------------------------------------------

// word is one shell word after quote removal. glob reports an unquoted * or
// ? in it, which the shell would expand against the file system.
type word struct {
	text string
	glob bool
}

// holdfastLines returns the lines of a shell script that start with the
// word holdfast, with backslash-newline continuations joined. This is the
// one convention the tests rely on: every holdfast invocation in a script
// or a `sh -c` string is a plain command line beginning with "holdfast".
func holdfastLines(script string) []string {
	joined := strings.ReplaceAll(script, "\\\n", " ")
	var out []string
	for _, line := range strings.Split(joined, "\n") {
		line = strings.TrimSpace(line)
		if strings.HasPrefix(line, "holdfast ") {
			out = append(out, line)
		}
	}
	return out
}

var varName = regexp.MustCompile(`^[A-Za-z_][A-Za-z0-9_]*|^[0-9]`)

// shellWords splits one simple command line the way a POSIX shell would:
// single and double quotes, backslash escapes, $NAME and ${NAME} expanded
// from vars (an unknown name is an error, so the test never runs a command
// with a silently empty argument). Anything beyond a simple command —
// pipes, lists, redirections, command substitution — is an error: the
// examples keep their holdfast lines simple, and the test says so when one
// is not.
func shellWords(line string, vars map[string]string) ([]word, error) {
	var (
		words  []word
		cur    strings.Builder
		glob   bool
		inWord bool
		single bool
		double bool
	)
	flush := func() {
		if inWord {
			words = append(words, word{text: cur.String(), glob: glob})
		}
		cur.Reset()
		glob, inWord = false, false
	}
	expand := func(rest string) (int, error) {
		// rest starts just after '$'; returns the bytes consumed.
		if strings.HasPrefix(rest, "(") {
			return 0, errors.New("command substitution $(...) is not supported")
		}
		braced := strings.HasPrefix(rest, "{")
		s := rest
		if braced {
			s = rest[1:]
		}
		name := varName.FindString(s)
		if name == "" {
			return 0, fmt.Errorf("cannot read the variable after $ in %q", "$"+rest)
		}
		n := len(name)
		if braced {
			if !strings.HasPrefix(s[n:], "}") {
				return 0, fmt.Errorf("only plain ${NAME} is supported, not %q", "$"+rest)
			}
			n += 2
		}
		v, ok := vars[name]
		if !ok {
			return 0, fmt.Errorf("undefined variable $%s", name)
		}
		cur.WriteString(v)
		inWord = true
		return n, nil
	}
	for i := 0; i < len(line); i++ {
		c := line[i]
		switch {
		case single:
			if c == '\'' {
				single = false
			} else {
				cur.WriteByte(c)
			}
		case double:
			switch c {
			case '"':
				double = false
			case '\\':
				if i+1 < len(line) && strings.IndexByte("\"\\$`", line[i+1]) >= 0 {
					i++
				}
				cur.WriteByte(line[i])
			case '$':
				n, err := expand(line[i+1:])
				if err != nil {
					return nil, err
				}
				i += n
			case '`':
				return nil, errors.New("command substitution `...` is not supported")
			default:
				cur.WriteByte(c)
			}
		default:
			switch c {
			case ' ', '\t':
				flush()
			case '\'':
				single, inWord = true, true
			case '"':
				double, inWord = true, true
			case '\\':
				if i+1 < len(line) {
					i++
					cur.WriteByte(line[i])
					inWord = true
				}
			case '$':
				n, err := expand(line[i+1:])
				if err != nil {
					return nil, err
				}
				i += n
			case '#':
				if !inWord {
					flush()
					return words, nil
				}
				cur.WriteByte(c)
			case ';', '|', '&', '<', '>', '(', ')', '`':
				return nil, fmt.Errorf("shell syntax %q is not supported in a holdfast line", string(c))
			case '*', '?', '[':
				glob = true
				cur.WriteByte(c)
				inWord = true
			default:
				cur.WriteByte(c)
				inWord = true
			}
		}
	}
	if single || double {
		return nil, errors.New("unterminated quote")
	}
	flush()
	return words, nil
}

// texts returns the words' texts.
func texts(ws []word) []string {
	out := make([]string, len(ws))
	for i, w := range ws {
		out[i] = w.text
	}
	return out
}

// literal wraps plain arguments (a container's command list) as words that
// no shell will expand.
func literal(args []string) []word {
	out := make([]word, len(args))
	for i, a := range args {
		out[i] = word{text: a}
	}
	return out
}

// shellQuote renders args as one line a reader can paste into a shell.
func shellQuote(args []string) string {
	var b strings.Builder
	for i, a := range args {
		if i > 0 {
			b.WriteByte(' ')
		}
		if a != "" && strings.IndexFunc(a, func(r rune) bool {
			return !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || strings.ContainsRune("-_./=:{}+,@%", r))
		}) < 0 {
			b.WriteString(a)
			continue
		}
		b.WriteString("'" + strings.ReplaceAll(a, "'", `'\''`) + "'")
	}
	return b.String()
}

// ---- flags ---------------------------------------------------------------

// flagValue returns the value of --name in args, written as "--name v" or
// "--name=v".
func flagValue(ws []word, name string) (string, bool) {
	for i, w := range ws {
		if w.text == name && i+1 < len(ws) {
			return ws[i+1].text, true
		}
		if v, ok := strings.CutPrefix(w.text, name+"="); ok {
			return v, true
		}
	}
	return "", false
}

// withFlag returns ws with --name set to value: replaced where it is,
// appended otherwise.
func withFlag(ws []word, name, value string) []word {
	out := append([]word(nil), ws...)
	for i, w := range out {
		if w.text == name && i+1 < len(out) {
			out[i+1] = word{text: value}
			return out
		}
		if strings.HasPrefix(w.text, name+"=") {
			out[i] = word{text: name + "=" + value}
			return out
		}
	}
	return append(out, word{text: name}, word{text: value})
}

// withoutFlag returns ws without --name and its value.
func withoutFlag(ws []word, name string) []word {
	var out []word
	for i := 0; i < len(ws); i++ {
		if ws[i].text == name {
			i++
			continue
		}
		if strings.HasPrefix(ws[i].text, name+"=") {
			continue
		}
		out = append(out, ws[i])
	}
	return out
}

// expandGlobs expands the words marked as globs against dir, as the shell
// would in that working directory: matches are returned relative to dir,
// sorted; a pattern without matches stays as it is (POSIX sh behaviour).
func expandGlobs(ws []word, dir string) ([]string, error) {
	var out []string
	for _, w := range ws {
		if !w.glob {
			out = append(out, w.text)
			continue
		}
		pattern := w.text
		if !filepath.IsAbs(pattern) {
			pattern = filepath.Join(dir, pattern)
		}
		matches, err := filepath.Glob(pattern)
		if err != nil {
			return nil, fmt.Errorf("pattern %q: %w", w.text, err)
		}
		if len(matches) == 0 {
			out = append(out, w.text)
			continue
		}
		for _, m := range matches {
			if !filepath.IsAbs(w.text) {
				if rel, err := filepath.Rel(dir, m); err == nil {
					m = rel
				}
			}
			out = append(out, m)
		}
	}
	return out, nil
}

// ---- Slurm directives ----------------------------------------------------

// sbatchOptions returns the #SBATCH options of a batch script, written in
// the long form --name=value (the form the examples use).
func sbatchOptions(script string) (map[string]string, error) {
	opts := map[string]string{}
	for _, line := range strings.Split(script, "\n") {
		rest, ok := strings.CutPrefix(line, "#SBATCH ")
		if !ok {
			continue
		}
		rest = strings.TrimSpace(rest)
		name, value, ok := strings.Cut(rest, "=")
		if !ok || !strings.HasPrefix(name, "--") {
			return nil, fmt.Errorf("#SBATCH %s: the examples write options as --name=value", rest)
		}
		opts[name] = value
	}
	return opts, nil
}
