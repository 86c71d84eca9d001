package docs

// These tests keep the scale-out examples honest without a cluster.
//
// What they assume about the examples (keep these when you edit them):
//   - Every holdfast invocation is a plain command line that begins with the
//     word "holdfast": in a container's command list (kubernetes/*.yaml), in
//     the string of a `sh -c` command, or on a line of a script
//     (slurm/*.sbatch, continuation lines joined). Variables in script lines
//     are $NAME or "${NAME}" from the scheduler's environment.
//   - Each manifest file holds one object; #SBATCH options are written
//     --name=value.
//   - The shard command writes parts with --out ...{shard}..., and the merge
//     command reads them with the same pattern, {shard} replaced by *.
//   - Kubernetes paths are absolute under a volume's mountPath; the tests run
//     them relative to a temporary folder (/results → results).
//
// The run tests substitute small settings (--draws 2000, --workers 2), run
// every shard with the environment variables the scheduler sets, run the
// merge, run one unsharded `holdfast assess` with the same settings and the
// merge's --out path, and compare the two result files byte for byte. The
// single run works in a folder of its own with the same relative paths,
// because a result records the scenario path as given.

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"
)

// testDraws and testWorkers replace the examples' settings in the run tests.
const (
	testDraws   = "2000"
	testWorkers = "2"
)

// ---- the holdfast binary -------------------------------------------------

var (
	buildOnce sync.Once
	buildPath string
	buildErr  error
	buildDir  string // removed by TestMain
)

func TestMain(m *testing.M) {
	code := m.Run()
	if buildDir != "" {
		os.RemoveAll(buildDir)
	}
	os.Exit(code)
}

// holdfastBinary builds holdfast/cmd/holdfast once per test binary and
// returns its path; it skips the test where the go tool is not installed.
func holdfastBinary(t *testing.T) string {
	t.Helper()
	goTool, err := exec.LookPath("go")
	if err != nil {
		t.Skip("the go tool is not on PATH; cannot build holdfast to run the examples")
	}
	buildOnce.Do(func() {
		buildDir, buildErr = os.MkdirTemp("", "holdfast-docs-")
		if buildErr != nil {
			return
		}
		buildPath = filepath.Join(buildDir, "holdfast")
		cmd := exec.Command(goTool, "build", "-o", buildPath, "holdfast/cmd/holdfast")
		if out, err := cmd.CombinedOutput(); err != nil {
			buildErr = fmt.Errorf("go build holdfast/cmd/holdfast: %v\n%s", err, out)
		}
	})
	if buildErr != nil {
		t.Fatal(buildErr)
	}
	return buildPath
}

// result is one finished holdfast invocation.
type result struct {
	args           []string
	dir            string
	env            []string // the scheduler variables set, for messages
	stdout, stderr string
	err            error
}

// describe renders the invocation for a failure message: the command, where
// it ran, with which scheduler variables, its exit and its stderr.
func (r result) describe() string {
	env := ""
	if len(r.env) > 0 {
		env = strings.Join(r.env, " ") + " "
	}
	return fmt.Sprintf("command: %s%s\n  in: %s\n  exit: %v\n  stderr:\n%s",
		env, shellQuote(r.args), r.dir, r.err, indent(r.stderr))
}

func indent(s string) string {
	s = strings.TrimRight(s, "\n")
	if s == "" {
		return "    (empty)"
	}
	return "    " + strings.ReplaceAll(s, "\n", "\n    ")
}

// runHoldfast runs args (args[0] == "holdfast") with the built binary in
// dir. The scheduler variables of this process (Slurm's and Kubernetes'
// index) are removed, so that only schedEnv decides the shard.
func runHoldfast(t *testing.T, dir string, schedEnv []string, args []string) result {
	t.Helper()
	bin := holdfastBinary(t)
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	cmd := exec.CommandContext(ctx, bin, args[1:]...)
	cmd.Dir = dir
	for _, kv := range os.Environ() {
		if !strings.HasPrefix(kv, "SLURM_") && !strings.HasPrefix(kv, "JOB_COMPLETION_INDEX=") {
			cmd.Env = append(cmd.Env, kv)
		}
	}
	cmd.Env = append(cmd.Env, schedEnv...)
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	err := cmd.Run()
	return result{args: args, dir: dir, env: schedEnv, stdout: stdout.String(), stderr: stderr.String(), err: err}
}

// mustRun runs the command and fails the test with the command and its
// stderr if it does not succeed.
func mustRun(t *testing.T, dir string, schedEnv []string, args []string) result {
	t.Helper()
	r := runHoldfast(t, dir, schedEnv, args)
	if r.err != nil {
		t.Fatalf("holdfast failed\n%s", r.describe())
	}
	return r
}

// writeDemoScenario writes the lake demo's text to dir/rel, the way the
// walk-throughs do (holdfast demos lake > lake.yaml).
func writeDemoScenario(t *testing.T, dir, rel string) {
	t.Helper()
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	r := mustRun(t, dir, nil, []string{"holdfast", "demos", "lake"})
	path := filepath.Join(dir, rel)
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, []byte(r.stdout), 0o644); err != nil {
		t.Fatal(err)
	}
}

// sameFile compares two result files byte for byte and reports the first
// line that differs.
func sameFile(t *testing.T, merged, single string, how string) {
	t.Helper()
	a, err := os.ReadFile(merged)
	if err != nil {
		t.Fatalf("%s: %v", how, err)
	}
	b, err := os.ReadFile(single)
	if err != nil {
		t.Fatalf("%s: %v", how, err)
	}
	if bytes.Equal(a, b) {
		return
	}
	la, lb := strings.Split(string(a), "\n"), strings.Split(string(b), "\n")
	for i := 0; i < max(len(la), len(lb)); i++ {
		var x, y string
		if i < len(la) {
			x = la[i]
		}
		if i < len(lb) {
			y = lb[i]
		}
		if x != y {
			t.Fatalf("%s: the merged result differs from the single run (%d vs %d bytes)\n  merged %s\n  single %s\n  first difference at line %d:\n    merged: %s\n    single: %s",
				how, len(a), len(b), merged, single, i+1, x, y)
		}
	}
}

// ---- Kubernetes ----------------------------------------------------------

const k8sDir = "kubernetes"

// holdfastCommand returns the holdfast command line of a container: its
// command and args when they begin with holdfast, or the single holdfast
// line of a `sh -c` string.
func holdfastCommand(c container, vars map[string]string) ([]word, error) {
	all := append(append([]string(nil), c.Command...), c.Args...)
	switch {
	case len(all) > 0 && all[0] == "holdfast":
		return literal(all), nil
	case len(all) == 3 && slices.Contains([]string{"sh", "/bin/sh", "bash", "/bin/bash"}, all[0]) && all[1] == "-c":
		lines := holdfastLines(all[2])
		if len(lines) != 1 {
			return nil, fmt.Errorf("container %s: want one holdfast line in its sh -c string, found %d", c.Name, len(lines))
		}
		return shellWords(lines[0], vars)
	}
	return nil, fmt.Errorf("container %s: its command %q is neither holdfast ... nor sh -c \"holdfast ...\"", c.Name, all)
}

// mountPaths returns the container's mount paths by volume name.
func mountPaths(c container) map[string]string {
	m := map[string]string{}
	for _, vm := range c.VolumeMounts {
		m[vm.Name] = vm.MountPath
	}
	return m
}

// underMount reports whether the absolute path p lies in one of the
// container's mounted volumes.
func underMount(c container, p string) bool {
	for _, vm := range c.VolumeMounts {
		if p == vm.MountPath || strings.HasPrefix(p, strings.TrimSuffix(vm.MountPath, "/")+"/") {
			return true
		}
	}
	return false
}

// relocate turns the container's absolute paths under its mounts into paths
// relative to the test's working folder (/results/x → results/x).
func relocate(c container, ws []word) []word {
	out := make([]word, len(ws))
	for i, w := range ws {
		out[i] = w
		if strings.HasPrefix(w.text, "/") && underMount(c, w.text) {
			out[i].text = strings.TrimPrefix(w.text, "/")
		}
	}
	return out
}

// shardAutoN returns N from "--shard auto/N".
func shardAutoN(ws []word) (int, error) {
	v, ok := flagValue(ws, "--shard")
	if !ok {
		return 0, fmt.Errorf("no --shard in %s", shellQuote(texts(ws)))
	}
	s, ok := strings.CutPrefix(v, "auto/")
	if !ok {
		return 0, fmt.Errorf("--shard %s: the Kubernetes example must use auto/N", v)
	}
	return strconv.Atoi(s)
}

// TestKubernetesManifests checks the fields that must agree for the Job to
// run and the merge to find its parts. It needs no binary and no cluster.
func TestKubernetesManifests(t *testing.T) {
	m, err := loadManifests(k8sDir)
	if err != nil {
		t.Fatal(err)
	}
	assess, merge, rerun := m.jobs["assess-job.yaml"], m.jobs["merge-job.yaml"], m.jobs["rerun-shard-job.yaml"]
	pvc, reader := m.pvcs["results-pvc.yaml"], m.pods["results-reader.yaml"]
	if assess == nil || merge == nil || rerun == nil || pvc == nil || reader == nil {
		t.Fatalf("want Jobs in assess-job.yaml, merge-job.yaml, rerun-shard-job.yaml, a claim in results-pvc.yaml and a Pod in results-reader.yaml; have jobs %v, claims %v, pods %v",
			keys(m.jobs), keys(m.pvcs), keys(m.pods))
	}

	// API groups: Job is batch/v1, Pod and PersistentVolumeClaim core v1.
	for name, j := range m.jobs {
		if j.APIVersion != "batch/v1" {
			t.Errorf("%s: apiVersion %q, want batch/v1", name, j.APIVersion)
		}
		if j.Spec.Template.Spec.RestartPolicy != "Never" {
			t.Errorf("%s: restartPolicy %q, want Never (a failed shard is a new pod, and backoffLimitPerIndex requires it)", name, j.Spec.Template.Spec.RestartPolicy)
		}
	}
	for name, v := range map[string]string{"results-pvc.yaml": pvc.APIVersion, "results-reader.yaml": reader.APIVersion} {
		if v != "v1" {
			t.Errorf("%s: apiVersion %q, want v1", name, v)
		}
	}

	// The claim is shared by pods on different nodes at once; ReadWriteMany
	// is the core/v1 access mode for that (kubernetes.io, Persistent Volumes).
	if !slices.Contains(pvc.Spec.AccessModes, "ReadWriteMany") {
		t.Errorf("results-pvc.yaml: accessModes %v, want ReadWriteMany", pvc.Spec.AccessModes)
	}
	if pvc.Spec.Resources.Requests["storage"] == "" {
		t.Errorf("results-pvc.yaml: no storage request")
	}

	// The Indexed Job: one pod per shard, the index from the environment.
	// Source: Kubernetes batch/v1 JobSpec (completionMode Indexed gives pods
	// the indexes 0..completions−1 in JOB_COMPLETION_INDEX; kubernetes.io,
	// "Indexed Job"), and the backoffLimitPerIndex examples on kubernetes.io
	// (requires completionMode Indexed and restartPolicy Never).
	a := assess.Spec
	if a.CompletionMode != "Indexed" {
		t.Errorf("assess-job.yaml: completionMode %q, want Indexed", a.CompletionMode)
	}
	if a.Completions == nil || a.Parallelism == nil || a.BackoffLimitPerIndex == nil {
		t.Fatalf("assess-job.yaml: completions, parallelism and backoffLimitPerIndex must all be set")
	}
	if *a.Parallelism < 1 || *a.Parallelism > *a.Completions {
		t.Errorf("assess-job.yaml: parallelism %d, want 1..completions (%d)", *a.Parallelism, *a.Completions)
	}
	if *a.BackoffLimitPerIndex < 1 {
		t.Errorf("assess-job.yaml: backoffLimitPerIndex %d gives a failed shard no retry", *a.BackoffLimitPerIndex)
	}
	if len(a.Template.Spec.Containers) != 1 {
		t.Fatalf("assess-job.yaml: want one container, have %d", len(a.Template.Spec.Containers))
	}
	ac := a.Template.Spec.Containers[0]
	aw, err := holdfastCommand(ac, nil)
	if err != nil {
		t.Fatalf("assess-job.yaml: %v", err)
	}
	if len(aw) < 3 || aw[1].text != "assess" {
		t.Fatalf("assess-job.yaml: want holdfast assess SCENARIO ..., have %s", shellQuote(texts(aw)))
	}
	n, err := shardAutoN(aw)
	if err != nil {
		t.Fatalf("assess-job.yaml: %v", err)
	}
	if n != *a.Completions {
		t.Errorf("assess-job.yaml: completions %d but --shard auto/%d; they must be equal", *a.Completions, n)
	}
	out, _ := flagValue(aw, "--out")
	if !strings.Contains(out, "{shard}") {
		t.Errorf("assess-job.yaml: --out %q has no {shard}: every shard would write the same file", out)
	}
	if workers, ok := flagValue(aw, "--workers"); ok && ac.Resources.Limits["cpu"] != workers {
		t.Errorf("assess-job.yaml: --workers %s but a CPU limit of %q; keep them equal", workers, ac.Resources.Limits["cpu"])
	}

	// Merge: reads exactly the parts the shards write.
	if len(merge.Spec.Template.Spec.Containers) != 1 {
		t.Fatalf("merge-job.yaml: want one container")
	}
	mc := merge.Spec.Template.Spec.Containers[0]
	mw, err := holdfastCommand(mc, nil)
	if err != nil {
		t.Fatalf("merge-job.yaml: %v", err)
	}
	if len(mw) < 3 || mw[1].text != "merge" {
		t.Fatalf("merge-job.yaml: want holdfast merge PARTS..., have %s", shellQuote(texts(mw)))
	}
	wantGlob := strings.ReplaceAll(out, "{shard}", "*")
	if !mw[2].glob || mw[2].text != wantGlob {
		t.Errorf("merge-job.yaml: reads %q, want the shards' pattern %q (unquoted, for sh to expand)", mw[2].text, wantGlob)
	}
	for _, f := range []string{"--out", "--report"} {
		if v, ok := flagValue(mw, f); !ok || !strings.HasPrefix(v, "/") {
			t.Errorf("merge-job.yaml: %s %q, want a path on the shared volume", f, v)
		}
	}

	// Rerun: the same command with the shard given explicitly.
	if len(rerun.Spec.Template.Spec.Containers) != 1 {
		t.Fatalf("rerun-shard-job.yaml: want one container")
	}
	if rerun.Spec.CompletionMode == "Indexed" || rerun.Spec.BackoffLimitPerIndex != nil {
		t.Errorf("rerun-shard-job.yaml: should be a plain (non-indexed) Job running one pod")
	}
	rw, err := holdfastCommand(rerun.Spec.Template.Spec.Containers[0], nil)
	if err != nil {
		t.Fatalf("rerun-shard-job.yaml: %v", err)
	}
	k, rn, err := explicitShard(rw)
	if err != nil {
		t.Fatalf("rerun-shard-job.yaml: %v", err)
	}
	if rn != n || k < 0 || k >= n {
		t.Errorf("rerun-shard-job.yaml: --shard %d/%d, want K/%d with 0 <= K < %d", k, rn, n, n)
	}
	if want := texts(withFlag(aw, "--shard", fmt.Sprintf("%d/%d", k, rn))); !slices.Equal(texts(rw), want) {
		t.Errorf("rerun-shard-job.yaml: command differs from assess-job.yaml's other than in --shard:\n  rerun:  %s\n  assess: %s", shellQuote(texts(rw)), shellQuote(want))
	}

	// Volumes: every mount names a volume of the pod; the scenario comes from
	// a ConfigMap and the results go to the shared claim; every absolute path
	// in a command is on a mounted volume; one image and one user throughout.
	image := ac.Image
	for name, spec := range podSpecs(m) {
		vols := map[string]volume{}
		for _, v := range spec.Volumes {
			vols[v.Name] = v
		}
		for _, c := range spec.Containers {
			if c.Image != image {
				t.Errorf("%s: image %q, want the same image as assess-job.yaml (%q)", name, c.Image, image)
			}
			for vname := range mountPaths(c) {
				v, ok := vols[vname]
				switch {
				case !ok:
					t.Errorf("%s: container %s mounts %q, which the pod does not define", name, c.Name, vname)
				case v.PersistentVolumeClaim != nil && v.PersistentVolumeClaim.ClaimName != pvc.Metadata.Name:
					t.Errorf("%s: volume %s uses claim %q, want %q from results-pvc.yaml", name, vname, v.PersistentVolumeClaim.ClaimName, pvc.Metadata.Name)
				case v.PersistentVolumeClaim == nil && v.ConfigMap == nil:
					t.Errorf("%s: volume %s is neither the results claim nor a ConfigMap", name, vname)
				}
			}
			if len(c.Command) > 0 && c.Command[0] == "sleep" {
				continue
			}
			ws, err := holdfastCommand(c, nil)
			if err != nil {
				t.Errorf("%s: %v", name, err)
				continue
			}
			for _, w := range ws {
				if strings.HasPrefix(w.text, "/") && !underMount(c, w.text) {
					t.Errorf("%s: path %s in the command is on no mounted volume", name, w.text)
				}
			}
		}
		if sc := spec.SecurityContext; sc == nil || sc.RunAsUser == nil || *sc.RunAsUser != dockerUser(t) {
			t.Errorf("%s: securityContext.runAsUser should be the Dockerfile's USER (%d)", name, dockerUser(t))
		}
	}
	scen := aw[2].text
	cm := configMapAt(a.Template.Spec, ac, filepath.Dir(scen))
	if cm == "" {
		t.Errorf("assess-job.yaml: the scenario %s is not in a ConfigMap volume", scen)
	}
	readme, err := os.ReadFile(filepath.Join(k8sDir, "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	if want := fmt.Sprintf("kubectl create configmap %s --from-file=%s=", cm, filepath.Base(scen)); !strings.Contains(string(readme), want) {
		t.Errorf("kubernetes/README.md: no %q...: the ConfigMap must hold the scenario under the key the Job reads", want)
	}
	for _, f := range append(append(keys(m.jobs), keys(m.pvcs)...), keys(m.pods)...) {
		if !strings.Contains(string(readme), f) {
			t.Errorf("kubernetes/README.md does not mention %s", f)
		}
	}
	for _, name := range []string{assess.Metadata.Name, merge.Metadata.Name} {
		if !strings.Contains(string(readme), "kubectl wait --for=condition=complete job/"+name) {
			t.Errorf("kubernetes/README.md: no kubectl wait for job/%s", name)
		}
	}
}

// explicitShard returns K and N from "--shard K/N".
func explicitShard(ws []word) (k, n int, err error) {
	v, ok := flagValue(ws, "--shard")
	if !ok {
		return 0, 0, fmt.Errorf("no --shard")
	}
	ks, ns, ok := strings.Cut(v, "/")
	if !ok {
		return 0, 0, fmt.Errorf("--shard %s: want K/N", v)
	}
	if k, err = strconv.Atoi(ks); err != nil {
		return 0, 0, fmt.Errorf("--shard %s: want K/N with a number K", v)
	}
	if n, err = strconv.Atoi(ns); err != nil {
		return 0, 0, fmt.Errorf("--shard %s: want K/N with a number N", v)
	}
	return k, n, nil
}

// configMapAt returns the name of the ConfigMap mounted at dir in c.
func configMapAt(spec podSpec, c container, dir string) string {
	for vname, path := range mountPaths(c) {
		if path != dir {
			continue
		}
		for _, v := range spec.Volumes {
			if v.Name == vname && v.ConfigMap != nil {
				return v.ConfigMap.Name
			}
		}
	}
	return ""
}

func podSpecs(m *manifests) map[string]podSpec {
	out := map[string]podSpec{}
	for name, j := range m.jobs {
		out[name] = j.Spec.Template.Spec
	}
	for name, p := range m.pods {
		out[name] = p.Spec
	}
	return out
}

func keys[V any](m map[string]V) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// dockerUser returns the numeric user of the Dockerfile's USER line.
func dockerUser(t *testing.T) int {
	t.Helper()
	raw, err := os.ReadFile(filepath.Join(k8sDir, "Dockerfile"))
	if err != nil {
		t.Fatal(err)
	}
	m := regexp.MustCompile(`(?m)^USER (\d+)`).FindStringSubmatch(string(raw))
	if m == nil {
		t.Fatal("Dockerfile: no numeric USER line")
	}
	uid, _ := strconv.Atoi(m[1])
	return uid
}

// TestDockerfile checks the image the manifests run: a Go 1.26 build of
// ./cmd/holdfast, then a Debian slim stage with the binary on PATH (the
// manifests call it as plain "holdfast").
func TestDockerfile(t *testing.T) {
	raw, err := os.ReadFile(filepath.Join(k8sDir, "Dockerfile"))
	if err != nil {
		t.Fatal(err)
	}
	var from []string
	for _, line := range strings.Split(string(raw), "\n") {
		if f, ok := strings.CutPrefix(line, "FROM "); ok {
			from = append(from, f)
		}
	}
	if len(from) != 2 || !strings.HasPrefix(from[0], "golang:1.26 ") || !regexp.MustCompile(`^debian:[a-z]+-slim$`).MatchString(from[1]) {
		t.Errorf("Dockerfile stages %q, want golang:1.26 AS build, then debian:<release>-slim", from)
	}
	for _, want := range []string{"go build", "./cmd/holdfast", "COPY --from=build", "/usr/local/bin/holdfast"} {
		if !strings.Contains(string(raw), want) {
			t.Errorf("Dockerfile: no %q", want)
		}
	}
	if _, err := os.Stat(filepath.Join("..", "go.mod")); err != nil {
		t.Errorf("the Dockerfile is built from the repository root, which should hold go.mod: %v", err)
	}
}

// TestKubernetesRun runs the Job's command for every index as the Job
// controller would (JOB_COMPLETION_INDEX=0..N−1), the merge Job's command,
// and one unsharded run, and checks that the merged result equals the single
// run byte for byte. Then it deletes one part, checks that the merge refuses
// and names it, reruns that shard with rerun-shard-job.yaml's command, and
// merges again.
func TestKubernetesRun(t *testing.T) {
	m, err := loadManifests(k8sDir)
	if err != nil {
		t.Fatal(err)
	}
	ac := m.jobs["assess-job.yaml"].Spec.Template.Spec.Containers[0]
	mc := m.jobs["merge-job.yaml"].Spec.Template.Spec.Containers[0]
	rc := m.jobs["rerun-shard-job.yaml"].Spec.Template.Spec.Containers[0]
	aw, err := holdfastCommand(ac, nil)
	if err != nil {
		t.Fatal(err)
	}
	mw, err := holdfastCommand(mc, nil)
	if err != nil {
		t.Fatal(err)
	}
	rw, err := holdfastCommand(rc, nil)
	if err != nil {
		t.Fatal(err)
	}
	n, err := shardAutoN(aw)
	if err != nil {
		t.Fatal(err)
	}
	small := func(c container, ws []word) []word {
		ws = relocate(c, ws)
		ws = withFlag(ws, "--draws", testDraws)
		return withFlag(ws, "--workers", testWorkers)
	}
	aw, rw, mw = small(ac, aw), small(rc, rw), relocate(mc, mw)

	work := filepath.Join(t.TempDir(), "cluster")
	single := filepath.Join(t.TempDir(), "single")
	scenario := aw[2].text
	writeDemoScenario(t, work, scenario)
	writeDemoScenario(t, single, scenario)

	for i := range n {
		env := []string{"JOB_COMPLETION_INDEX=" + strconv.Itoa(i)}
		r := mustRun(t, work, env, texts(aw))
		out, _ := flagValue(aw, "--out")
		part := strings.ReplaceAll(out, "{shard}", strconv.Itoa(i))
		if _, err := os.Stat(filepath.Join(work, part)); err != nil {
			t.Fatalf("shard %d wrote no %s\n%s", i, part, r.describe())
		}
	}
	merged := runMerge(t, work, mw)

	singleArgs := withFlag(withoutFlag(withoutFlag(aw, "--shard"), "--out"), "--out", merged)
	mustRun(t, single, nil, texts(singleArgs))
	sameFile(t, filepath.Join(work, merged), filepath.Join(single, merged), "kubernetes")

	// A lost shard: the merge must refuse and name it; the rerun restores it.
	k, _, err := explicitShard(rw)
	if err != nil {
		t.Fatal(err)
	}
	out, _ := flagValue(aw, "--out")
	missing := strings.ReplaceAll(out, "{shard}", strconv.Itoa(k))
	for _, f := range []string{missing, merged} {
		if err := os.Remove(filepath.Join(work, f)); err != nil {
			t.Fatal(err)
		}
	}
	args, err := expandGlobs(mw, work)
	if err != nil {
		t.Fatal(err)
	}
	r := runHoldfast(t, work, nil, args)
	if r.err == nil {
		t.Fatalf("merge accepted the parts with shard %d missing\n%s", k, r.describe())
	}
	if !strings.Contains(r.stderr, strconv.Itoa(k)) {
		t.Errorf("merge refused, but its message does not name the missing shard %d\n%s", k, r.describe())
	}
	if _, err := os.Stat(filepath.Join(work, merged)); err == nil {
		t.Errorf("the refused merge wrote %s", merged)
	}
	mustRun(t, work, nil, texts(rw))
	runMerge(t, work, mw)
	sameFile(t, filepath.Join(work, merged), filepath.Join(single, merged), "kubernetes, after rerunning one shard")
}

// runMerge expands the merge command's part pattern in dir, runs it, checks
// that it wrote its --out and --report files, and returns the --out path.
func runMerge(t *testing.T, dir string, mw []word) string {
	t.Helper()
	args, err := expandGlobs(mw, dir)
	if err != nil {
		t.Fatal(err)
	}
	r := mustRun(t, dir, nil, args)
	out, ok := flagValue(mw, "--out")
	if !ok {
		t.Fatalf("the merge command has no --out: %s", shellQuote(args))
	}
	for _, f := range []string{"--out", "--report"} {
		if p, ok := flagValue(mw, f); ok {
			if fi, err := os.Stat(filepath.Join(dir, p)); err != nil || fi.Size() == 0 {
				t.Fatalf("merge did not write %s %s\n%s", f, p, r.describe())
			}
		}
	}
	return out
}

// ---- Slurm ---------------------------------------------------------------

const slurmDir = "slurm"

// slurmScript is one batch script: its #SBATCH options and its holdfast
// line, split into words with vars.
type slurmScript struct {
	opts  map[string]string
	line  string
	words []word
}

func readSlurmScript(t *testing.T, name string, vars map[string]string) slurmScript {
	t.Helper()
	raw, err := os.ReadFile(filepath.Join(slurmDir, name))
	if err != nil {
		t.Fatal(err)
	}
	opts, err := sbatchOptions(string(raw))
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	lines := holdfastLines(string(raw))
	if len(lines) != 1 {
		t.Fatalf("%s: want one holdfast line, found %d", name, len(lines))
	}
	ws, err := shellWords(lines[0], vars)
	if err != nil {
		t.Fatalf("%s: %v\n  line: %s\n  the test defines: %v", name, err, lines[0], keys(vars))
	}
	return slurmScript{opts: opts, line: lines[0], words: ws}
}

var arrayRange = regexp.MustCompile(`^(\d+)-(\d+)(%\d+)?$`)

// arrayBounds returns the first and last index of a plain --array=A-B.
func arrayBounds(t *testing.T, spec string) (lo, hi int) {
	t.Helper()
	m := arrayRange.FindStringSubmatch(spec)
	if m == nil {
		t.Fatalf("assess-array.sbatch: --array=%s, want a plain range A-B (optionally %%limit): --shard auto needs contiguous indexes", spec)
	}
	lo, _ = strconv.Atoi(m[1])
	hi, _ = strconv.Atoi(m[2])
	if hi < lo {
		t.Fatalf("assess-array.sbatch: --array=%s is empty", spec)
	}
	return lo, hi
}

// TestSlurmScripts checks the batch scripts without running them: the
// directives, the shard and merge patterns, and that the rerun script runs
// the array's command with the shard given explicitly.
func TestSlurmScripts(t *testing.T) {
	vars := map[string]string{"SLURM_CPUS_PER_TASK": "4", "k": "5"}
	arr := readSlurmScript(t, "assess-array.sbatch", vars)
	merge := readSlurmScript(t, "merge.sbatch", vars)
	rerun := readSlurmScript(t, "rerun-shard.sbatch", vars)

	for _, o := range []string{"--array", "--time", "--mem", "--cpus-per-task"} {
		if arr.opts[o] == "" {
			t.Errorf("assess-array.sbatch: no #SBATCH %s=...", o)
		}
	}
	for _, o := range []string{"--time", "--mem", "--cpus-per-task"} {
		if merge.opts[o] == "" {
			t.Errorf("merge.sbatch: no #SBATCH %s=...", o)
		}
		if rerun.opts[o] != arr.opts[o] {
			t.Errorf("rerun-shard.sbatch: %s=%s, want the array's %s", o, rerun.opts[o], arr.opts[o])
		}
	}
	if rerun.opts["--array"] != "" {
		t.Errorf("rerun-shard.sbatch must not be an array: a one-task array reports a shard count of 1")
	}
	lo, hi := arrayBounds(t, arr.opts["--array"])
	count := hi - lo + 1

	if v, _ := flagValue(arr.words, "--shard"); v != "auto" {
		t.Errorf("assess-array.sbatch: --shard %q, want auto", v)
	}
	if !strings.Contains(arr.line, `--workers "$SLURM_CPUS_PER_TASK"`) {
		t.Errorf("assess-array.sbatch: want --workers \"$SLURM_CPUS_PER_TASK\" in %s", arr.line)
	}
	out, _ := flagValue(arr.words, "--out")
	if !strings.Contains(out, "{shard}") {
		t.Errorf("assess-array.sbatch: --out %q has no {shard}", out)
	}
	if len(merge.words) < 3 || merge.words[1].text != "merge" {
		t.Fatalf("merge.sbatch: want holdfast merge PARTS..., have %s", merge.line)
	}
	if want := strings.ReplaceAll(out, "{shard}", "*"); !merge.words[2].glob || merge.words[2].text != want {
		t.Errorf("merge.sbatch: reads %q, want the shards' pattern %s", merge.words[2].text, want)
	}
	want := texts(withFlag(arr.words, "--shard", fmt.Sprintf("%s/%d", vars["k"], count)))
	if got := texts(rerun.words); !slices.Equal(got, want) {
		t.Errorf("rerun-shard.sbatch: with k=%s, want the array's command with --shard %s/%d:\n  got:  %s\n  want: %s",
			vars["k"], vars["k"], count, shellQuote(got), shellQuote(want))
	}

	// Shell syntax of every script, where bash is installed.
	bash, err := exec.LookPath("bash")
	if err != nil {
		t.Log("bash not found; shell syntax not checked")
		return
	}
	files, _ := filepath.Glob(filepath.Join(slurmDir, "*"))
	for _, f := range files {
		if strings.HasSuffix(f, ".md") {
			continue
		}
		if out, err := exec.Command(bash, "-n", f).CombinedOutput(); err != nil {
			t.Errorf("bash -n %s: %v\n%s", f, err, out)
		}
	}
}

// TestSlurmSubmit runs submit.sh with a stand-in sbatch that records its
// arguments and answers like `sbatch --parsable` on a multi-cluster site
// ("jobid;cluster"): the array must be submitted first, the merge with
// --dependency=afterok on the array's job ID alone. A second run with part
// files present must refuse before submitting anything.
//
// Source: sbatch(1) (slurm.schedmd.com/sbatch.html#OPT_parsable),
// --parsable prints "jobid[;cluster_name]". That afterok on an array's job
// ID waits for every task to succeed is from memory; it is the common usage
// (e.g. the "Minimal working example of SLURM Job Arrays" gist, which
// submits --parsable --array=1-16%4 and then --dependency=afterok:$job_id)
// and cannot be verified here without a Slurm controller.
func TestSlurmSubmit(t *testing.T) {
	bash, err := exec.LookPath("bash")
	if err != nil {
		t.Skip("bash not found")
	}
	tmp := t.TempDir()
	binDir, work := filepath.Join(tmp, "bin"), filepath.Join(tmp, "run")
	for _, d := range []string{binDir, work} {
		if err := os.Mkdir(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	log := filepath.Join(tmp, "sbatch.log")
	fake := "#!/bin/sh\nprintf '%s\\n' \"$*\" >> \"$SBATCH_LOG\"\nn=$(wc -l < \"$SBATCH_LOG\")\necho \"$((4000 + n));testcluster\"\n"
	if err := os.WriteFile(filepath.Join(binDir, "sbatch"), []byte(fake), 0o755); err != nil {
		t.Fatal(err)
	}
	script, err := filepath.Abs(filepath.Join(slurmDir, "submit.sh"))
	if err != nil {
		t.Fatal(err)
	}
	run := func() ([]byte, error) {
		cmd := exec.Command(bash, script)
		cmd.Dir = work
		cmd.Env = append(os.Environ(), "PATH="+binDir+string(os.PathListSeparator)+os.Getenv("PATH"), "SBATCH_LOG="+log)
		return cmd.CombinedOutput()
	}
	if out, err := run(); err != nil {
		t.Fatalf("bash submit.sh: %v\n%s", err, out)
	}
	raw, err := os.ReadFile(log)
	if err != nil {
		t.Fatal(err)
	}
	calls := strings.Split(strings.TrimSpace(string(raw)), "\n")
	if len(calls) != 2 {
		t.Fatalf("submit.sh called sbatch %d times, want 2 (array, then merge):\n%s", len(calls), raw)
	}
	if !strings.Contains(calls[0], "--parsable") || !strings.HasSuffix(calls[0], "/assess-array.sbatch") {
		t.Errorf("first sbatch call %q, want --parsable .../assess-array.sbatch", calls[0])
	}
	if !strings.Contains(calls[1], "--dependency=afterok:4001 ") || !strings.HasSuffix(calls[1], "/merge.sbatch") {
		t.Errorf("second sbatch call %q, want --dependency=afterok:4001 .../merge.sbatch (the job ID without ;cluster)", calls[1])
	}
	if fi, err := os.Stat(filepath.Join(work, "parts")); err != nil || !fi.IsDir() {
		t.Errorf("submit.sh did not create parts/")
	}

	if err := os.WriteFile(filepath.Join(work, "parts", "part-0.json"), []byte("{}"), 0o644); err != nil {
		t.Fatal(err)
	}
	if out, err := run(); err == nil {
		t.Errorf("submit.sh went ahead although parts/ holds part files from an earlier run\n%s", out)
	}
	if raw2, _ := os.ReadFile(log); !bytes.Equal(raw2, raw) {
		t.Errorf("submit.sh called sbatch although it refused to run")
	}
}

// TestSlurmRun runs the array script's command for every task with the
// variables Slurm sets (SLURM_ARRAY_TASK_ID, _MIN, _MAX, _COUNT,
// SLURM_CPUS_PER_TASK), once for the array as written and once shifted to
// start at 1, merges with merge.sbatch's command, and compares with one
// unsharded run byte for byte. It also reruns one deleted shard with
// rerun-shard.sbatch's command.
//
// Source for the variables: Slurm job arrays set SLURM_ARRAY_TASK_ID,
// _MIN (lowest index), _MAX and _COUNT (number of tasks) in every task
// (slurm.schedmd.com/job_array.html; e.g. docs.bear.bham.ac.uk, "Array
// Jobs", for --array=2-5: COUNT 4, MIN 2, MAX 5).
func TestSlurmRun(t *testing.T) {
	raw, err := os.ReadFile(filepath.Join(slurmDir, "assess-array.sbatch"))
	if err != nil {
		t.Fatal(err)
	}
	opts, err := sbatchOptions(string(raw))
	if err != nil {
		t.Fatal(err)
	}
	lo, hi := arrayBounds(t, opts["--array"])
	count := hi - lo + 1
	taskVars := func(id, first int) map[string]string {
		return map[string]string{
			"SLURM_ARRAY_TASK_ID":    strconv.Itoa(id),
			"SLURM_ARRAY_TASK_MIN":   strconv.Itoa(first),
			"SLURM_ARRAY_TASK_MAX":   strconv.Itoa(first + count - 1),
			"SLURM_ARRAY_TASK_COUNT": strconv.Itoa(count),
			"SLURM_CPUS_PER_TASK":    testWorkers,
		}
	}
	envOf := func(vars map[string]string) []string {
		var env []string
		for _, k := range keys(vars) {
			env = append(env, k+"="+vars[k])
		}
		return env
	}
	small := func(ws []word) []word { return withFlag(ws, "--draws", testDraws) }

	// The single run, once, for both array layouts.
	probe := readSlurmScript(t, "assess-array.sbatch", taskVars(lo, lo))
	merge := readSlurmScript(t, "merge.sbatch", nil)
	mergeOut, _ := flagValue(merge.words, "--out")
	scenario := probe.words[2].text
	single := filepath.Join(t.TempDir(), "single")
	writeDemoScenario(t, single, scenario)
	singleArgs := withFlag(withoutFlag(withoutFlag(small(probe.words), "--shard"), "--out"), "--out", mergeOut)
	mustRun(t, single, nil, texts(singleArgs))

	for _, first := range []int{lo, lo + 1} {
		t.Run(fmt.Sprintf("array=%d-%d", first, first+count-1), func(t *testing.T) {
			work := filepath.Join(t.TempDir(), "run")
			writeDemoScenario(t, work, scenario)
			for id := first; id < first+count; id++ {
				vars := taskVars(id, first)
				s := readSlurmScript(t, "assess-array.sbatch", vars)
				r := mustRun(t, work, envOf(vars), texts(small(s.words)))
				out, _ := flagValue(s.words, "--out")
				part := strings.ReplaceAll(out, "{shard}", strconv.Itoa(id-first))
				if _, err := os.Stat(filepath.Join(work, part)); err != nil {
					t.Fatalf("task %d wrote no %s\n%s", id, part, r.describe())
				}
			}
			runMerge(t, work, merge.words)
			sameFile(t, filepath.Join(work, mergeOut), filepath.Join(single, mergeOut), "slurm")

			if first != lo {
				return
			}
			// Lose one shard and rerun it alone.
			k := count / 2
			rr := readSlurmScript(t, "rerun-shard.sbatch", map[string]string{"k": strconv.Itoa(k), "SLURM_CPUS_PER_TASK": testWorkers})
			out, _ := flagValue(probe.words, "--out")
			for _, f := range []string{strings.ReplaceAll(out, "{shard}", strconv.Itoa(k)), mergeOut} {
				if err := os.Remove(filepath.Join(work, f)); err != nil {
					t.Fatal(err)
				}
			}
			args, err := expandGlobs(merge.words, work)
			if err != nil {
				t.Fatal(err)
			}
			if r := runHoldfast(t, work, nil, args); r.err == nil {
				t.Fatalf("merge accepted the parts with shard %d missing\n%s", k, r.describe())
			}
			mustRun(t, work, nil, texts(small(rr.words)))
			runMerge(t, work, merge.words)
			sameFile(t, filepath.Join(work, mergeOut), filepath.Join(single, mergeOut), "slurm, after rerunning one shard")
		})
	}
}

// ---- flags used anywhere in the docs -------------------------------------

// docCommands returns every holdfast command line in the docs: the lines of
// fenced code blocks in the Markdown files, the scripts and the manifests.
func docCommands(t *testing.T) map[string][]string {
	t.Helper()
	found := map[string][]string{} // file → lines
	mds, _ := filepath.Glob("*.md")
	more, _ := filepath.Glob("*/*.md")
	for _, f := range append(mds, more...) {
		raw, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		var block strings.Builder
		in := false
		for _, line := range strings.Split(string(raw), "\n") {
			trim := strings.TrimSpace(line)
			if strings.HasPrefix(trim, "```") {
				if in {
					found[f] = append(found[f], holdfastLines(block.String())...)
					block.Reset()
				}
				in = !in
				continue
			}
			if in {
				block.WriteString(strings.TrimPrefix(trim, "$ ") + "\n")
			}
		}
	}
	scripts, _ := filepath.Glob(filepath.Join(slurmDir, "*.sbatch"))
	for _, f := range scripts {
		raw, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		found[f] = append(found[f], holdfastLines(string(raw))...)
	}
	m, err := loadManifests(k8sDir)
	if err != nil {
		t.Fatal(err)
	}
	for name, spec := range podSpecs(m) {
		for _, c := range spec.Containers {
			if ws, err := holdfastCommand(c, nil); err == nil {
				found[filepath.Join(k8sDir, name)] = append(found[filepath.Join(k8sDir, name)], shellQuote(texts(ws)))
			}
		}
	}
	return found
}

var flagWord = regexp.MustCompile(`^--([a-z][a-z0-9-]*)`)

// TestDocsFlagsExist checks that every holdfast command shown anywhere in
// the docs names a sub-command the binary has and only flags its --help
// lists, so that a renamed flag cannot leave the docs behind.
func TestDocsFlagsExist(t *testing.T) {
	cmds := docCommands(t)
	if len(cmds) == 0 {
		t.Fatal("found no holdfast command lines in the docs")
	}
	help := map[string]result{}
	for _, f := range keys(cmds) {
		for _, line := range cmds[f] {
			fields := strings.Fields(line)
			if len(fields) < 2 {
				continue
			}
			sub := fields[1]
			h, ok := help[sub]
			if !ok {
				h = runHoldfast(t, t.TempDir(), nil, []string{"holdfast", sub, "--help"})
				help[sub] = h
			}
			if h.err != nil || !strings.Contains(h.stdout, "holdfast "+sub) {
				t.Errorf("%s: holdfast has no sub-command %q (used in: %s)\n%s", f, sub, line, h.describe())
				continue
			}
			for _, w := range fields[2:] {
				m := flagWord.FindStringSubmatch(strings.Trim(w, `"'`))
				if m == nil {
					continue
				}
				if !regexp.MustCompile(`(?m)--` + regexp.QuoteMeta(m[1]) + `(\s|$)`).MatchString(h.stdout) {
					t.Errorf("%s: holdfast %s --help lists no --%s (used in: %s)", f, sub, m[1], line)
				}
			}
		}
	}
}
