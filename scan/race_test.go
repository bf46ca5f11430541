//go:build race

package scan

// raceEnabled is true under the race detector, which slows the simulator
// about tenfold: the coverage tests then run fewer repetitions (the plain
// go test run measures the full figures).
const raceEnabled = true
