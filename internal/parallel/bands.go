package parallel

import (
	"io"
	"runtime"
	"sync"
	"sync/atomic"
)

// bandBufs recycles the text buffers of Bands between calls (a run
// writes many rasters and text files).
var bandBufs sync.Pool

// Bands formats bands 0..nb-1 on up to GOMAXPROCS goroutines and
// writes them to w in band order as they come, so that formatting goes on
// while earlier bands are written. At most a few bands per goroutine are
// held at once. The first error in band order is returned.
func Bands(w io.Writer, nb int, format func(band int, buf []byte) ([]byte, error)) error {
	if nb <= 0 {
		return nil
	}
	workers := min(runtime.GOMAXPROCS(0), nb)
	nbuf := min(nb, 4*workers)
	free := make(chan *[]byte, nbuf)
	for range nbuf {
		b, ok := bandBufs.Get().(*[]byte)
		if !ok {
			b = new([]byte)
		}
		free <- b
	}
	type band struct {
		buf *[]byte
		err error
	}
	done := make([]chan band, nb)
	for i := range done {
		done[i] = make(chan band, 1)
	}
	var next atomic.Int64
	var stop atomic.Bool
	for range workers {
		go func() {
			for {
				buf := <-free // before taking a band: the band in wait always has one
				b := int(next.Add(1)) - 1
				if b >= nb {
					free <- buf
					return
				}
				var err error
				if !stop.Load() {
					*buf, err = format(b, (*buf)[:0])
				}
				done[b] <- band{buf, err}
			}
		}()
	}
	var first error
	for b := range nb {
		r := <-done[b]
		if first == nil && r.err != nil {
			first = r.err
			stop.Store(true)
		}
		if first == nil {
			if _, err := w.Write(*r.buf); err != nil {
				first = err
				stop.Store(true)
			}
		}
		free <- r.buf
	}
	for range nbuf {
		if b := <-free; cap(*b) > 0 {
			bandBufs.Put(b)
		}
	}
	return first
}
