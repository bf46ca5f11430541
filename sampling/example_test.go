package sampling_test

import (
	"context"
	"fmt"

	"mixdepth/circuits"
	"mixdepth/sampling"
)

// Example_sampleAndScore samples eight random circuits on a ring of six
// qubits under a noise model, scores the shots with the linear
// cross-entropy benchmark, and compares the normalized score with the
// digital error model's prediction.
func Example_sampleAndScore() {
	g, err := circuits.ParseGraph("ring:6")
	if err != nil {
		panic(err)
	}
	sched, err := circuits.NewSchedule(circuits.KindLayered, g)
	if err != nil {
		panic(err)
	}
	gates, err := circuits.NewEnsemble("haar")
	if err != nil {
		panic(err)
	}
	noise := sampling.Noise{Fidelity: 0.95, GateError: 0.01, Readout01: 0.01, Readout10: 0.02}
	cfg := &sampling.Config{
		Schedule: sched, Ensemble: gates, Qubits: g.Qubits, Depth: 12, Seed: 7,
		Instances: []int{0, 1, 2, 3, 4, 5, 6, 7}, Shots: 4000, Noise: noise,
	}
	var groups []sampling.InstanceSamples
	if _, err := sampling.Run(context.Background(), cfg, func(r *sampling.Result) error {
		groups = append(groups, r.Samples())
		return nil
	}); err != nil {
		panic(err)
	}
	rep := sampling.Score(g.Qubits, groups)
	counts := sampling.CountGates(sched, gates, g.Qubits, cfg.Depth)
	model := noise.ErrorModel().Predict(counts)

	fmt.Printf("%d shots of %d circuits with %d two-qubit gates each\n", rep.Shots, len(rep.Instances), counts.TwoQubit)
	fmt.Printf("linear XEB %.2f ± %.2f, ideal D·Z − 1 = %.2f\n", rep.Linear, rep.LinearErr, rep.Ideal)
	fmt.Printf("normalized %.2f ± %.2f\n", rep.Normalized, rep.NormalizedErr)
	fmt.Printf("digital error model %.2f\n", model.Fidelity)
	// Output:
	// 32000 shots of 8 circuits with 36 two-qubit gates each
	// linear XEB 0.62 ± 0.01, ideal D·Z − 1 = 1.00
	// normalized 0.62 ± 0.01
	// digital error model 0.60
}

// ExampleErrorModel_Predict predicts the fidelity of a circuit with 92
// two-qubit gates of error 0.5% on 16 qubits read out with flip
// probabilities 1% (0→1) and 3% (1→0).
func ExampleErrorModel_Predict() {
	m := sampling.ErrorModel{TwoQubitError: 0.005, Depolarizing: 1, Readout01: 0.01, Readout10: 0.03}
	p := m.Predict(sampling.GateCounts{TwoQubit: 92, Qubits: 16})
	fmt.Printf("gates %.4f · readout %.4f = %.4f\n", p.TwoQubit, p.Readout, p.Fidelity)
	// Output:
	// gates 0.6306 · readout 0.7238 = 0.4564
}

// Example_chipNoise samples a four-qubit line whose coupler 1-2 is weak
// and whose qubit 0 reads poorly (rates of our own), with single-qubit
// errors on the dressing of cz+haar1, and compares the normalized score
// with the digital error model element by element.
func Example_chipNoise() {
	g, err := circuits.ParseGraph("line:4")
	if err != nil {
		panic(err)
	}
	sched, err := circuits.NewSchedule(circuits.KindLayered, g)
	if err != nil {
		panic(err)
	}
	gates, err := circuits.NewEnsemble("cz+haar1")
	if err != nil {
		panic(err)
	}
	chip := circuits.UniformNoise(g, 0.005, 0.002, 0.01, 0.02, 1)
	if i, ok := chip.PairIndex(1, 2); ok {
		chip.Pair[i] = 0.04
	}
	chip.Readout10[0] = 0.08
	cfg := &sampling.Config{
		Schedule: sched, Ensemble: gates, Qubits: g.Qubits, Depth: 12, Seed: 7,
		Instances: []int{0, 1, 2, 3, 4, 5, 6, 7}, Shots: 4000, Noise: sampling.Noise{Chip: chip},
	}
	var groups []sampling.InstanceSamples
	if _, err := sampling.Run(context.Background(), cfg, func(r *sampling.Result) error {
		groups = append(groups, r.Samples())
		return nil
	}); err != nil {
		panic(err)
	}
	rep := sampling.Score(g.Qubits, groups)
	fmt.Printf("normalized %.2f ± %.2f\n", rep.Normalized, rep.NormalizedErr)
	fmt.Printf("digital error model %.2f\n", chip.DigitalFidelity(sched, gates, cfg.Depth))
	// Output:
	// normalized 0.66 ± 0.01
	// digital error model 0.62
}
