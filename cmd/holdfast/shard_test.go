package main

import (
	"bytes"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"holdfast/assess"
)

// runBin runs the holdfast binary in dir with extra environment variables
// and returns its stderr, failing the test on a non-zero exit.
func runBin(t *testing.T, bin, dir string, env []string, args ...string) {
	t.Helper()
	cmd := exec.Command(bin, args...)
	cmd.Dir = dir
	cmd.Env = append(os.Environ(), env...)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	if err := cmd.Run(); err != nil {
		t.Fatalf("%v: %v\n%s", args, err, stderr.String())
	}
}

func sameFiles(t *testing.T, a, b string) {
	t.Helper()
	x, err := os.ReadFile(a)
	if err != nil {
		t.Fatal(err)
	}
	y, err := os.ReadFile(b)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(x, y) {
		t.Errorf("%s and %s differ (%d and %d bytes)", filepath.Base(a), filepath.Base(b), len(x), len(y))
	}
}

func TestShardsInSeparateProcessesMergeToTheSingleRun(t *testing.T) {
	// Four shards run as separate processes at once (two named K/N, one
	// from Slurm's variables, one from a Kubernetes Indexed Job's), merged:
	// the same JSON and the same report as one run, byte for byte, with
	// certification on (common practice for exact mergeable aggregates,
	// no source).
	bin := binary(t)
	dir := t.TempDir()
	common := []string{"demo:lake", "--draws", "3001", "--seed", "11", "--plan", "qmc", "--certify", "--quiet",
		"--require", "E1 attracting >= 0.5"}
	single := append([]string{"assess"}, common...)
	single = append(single, "--out", "single.json", "--report", "single.md", "--workers", "3")
	cmdSingle := exec.Command(bin, single...)
	cmdSingle.Dir = dir
	if out, err := cmdSingle.CombinedOutput(); err != nil {
		if ee, ok := err.(*exec.ExitError); !ok || ee.ExitCode() != exitGate {
			t.Fatalf("single run: %v\n%s", err, out)
		}
	}
	shards := []struct {
		spec string
		env  []string
	}{
		{"0/4", nil},
		{"auto", []string{"SLURM_ARRAY_TASK_ID=11", "SLURM_ARRAY_TASK_MIN=10", "SLURM_ARRAY_TASK_COUNT=4"}},
		{"auto/4", []string{"JOB_COMPLETION_INDEX=2"}},
		{"3/4", nil},
	}
	var wg sync.WaitGroup
	for k, sh := range shards {
		wg.Add(1)
		go func() {
			defer wg.Done()
			args := append([]string{"assess"}, common...)
			args = append(args, "--shard", sh.spec, "--out", "parts/part-{shard}.json", "--workers", []string{"1", "2"}[k%2])
			runBin(t, bin, dir, sh.env, args...)
		}()
	}
	wg.Wait()
	parts, _ := filepath.Glob(filepath.Join(dir, "parts", "part-*.json"))
	if len(parts) != 4 {
		t.Fatalf("parts written: %v", parts)
	}
	merge := exec.Command(bin, append([]string{"merge", "--out", "merged.json", "--report", "merged.md", "--quiet"}, parts...)...)
	merge.Dir = dir
	if out, err := merge.CombinedOutput(); err != nil {
		if ee, ok := err.(*exec.ExitError); !ok || ee.ExitCode() != exitGate {
			t.Fatalf("merge: %v\n%s", err, out)
		}
	}
	sameFiles(t, filepath.Join(dir, "single.json"), filepath.Join(dir, "merged.json"))
	md := func(name string) string {
		b, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		// Plot links name the report's own plot folder.
		return strings.ReplaceAll(string(b), strings.TrimSuffix(name, ".md"), "X")
	}
	if md("single.md") != md("merged.md") {
		t.Error("the merged report differs from the single run's")
	}
	raw, _ := os.ReadFile(filepath.Join(dir, "merged.json"))
	for _, want := range []string{`"certification"`, `"regimes_certified"`, `"requirements"`} {
		if !bytes.Contains(raw, []byte(want)) {
			t.Errorf("merged result lacks %s", want)
		}
	}
}

func TestCheckpointResumeAfterSIGTERM(t *testing.T) {
	// A run killed by SIGTERM after saving a checkpoint leaves no output;
	// resumed, it writes the result of an uninterrupted run, byte for
	// byte, and removes the checkpoint (common practice for checkpointed
	// batch jobs, no source).
	bin := binary(t)
	dir := t.TempDir()
	args := []string{"assess", "demo:fishery", "--draws", "300000", "--seed", "5", "--quiet", "--workers", "2"}
	runBin(t, bin, dir, nil, append(args, "--out", "whole.json")...)

	cmd := exec.Command(bin, append(args, "--out", "resumed.json", "--checkpoint", "state.json", "--checkpoint-every", "200ms")...)
	cmd.Dir = dir
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	ck := filepath.Join(dir, "state.json")
	deadline := time.Now().Add(60 * time.Second)
	for {
		if _, err := os.Stat(ck); err == nil {
			break
		}
		if time.Now().After(deadline) {
			cmd.Process.Kill()
			t.Fatal("no checkpoint within 60 s")
		}
		time.Sleep(20 * time.Millisecond)
	}
	if err := cmd.Process.Signal(syscall.SIGTERM); err != nil {
		t.Fatal(err)
	}
	err := cmd.Wait()
	if ee, ok := err.(*exec.ExitError); !ok || ee.ExitCode() != exitFailure {
		// The run may have finished just before the signal.
		if err == nil {
			t.Skip("the run finished before SIGTERM arrived")
		}
		t.Fatalf("interrupted run: %v", err)
	}
	if _, err := os.Stat(filepath.Join(dir, "resumed.json")); err == nil {
		t.Fatal("an interrupted run left its output")
	}
	runBin(t, bin, dir, nil, append(args, "--out", "resumed.json", "--checkpoint", "state.json", "--resume")...)
	sameFiles(t, filepath.Join(dir, "whole.json"), filepath.Join(dir, "resumed.json"))
	if _, err := os.Stat(ck); err == nil {
		t.Error("the checkpoint of a finished run was left behind")
	}
}

func TestParseShard(t *testing.T) {
	// Slurm job arrays set SLURM_ARRAY_TASK_ID, _MIN and _COUNT; Kubernetes
	// Indexed Jobs set JOB_COMPLETION_INDEX (Slurm sbatch and Kubernetes
	// Job documentation).
	env := func(kv ...string) func(string) string {
		m := map[string]string{}
		for i := 0; i+1 < len(kv); i += 2 {
			m[kv[i]] = kv[i+1]
		}
		return func(k string) string { return m[k] }
	}
	for _, c := range []struct {
		spec string
		env  func(string) string
		want assess.Shard
		err  string
	}{
		{"", env(), assess.Shard{}, ""},
		{"2/5", env(), assess.Shard{K: 2, N: 5}, ""},
		{"0/1", env(), assess.Shard{K: 0, N: 1}, ""},
		{"5/5", env(), assess.Shard{}, "from 0 to 4"},
		{"-1/5", env(), assess.Shard{}, "from 0 to 4"},
		{"1/0", env(), assess.Shard{}, "shard count"},
		{"3", env(), assess.Shard{}, "want K/N"},
		{"a/b", env(), assess.Shard{}, "shard count"},
		{"auto", env("SLURM_ARRAY_TASK_ID", "3", "SLURM_ARRAY_TASK_COUNT", "8"), assess.Shard{K: 3, N: 8}, ""},
		{"auto", env("SLURM_ARRAY_TASK_ID", "4", "SLURM_ARRAY_TASK_MIN", "1", "SLURM_ARRAY_TASK_COUNT", "8"), assess.Shard{K: 3, N: 8}, ""},
		{"auto/8", env("SLURM_ARRAY_TASK_ID", "3", "SLURM_ARRAY_TASK_MIN", "3", "SLURM_ARRAY_TASK_COUNT", "1"), assess.Shard{K: 3, N: 8}, ""},
		{"auto", env("SLURM_ARRAY_TASK_ID", "3", "SLURM_ARRAY_TASK_MIN", "3", "SLURM_ARRAY_TASK_COUNT", "1"), assess.Shard{}, "one task"},
		{"auto/8", env("SLURM_ARRAY_TASK_ID", "8"), assess.Shard{}, "not below"},
		{"auto", env("SLURM_ARRAY_TASK_ID", "9", "SLURM_ARRAY_TASK_COUNT", "8"), assess.Shard{}, "not below"},
		{"auto", env("SLURM_ARRAY_TASK_ID", "x"), assess.Shard{}, "whole number"},
		{"auto/6", env("JOB_COMPLETION_INDEX", "5"), assess.Shard{K: 5, N: 6}, ""},
		{"auto", env("JOB_COMPLETION_INDEX", "5"), assess.Shard{}, "auto/N"},
		{"auto/6", env("JOB_COMPLETION_INDEX", "6"), assess.Shard{}, "not below"},
		{"auto", env(), assess.Shard{}, "neither"},
	} {
		got, err := parseShard(c.spec, c.env)
		if c.err != "" {
			if err == nil || !strings.Contains(err.Error(), c.err) {
				t.Errorf("%q: error %v, want one mentioning %q", c.spec, err, c.err)
			}
			continue
		}
		if err != nil || got != c.want {
			t.Errorf("%q: %v, %v; want %v", c.spec, got, err, c.want)
		}
	}
}

func TestMergeBadInput(t *testing.T) {
	// Parts that do not make one run, and files that are no parts: exit
	// status 2, a message naming the file and what is wrong, no output
	// file, no stack trace.
	dir := inTempDir(t)
	part := func(name string, extra ...string) string {
		runOK(t, append([]string{"assess", "demo:tank", "--draws", "40", "--seed", "2", "--quiet", "--out", name}, extra...)...)
		return name
	}
	p0 := part("p0.json", "--shard", "0/3")
	p1 := part("p1.json", "--shard", "1/3")
	p2 := part("p2.json", "--shard", "2/3")
	seed := part("seed.json", "--shard", "2/3", "--seed", "9")
	draws := part("draws.json", "--shard", "2/3", "--draws", "41")
	sets := part("sets.json", "--shard", "2/3", "--set", "Kp=1.3")
	cert := part("cert.json", "--shard", "2/3", "--certify=false")
	four := part("four.json", "--shard", "2/4")
	result := part("result.json")
	raw, err := os.ReadFile(p2)
	if err != nil {
		t.Fatal(err)
	}
	write := func(name string, b []byte) string {
		if err := os.WriteFile(name, b, 0o644); err != nil {
			t.Fatal(err)
		}
		return name
	}
	truncated := write("truncated.json", raw[:len(raw)/2])
	edited := write("edited.json", bytes.Replace(raw, []byte(`"title":"`), []byte(`"title":"X`), 1))
	tampered := write("tampered.json", bytes.Replace(raw, []byte(`scenario_text":"`), []byte(`scenario_text":"# `), 1))
	notJSON := write("notjson.json", []byte("shard 2 of 3\n"))
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{p0, p1}, "shard 2 of 3 missing"},
		{[]string{p0}, "shards 1, 2 of 3 missing"},
		{[]string{p0, p1, p1, p2}, "p1.json and p1.json are both shard 1 of 3"},
		{[]string{p0, p1, seed}, `seed.json does not belong with p0.json: --seed "9", not "2"`},
		{[]string{p0, p1, draws}, "--draws"},
		{[]string{p0, p1, sets}, "--set values"},
		{[]string{p0, p1, cert}, "--certify"},
		{[]string{p0, p1, four}, "shard count"},
		{[]string{p0, p1, result}, "result.json: is a assess result file, not a part"},
		{[]string{p0, p1, truncated}, "truncated.json: truncated"},
		{[]string{p0, p1, notJSON}, "notjson.json: not JSON"},
		{[]string{p0, p1, tampered}, "tampered.json: the embedded scenario text"},
		{[]string{p0, p1, "missing.json"}, "missing.json"},
		{[]string{p0, p1, dir}, "is a directory"},
		{[]string{}, "requires at least 1 arg"},
	} {
		expectBad(t, append([]string{"merge", "--out", "merged.json", "--report", "merged.md"}, c.args...), c.want)
		for _, f := range []string{"merged.json", "merged.md", "merged-plots"} {
			if _, err := os.Stat(f); err == nil {
				t.Errorf("%v: left %s behind", c.args, f)
			}
		}
	}
	// An edited title is no part of the run: the part still merges.
	if _, stderr, code := holdfast(t, "merge", p0, p1, edited, "--quiet", "--out", "edited-merge.json"); code != 0 {
		t.Errorf("merge with an edited title: exit %d, %s", code, stderr)
	}
	// A part given as a result to render, and merged output over a part.
	expectBad(t, []string{"report", p0, "--md", "r.md"}, "merge all the parts")
	expectBad(t, []string{"merge", p0, p1, p2, "--out", p1}, "overwrite an input")
	if _, stderr, code := holdfast(t, "merge", p0, p1, p2, "--out", "ok.json", "--quiet"); code != 0 {
		t.Errorf("good merge: exit %d, %s", code, stderr)
	}
}

func TestShardAndCheckpointBadFlags(t *testing.T) {
	// Usage errors of --shard, --checkpoint and --resume: exit 2, a
	// message naming the flag, nothing on stdout, no stack trace, no file
	// written.
	dir := inTempDir(t)
	if err := os.WriteFile("old-state.json", []byte("{}"), 0o644); err != nil {
		t.Fatal(err)
	}
	t.Setenv("JOB_COMPLETION_INDEX", "")
	t.Setenv("SLURM_ARRAY_TASK_ID", "")
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--shard", "1/4"}, "--shard needs --out"},
		{[]string{"--shard", "4/4", "--out", "p.json"}, "--shard"},
		{[]string{"--shard", "auto", "--out", "p.json"}, "neither JOB_COMPLETION_INDEX"},
		{[]string{"--shard", "1/4", "--out", "p.json", "--until-halfwidth", "0.01"}, "--until-halfwidth"},
		{[]string{"--shard", "1/4", "--out", "p.json", "--draws-csv", "d.csv"}, "--draws-csv"},
		{[]string{"--shard", "1/4", "--out", "p.json", "--report", "r.md"}, "--report"},
		{[]string{"--resume", "--out", "r.json"}, "--resume needs --checkpoint"},
		{[]string{"--checkpoint", "s.json", "--resume", "--out", "r.json"}, "no checkpoint file s.json"},
		{[]string{"--checkpoint", "old-state.json", "--out", "r.json"}, "the file exists"},
		{[]string{"--checkpoint", "old-state.json", "--resume", "--out", "r.json"}, "old-state.json"},
		{[]string{"--checkpoint", "s.json", "--draws-csv", "d.csv"}, "--draws-csv"},
		{[]string{"--checkpoint", "s.json", "--checkpoint-every", "0s"}, "--checkpoint-every"},
	} {
		expectBad(t, append([]string{"assess", "demo:lake", "--draws", "50", "--quiet"}, c.args...), c.want)
	}
	noneLeft(t, dir, "old-state.json")
	// Resuming with other settings names the difference (a checkpoint
	// made from a part file: the same form, another kind).
	runOK(t, "assess", "demo:lake", "--draws", "50", "--quiet", "--shard", "0/1", "--out", "p.json")
	raw, err := os.ReadFile("p.json")
	if err != nil {
		t.Fatal(err)
	}
	ck := bytes.Replace(raw, []byte(`"kind":"partial"`), []byte(`"kind":"checkpoint"`), 1)
	if err := os.WriteFile("state.json", ck, 0o644); err != nil {
		t.Fatal(err)
	}
	stderr := runBad(t, "assess", "demo:lake", "--draws", "50", "--seed", "4", "--quiet", "--checkpoint", "state.json", "--resume", "--out", "r.json")
	if !strings.Contains(stderr, "checkpoint of another run") || !strings.Contains(stderr, "--seed") {
		t.Errorf("resume with another seed: %s", stderr)
	}
	if _, err := os.Stat("r.json"); err == nil {
		t.Error("a refused resume wrote its output")
	}
	// A checkpoint of one shard does not resume another.
	runOK(t, "assess", "demo:lake", "--draws", "50", "--quiet", "--shard", "0/2", "--out", "p0.json")
	raw0, err := os.ReadFile("p0.json")
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile("state0.json", bytes.Replace(raw0, []byte(`"kind":"partial"`), []byte(`"kind":"checkpoint"`), 1), 0o644); err != nil {
		t.Fatal(err)
	}
	stderr = runBad(t, "assess", "demo:lake", "--draws", "50", "--quiet", "--shard", "1/2", "--checkpoint", "state0.json", "--resume", "--out", "p1.json")
	if !strings.Contains(stderr, "checkpoint of shard 0/2, not of shard 1/2") {
		t.Errorf("resume of another shard: %s", stderr)
	}
	// The same settings resume (the state covers every draw: nothing is
	// left to run) and give the run's result.
	if _, stderr, code := holdfast(t, "assess", "demo:lake", "--draws", "50", "--quiet", "--checkpoint", "state.json", "--resume", "--out", "r.json"); code != 0 {
		t.Errorf("resume: exit %d, %s", code, stderr)
	}
	runOK(t, "assess", "demo:lake", "--draws", "50", "--quiet", "--out", "whole.json")
	sameFiles(t, "r.json", "whole.json")
}

func TestCheckSidesOnADoubleRoot(t *testing.T) {
	// x' = −(x − c)² has one equilibrium, x* = c, attracting from above
	// only (Strogatz 1994, ch. 2, the normal form x' = x² reflected): the
	// certification cannot prove a double root, so every draw stays
	// unresolved but located, and integrating from just above and below
	// confirms the verdict, so no draw disagrees.
	dir := t.TempDir()
	path := filepath.Join(dir, "double.yaml")
	src := `holdfast: 1
title: a double root at an uncertain place (illustrative)
state: {symbol: x, domain: [0, 4]}
rate: "-(x - c)^2"
parameters:
  c: {dist: uniform, min: 1, max: 3}
`
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	stdout := runOK(t, "assess", path, "--draws", "200", "--check-sides", "--format", "json")
	var doc struct {
		Equilibria []struct {
			Semistable float64 `json:"p_semistable"`
		} `json:"equilibria"`
		Certification struct {
			Checked     int64 `json:"checked_draws"`
			Unresolved  int64 `json:"unresolved_draws"`
			Disagreeing int64 `json:"disagreeing_draws"`
		} `json:"certification"`
	}
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	c := doc.Certification
	if c.Checked != 200 || c.Unresolved != 200 || c.Disagreeing != 0 {
		t.Errorf("certification %+v, want 200 checked, all unresolved, none disagreeing", c)
	}
	if len(doc.Equilibria) != 1 || doc.Equilibria[0].Semistable != 1 {
		t.Errorf("equilibria %+v, want one semistable in every draw", doc.Equilibria)
	}
	expectBad(t, []string{"assess", path, "--draws", "20", "--check-sides", "--certify=false"}, "--check-sides")
}
