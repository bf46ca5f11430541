// Package cluster holds the scripts that split a mixdepth scan or sample
// into parts (--part K/N) and merge the part tables: local-sweep.sh runs the
// parts on one machine, up to --jobs at a time; submit.sh submits them to
// Slurm as a job array (sweep.slurm) with a merge job (merge.slurm) that
// depends on it. The package has no Go API. Its tests run test.sh, the
// scripts' checks against stand-ins for mixdepth and sbatch, and run the
// scripts with a freshly built mixdepth, comparing each merged table with the
// same run done at once; so go test ./... covers the scripts.
package cluster
