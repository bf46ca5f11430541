package main

import (
	"fmt"
	"io"
	"math"
)

// report is the --json document. Field names are an interface.
type report struct {
	Machine   string  `json:"machine"`
	Cores     int     `json:"cores"`
	GoVersion string  `json:"go_version"`
	Bandwidth float64 `json:"bandwidth_gbs"`
	Load      string  `json:"load_average"`
	// BlockQubits is the block size of the fused passes that sim chose
	// from this machine's second-level cache.
	BlockQubits int         `json:"fused_block_qubits"`
	Gates       []gateRow   `json:"gates"`
	Moments     []momentRow `json:"moments"`
	MPS         []mpsRow    `json:"mps_updates"`
	Scan        *scanResult `json:"scan,omitempty"`
	Ratio       *float64    `json:"numpy_ratio"`
	Notes       []string    `json:"notes,omitempty"`
	Single      []gateRow   `json:"single_precision,omitempty"`
	Fused       []fusedRow  `json:"fused,omitempty"`
	// Targets are the performance targets of issue 16, each a ratio
	// measured in this run.
	Targets []target `json:"targets,omitempty"`
}

// gateRow is one state size of the gate benchmark, in double precision
// (report.Gates) or single precision (report.Single).
type gateRow struct {
	Qubits    int     `json:"n"`
	MsPerGate float64 `json:"ms_per_gate"`
	Effective float64 `json:"effective_gbs"`
	Fraction  float64 `json:"bandwidth_fraction"`
	// Triad is the triad bandwidth measured just before this row, the
	// reference of Fraction: on a shared machine it sees the same load.
	Triad float64 `json:"triad_gbs"`
	// Kinds holds ms per gate for each position class.
	Kinds map[string]float64 `json:"ms_per_gate_by_positions"`
}

type fusedRow struct {
	Qubits    int     `json:"n"`
	Gates     int     `json:"gates"`
	MsPerGate float64 `json:"ms_per_gate"`
	// OneByOneMsPerGate is the time per gate with one pass per gate.
	OneByOneMsPerGate float64 `json:"one_by_one_ms_per_gate"`
	Speedup           float64 `json:"speedup_over_one_by_one"`
}

// mpsRow is the time of one two-site update of the MPS engine.
type mpsRow struct {
	Bond        int     `json:"bond_dim"`
	BondUsed    int     `json:"bond_dim_used"`
	MsPerUpdate float64 `json:"ms_per_update"`
}

type momentRow struct {
	Qubits      int     `json:"n"`
	MsPerUpdate float64 `json:"ms_per_update"`
	Effective   float64 `json:"effective_gbs"`
	Fraction    float64 `json:"bandwidth_fraction"`
	Triad       float64 `json:"triad_gbs"`
	// Pairs holds ms per update for each pair of the engine's benchmark.
	Pairs map[string]float64 `json:"ms_per_update_by_pair"`
}

type scanResult struct {
	Graph        string   `json:"graph"`
	Depths       int      `json:"depths"`
	Instances    int      `json:"instances"`
	GoSeconds    float64  `json:"go_seconds"`
	NumpySeconds *float64 `json:"numpy_seconds"`
	Python       string   `json:"python,omitempty"`
	NumpyBLAS    string   `json:"numpy_blas,omitempty"`
	GoRatio      float64  `json:"go_collision_ratio_last"`
	NumpyRatio   *float64 `json:"numpy_collision_ratio_last"`
}

// roundList formats the ratios of a target's rounds.
func roundList(r []float64) string {
	s := ""
	for i, v := range r {
		if i > 0 {
			s += ", "
		}
		s += fmt.Sprintf("%.2f", v)
	}
	return s
}

// printTable writes r as the human-readable table.
func printTable(w io.Writer, r *report) {
	fmt.Fprintf(w, "machine: %s, %d cores, %s\n", r.Machine, r.Cores, r.GoVersion)
	fmt.Fprintf(w, "load average at start: %s\n", r.Load)
	fmt.Fprintf(w, "fused passes: blocks of 2^%d amplitudes (chosen from the second-level cache)\n", r.BlockQubits)
	fmt.Fprintf(w, "triad bandwidth: %.1f GB/s (STREAM convention, 24 bytes per element; best of the run)\n", r.Bandwidth)
	fmt.Fprintf(w, "fraction = effective GB/s / the row's own triad (best of rounds alternating with the row's timings)\n\n")
	fmt.Fprintf(w, "two-qubit gates, complex128 (32·2^n bytes per gate), mean over position classes\n")
	fmt.Fprintf(w, "%4s %10s %8s %8s %9s %14s %8s\n", "n", "ms/gate", "GB/s", "triad", "fraction", "fused ms/gate", "speedup")
	for i, g := range r.Gates {
		f := r.Fused[i]
		fmt.Fprintf(w, "%4d %10.3f %8.1f %8.1f %9.2f %14.3f %8.2f\n", g.Qubits, g.MsPerGate, g.Effective, g.Triad, g.Fraction, f.MsPerGate, f.Speedup)
	}
	if len(r.Single) > 0 {
		fmt.Fprintf(w, "\ntwo-qubit gates, complex64 (16·2^n bytes per gate)\n")
		fmt.Fprintf(w, "%4s %10s %8s %8s %9s\n", "n", "ms/gate", "GB/s", "triad", "fraction")
		for _, g := range r.Single {
			fmt.Fprintf(w, "%4d %10.3f %8.1f %8.1f %9.2f\n", g.Qubits, g.MsPerGate, g.Effective, g.Triad, g.Fraction)
		}
	}
	fmt.Fprintf(w, "\nmoment engine (16·2^n bytes per pair update)\n")
	fmt.Fprintf(w, "%4s %10s %8s %8s %9s\n", "n", "ms/update", "GB/s", "triad", "fraction")
	for _, m := range r.Moments {
		fmt.Fprintf(w, "%4d %10.3f %8.1f %8.1f %9.2f\n", m.Qubits, m.MsPerUpdate, m.Effective, m.Triad, m.Fraction)
	}
	if len(r.MPS) > 0 {
		fmt.Fprintf(w, "\nMPS two-site update (SVD of a 2χ×2χ block); ratio = time / (χ/χ_first)³ time of the first row\n")
		fmt.Fprintf(w, "%6s %6s %10s %8s\n", "bond", "used", "ms/update", "ratio")
		for _, m := range r.MPS {
			scale := math.Pow(float64(m.BondUsed)/float64(r.MPS[0].BondUsed), 3)
			fmt.Fprintf(w, "%6d %6d %10.3f %8.2f\n", m.Bond, m.BondUsed, m.MsPerUpdate, m.MsPerUpdate/(scale*r.MPS[0].MsPerUpdate))
		}
	}
	if s := r.Scan; s != nil {
		fmt.Fprintf(w, "\nscan %s, depths 1..%d, %d instances, haar: Go %.2f s (R at the last depth %.3f)\n", s.Graph, s.Depths, s.Instances, s.GoSeconds, s.GoRatio)
		if s.NumpySeconds != nil {
			fmt.Fprintf(w, "numpy (%s; %s): %.2f s (R %.3f); ratio %.1f×\n", s.Python, s.NumpyBLAS, *s.NumpySeconds, *s.NumpyRatio, *r.Ratio)
		}
	}
	if len(r.Targets) > 0 {
		fmt.Fprintf(w, "\ntargets (ratios measured in this run; median of the rounds)\n")
		for _, t := range r.Targets {
			rel, verdict := "≤", "met"
			if !t.Below {
				rel = "≥"
			}
			if !t.Met {
				verdict = "not met"
			}
			fmt.Fprintf(w, "  %-30s %6.2f (rounds %s; goal %s %g, %s): %s\n", t.Name, t.Ratio, roundList(t.Ratios), rel, t.Goal, verdict, t.Detail)
		}
	}
	for _, n := range r.Notes {
		fmt.Fprintf(w, "note: %s\n", n)
	}
}
