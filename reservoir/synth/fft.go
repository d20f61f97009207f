package synth

import (
	"gonum.org/v1/gonum/dsp/fourier"

	"floodtrace/internal/parallel"
)

// nextFast returns the smallest m >= n whose only prime factors are 2, 3
// and 5, the lengths the FFT handles fastest.
func nextFast(n int) int {
	if n <= 1 {
		return 1
	}
	for m := n; ; m++ {
		r := m
		for _, p := range [...]int{2, 3, 5} {
			for r%p == 0 {
				r /= p
			}
		}
		if r == 1 {
			return m
		}
	}
}

// parallelRange splits [0, n) into contiguous blocks, one per worker, and
// runs fn on each. Every index is processed by exactly the same arithmetic
// whatever the split, so results do not depend on the number of workers.
func parallelRange(n int, fn func(lo, hi int)) {
	w := parallel.Workers(0)
	parallel.Pieces(n, w, w, func(_, lo, hi int) { fn(lo, hi) })
}

// colBlock is the number of columns gathered together in the column pass,
// so each sweep over the rows reads contiguous runs of memory.
const colBlock = 16

// fft2 replaces data (my rows of mx values, row-major) by its unnormalised
// forward 2D discrete Fourier transform
//
//	X[l,k] = sum_j sum_i x[j,i] exp(-2 pi i (k i/mx + l j/my)),
//
// computed as 1D transforms of the rows and then of the columns with gonum's
// dsp/fourier (a port of FFTPACK, Swarztrauber 1982).
func fft2(data []complex128, mx, my int) {
	parallelRange(my, func(lo, hi int) {
		f := fourier.NewCmplxFFT(mx)
		for j := lo; j < hi; j++ {
			row := data[j*mx : (j+1)*mx]
			f.Coefficients(row, row)
		}
	})
	nb := (mx + colBlock - 1) / colBlock
	parallelRange(nb, func(lo, hi int) {
		f := fourier.NewCmplxFFT(my)
		buf := make([]complex128, colBlock*my)
		for b := lo; b < hi; b++ {
			i0 := b * colBlock
			w := min(colBlock, mx-i0)
			for j := range my {
				src := data[j*mx+i0 : j*mx+i0+w]
				for c, v := range src {
					buf[c*my+j] = v
				}
			}
			for c := range w {
				col := buf[c*my : (c+1)*my]
				f.Coefficients(col, col)
			}
			for j := range my {
				dst := data[j*mx+i0 : j*mx+i0+w]
				for c := range dst {
					dst[c] = buf[c*my+j]
				}
			}
		}
	})
}
