package main

import (
	"os"
	"testing"

	"floodtrace/internal/hugeheap"
)

// TestMain backs the heap with huge pages as main does (see
// internal/hugeheap), so that the pipeline benchmarks time what a run of
// the command costs.
func TestMain(m *testing.M) {
	hugeheap.Reserve(512 << 20)
	os.Exit(m.Run())
}
