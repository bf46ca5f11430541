// Package runs holds the idea of a run: the circuits it builds (Spec: graph,
// schedule, gate set, seed, layout), the table metadata that records them and
// rebuilds them (Spec.Meta, FromMeta), the instance ids of a run and of its
// parts (Part, FormatIDs, ParseIDs), the continuation of a partial or
// finished scan table (Resume), and the merge of the tables of one run (Set).
//
// A run's instance i takes every random choice from circuits.Stream(seed, i),
// so the parts of a run, its partial tables and their continuations hold
// exactly the rows of the same run done at once. Two tables belong to one run
// when every metadata key that is a run parameter agrees (see IsParameter);
// otherwise the functions here return a *DifferentRunError naming the key.
//
// Errors caused by the data (a table, its metadata, an option string) are
// returned with the prefix "runs: " (a file that cannot be read keeps the
// error of package tables); programmer mistakes panic.
package runs
