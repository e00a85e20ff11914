//go:build !race

package jobs

// raceDetector is true when the tests are built with -race.
const raceDetector = false
