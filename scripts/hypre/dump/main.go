// Command dump is the floodtrace half of scripts/hypre_bench.sh: it loads a
// case, times floodtrace's pressure stage (pressure.Solve: assembly,
// preconditioner set-up, conjugate gradients to 1e-10, fluxes; the fastest
// of -r runs) and writes the assembled system on the whole grid for the C
// program hypre_tpfa.c, so that both solve the same matrix.
//
// Usage: go run ./scripts/hypre/dump -r 3 case.yaml system.bin
//
// The file holds little-endian int64 nx and ny, then for every grid cell
// k = j*nx + i five float64: the diagonal, the couplings to (i-1, j) and
// (i, j-1) (the matrix entries, 0 where there is none), the right-hand
// side and 1 for an unknown (0 for a cell outside the system, which gets
// the equation p = 0). It prints one line: "floodtrace SECONDS ITERATIONS
// PRECONDITIONER".
package main

import (
	"bufio"
	"encoding/binary"
	"flag"
	"fmt"
	"math"
	"os"
	"time"

	"floodtrace/pressure"
	"floodtrace/reservoir"
)

func main() {
	repeats := flag.Int("r", 3, "timed runs of the pressure stage; the fastest is printed")
	flag.Parse()
	if flag.NArg() != 2 {
		fmt.Fprintln(os.Stderr, "usage: dump [-r N] case.yaml system.bin")
		os.Exit(2)
	}
	if err := run(flag.Arg(0), flag.Arg(1), *repeats); err != nil {
		fmt.Fprintln(os.Stderr, "dump:", err)
		os.Exit(1)
	}
}

func run(casePath, out string, repeats int) error {
	m, err := reservoir.Load(casePath)
	if err != nil {
		return err
	}
	best := math.Inf(1)
	var sol *pressure.Solution
	for range max(1, repeats) {
		start := time.Now()
		if sol, err = pressure.Solve(pressure.Input{Model: m}, pressure.Settings{}); err != nil {
			return err
		}
		best = min(best, time.Since(start).Seconds())
	}
	sys, err := pressure.Assemble(pressure.Input{Model: m})
	if err != nil {
		return err
	}
	_, name, err := pressure.GridPreconditioner(sys, m.Grid)
	if err != nil {
		return err
	}
	g := m.Grid
	rec := make([]float64, 5*g.N())
	for k := 0; k < g.N(); k++ {
		rec[5*k] = 1
	}
	for u, k := range sys.Unknown {
		r := rec[5*k : 5*k+5]
		r[3], r[4] = sys.B[u], 1
		for q := sys.A.RowPtr[u]; q < sys.A.RowPtr[u+1]; q++ {
			switch l := sys.Unknown[sys.A.Col[q]]; {
			case l == k:
				r[0] = sys.A.Val[q]
			case l == k-1 && k%g.NX > 0:
				r[1] = sys.A.Val[q]
			case l == k-g.NX:
				r[2] = sys.A.Val[q]
			}
		}
	}
	f, err := os.Create(out)
	if err != nil {
		return err
	}
	w := bufio.NewWriter(f)
	if err := binary.Write(w, binary.LittleEndian, []int64{int64(g.NX), int64(g.NY)}); err != nil {
		return err
	}
	if err := binary.Write(w, binary.LittleEndian, rec); err != nil {
		return err
	}
	if err := w.Flush(); err != nil {
		return err
	}
	if err := f.Close(); err != nil {
		return err
	}
	fmt.Printf("floodtrace %.3f %d %s\n", best, sol.Iterations, name)
	return nil
}
