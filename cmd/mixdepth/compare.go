package main

import (
	"context"
	"fmt"
	"io"
	"strings"

	"mixdepth/plots"
)

func init() {
	register(command{name: "compare", summary: "draw the R − 1 curves of several scan tables (gate sets, graphs, schedules, precisions) on one chart", run: runCompare})
}

// compareKeys are the metadata keys that can tell the runs of a comparison
// apart, in the order the legend names them.
var compareKeys = []string{"graph", "schedule", "layout", "gates", "gate_set_digest", "precision", "seed", "instances"}

func runCompare(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("compare FILE... --plot OUT", "Each FILE is the per-instance scan table of one run.\n\nSummarizes each run as summarize does and draws their R − 1 curves on one chart, with their\nconfidence bounds as error bars; the legend names each run by the parameters in which the\nruns differ (graph, schedule, gates, …) and gives its recommended depth.",
		"mixdepth compare haar.parquet cz.parquet iswap.parquet --plot gates.png", stdout)
	vf := addRecordedVerdictFlags(fs)
	plot := fs.String("plot", "", "write the chart to FILE.png or FILE.svg (required)")
	title := fs.String("title", "", "chart title (default: what the runs share)")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() < 2 {
		return badInput("compare needs two or more scan tables: mixdepth compare FILE FILE... --plot OUT.png")
	}
	if *plot == "" {
		return badInput("compare: --plot FILE.png or --plot FILE.svg is required")
	}
	if err := plots.CheckPath(*plot); err != nil {
		return usageError{fmt.Errorf("--plot: %w", err)}
	}
	var loaded []*loadedScan
	for _, path := range fs.Args() {
		sc, err := loadScan(fs, vf, []string{path}, "compare")
		if err != nil {
			return err
		}
		loaded = append(loaded, sc)
	}
	labels, shared := compareLabels(loaded, fs.Args())
	curves := make([]plots.Labelled, len(loaded))
	fmt.Fprintf(stdout, "%-40s %9s %12s  %s\n", "run", "instances", "recommended", "file")
	for i, sc := range loaded {
		curves[i] = plots.Labelled{Label: labels[i], Series: curveSeries(sc.curve, sc.run.ExactRatios(sc.setup.spec.Limit()))}
		rec := "none"
		if sc.curve.Found {
			rec = fmt.Sprintf("%d", sc.curve.Depth)
		}
		fmt.Fprintf(stdout, "%-40s %9d %12s  %s\n", labels[i], len(sc.run.Done), rec, fs.Arg(i))
	}
	c := loaded[0].curve.Criteria
	if *title == "" {
		*title = "R − 1 against depth"
		if shared != "" {
			*title += ": " + shared
		}
	}
	if err := plots.SaveComparePlot(*plot, curves, c.Eps, plots.WithConfidence(c.Confidence), plots.WithDepthUnit(depthUnit(loaded[0].setup)), plots.WithTitle(*title)); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "Plot: %s (eps %g, confidence %g, rule %s of the first table)\n", *plot, c.Eps, c.Confidence, c.Rule)
	return nil
}

// compareLabels names each run by the values of the compareKeys in which
// the runs differ ("gates cz+haar1"), falling back to the file name when
// they differ in none of them, and returns what they share ("line:8,
// layered") for the title.
func compareLabels(loaded []*loadedScan, paths []string) (labels []string, shared string) {
	var differ, same []string
	for _, k := range compareKeys {
		first, _ := loaded[0].run.Members[0].Table.Meta.Get(k)
		varies := false
		for _, sc := range loaded[1:] {
			if v, _ := sc.run.Members[0].Table.Meta.Get(k); v != first {
				varies = true
			}
		}
		switch {
		case varies && k != "gate_set_digest":
			differ = append(differ, k)
		case !varies && first != "" && (k == "graph" || k == "schedule" || k == "gates"):
			same = append(same, k+" "+first)
		}
	}
	labels = make([]string, len(loaded))
	for i, sc := range loaded {
		var parts []string
		for _, k := range differ {
			v, _ := sc.run.Members[0].Table.Meta.Get(k)
			parts = append(parts, k+" "+v)
		}
		labels[i] = strings.Join(parts, ", ")
		if labels[i] == "" {
			labels[i] = paths[i]
		}
	}
	return labels, strings.Join(same, ", ")
}
