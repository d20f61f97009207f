package flood

import (
	"testing"

	"floodtrace/internal/hugeheap/hugeheaptest"
)

// TestMain backs the heap with huge pages as the command does, so that the
// benchmarks time what a run of the command costs.
func TestMain(m *testing.M) { hugeheaptest.Main(m) }
