package streamline_test

import (
	"os"
	"testing"

	"floodtrace/internal/hugeheap"
)

// TestMain backs the heap with huge pages as the command does at its
// start (cmd/floodtrace, internal/hugeheap), so that the benchmarks time
// what a run of the command costs.
func TestMain(m *testing.M) {
	hugeheap.Reserve(512 << 20)
	os.Exit(m.Run())
}
