//go:build race

package api

// raceDetector is true when the tests run with -race, which slows the
// model and the pure-Go SQLite driver some tenfold.
const raceDetector = true
