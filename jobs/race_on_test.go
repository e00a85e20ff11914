//go:build race

package jobs

// raceDetector is true when the tests are built with -race, which slows
// the pure-Go SQLite driver by an order of magnitude.
const raceDetector = true
