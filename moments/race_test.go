//go:build race

package moments

// raceEnabled shortens the tests that take minutes under the race detector.
const raceEnabled = true
