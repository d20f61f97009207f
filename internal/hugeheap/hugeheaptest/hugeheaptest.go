// Package hugeheaptest is the TestMain of the packages whose benchmarks
// time whole stages: it backs the heap with huge pages as the command
// does at its start (see internal/hugeheap), so that they time what a run
// of the command costs.
package hugeheaptest

import (
	"os"

	"floodtrace/internal/hugeheap"
)

// Main reserves the huge-page heap, runs the tests and exits with their
// code: func TestMain(m *testing.M) { hugeheaptest.Main(m) }.
func Main(m interface{ Run() int }) {
	hugeheap.Reserve(512 << 20)
	os.Exit(m.Run())
}
