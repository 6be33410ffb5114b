//go:build !race

package model

// raceDetector is true when the tests run under the race detector, which
// makes the long numeric reference solutions several times slower.
const raceDetector = false
