//go:build race

package sampling

// raceEnabled is true under the race detector: the coverage test then runs
// fewer repetitions (the plain go test run measures the full figure).
const raceEnabled = true
