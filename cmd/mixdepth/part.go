package main

import "mixdepth/runs"

// partFlagHelp is the help text of --part in scan and sample.
const partFlagHelp = "run only part K/N of the instances, those i with i mod N = K (K counts from 0), for job arrays; merge the parts with 'mixdepth merge'"

// parsePart reads --part K/N (runs.ParsePart); "" means the whole run.
func parsePart(spec string) (runs.Part, error) {
	p, err := runs.ParsePart(spec)
	if err != nil {
		return runs.Part{}, listInput("--part", err)
	}
	return p, nil
}

// formatIDs writes ascending ids compactly as ranges (runs.FormatIDs).
func formatIDs(ids []int) string { return runs.FormatIDs(ids) }
