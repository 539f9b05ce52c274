package analysis

import (
	"testing"

	"reticle/internal/race"
)

// longUnderRace skips a test whose work is one long numerical run under
// the race detector, which slows execution 2 to 20 times (the Go race
// detector's documentation): the same code paths run concurrently in
// the package's shorter tests (TestBlind, TestReweigh, TestSecondPhase),
// and make unit runs the skipped test in full.
func longUnderRace(t *testing.T) {
	t.Helper()
	if race.Enabled {
		t.Skip("a long numerical test, run without the race detector by make unit")
	}
}
