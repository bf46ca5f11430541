// Command mixdepth tells how deep random circuits on a coupling graph must be
// to anti-concentrate and approach a unitary 2-design, by exact simulation
// and exact second moments, and scores cross-entropy benchmarks.
//
// Run "mixdepth help" for the subcommands.
package main
