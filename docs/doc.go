// Package docs holds no code: only tests that keep the scale-out examples in
// this folder honest (docs/kubernetes, docs/slurm, scale-out.md). The tests
// parse the manifests and scripts, check the fields that must agree, and
// run the holdfast command lines they contain on this machine, with small
// settings and the environment variables the schedulers would set.
package docs
