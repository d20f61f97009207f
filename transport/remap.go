package transport

import (
	"fmt"
	"math"
)

// Remap transfers saturations from one partition of a streamline's time of
// flight (segments srcDtau with saturations src) to another (dstDtau),
// conserving water volume: each destination segment receives the mean of
// the source saturations it overlaps, weighted by the overlap. Both
// partitions must cover the same total time of flight to within 1e-9
// relative; the last segments absorb the round-off. This first-order
// conservative remap moves saturations between the cell segments of a
// streamline and a regular tau grid, so that a few very short segments do
// not dictate the sub-step of Advance (common practice of streamline
// methods).
func Remap(dst, dstDtau, src, srcDtau []float64) error {
	if len(dst) != len(dstDtau) || len(src) != len(srcDtau) {
		return fmt.Errorf("transport: Remap sizes: %d values for %d destination segments, %d for %d source segments",
			len(dst), len(dstDtau), len(src), len(srcDtau))
	}
	if len(dst) == 0 || len(src) == 0 {
		return fmt.Errorf("transport: Remap needs at least one segment on each side")
	}
	var tSrc, tDst float64
	for i, h := range srcDtau {
		if !(h > 0) || math.IsInf(h, 0) {
			return fmt.Errorf("transport: source segment %d has time of flight %g", i, h)
		}
		if !finite(src[i]) {
			return fmt.Errorf("transport: source segment %d has saturation %g", i, src[i])
		}
		tSrc += h
	}
	for j, h := range dstDtau {
		if !(h > 0) || math.IsInf(h, 0) {
			return fmt.Errorf("transport: destination segment %d has time of flight %g", j, h)
		}
		tDst += h
	}
	if math.Abs(tSrc-tDst) > 1e-9*math.Max(tSrc, tDst) {
		return fmt.Errorf("transport: Remap totals differ: %g and %g", tSrc, tDst)
	}
	RemapTrusted(dst, dstDtau, src, srcDtau)
	return nil
}

// RemapTrusted is Remap without its checks, for partitions that the
// caller has built itself and knows to be valid: as many values as
// times of flight on each side, at least one segment each, positive
// finite times of flight, finite source values, and equal totals to within
// round-off (the checks cost about a third of Remap on the pressure-update
// benchmark). On such input it does exactly what Remap does.
func RemapTrusted(dst, dstDtau, src, srcDtau []float64) {
	i, j := 0, 0
	srcEnd, dstEnd := srcDtau[0], dstDtau[0]
	pos := 0.0
	acc, w := 0.0, 0.0
	for {
		lastSrc, lastDst := i == len(src)-1, j == len(dst)-1
		// Plain comparisons (the ends are finite and positive; math.Min
		// and math.Max differ only for NaN and signed zeros).
		end := srcEnd
		if dstEnd < end {
			end = dstEnd
		}
		if lastSrc && lastDst {
			if srcEnd < dstEnd {
				end = dstEnd
			} else {
				end = srcEnd
			}
		} else if lastSrc {
			end = dstEnd
		} else if lastDst {
			end = srcEnd
		}
		if d := end - pos; d > 0 {
			acc += d * src[i]
			w += d
		}
		pos = end
		if lastSrc && lastDst {
			dst[j] = acc / w
			return
		}
		advDst := !lastDst && (lastSrc || dstEnd <= srcEnd)
		advSrc := !lastSrc && (lastDst || srcEnd <= dstEnd)
		if advDst {
			if w > 0 {
				dst[j] = acc / w
			} else {
				dst[j] = src[i]
			}
			acc, w = 0, 0
			j++
			dstEnd += dstDtau[j]
		}
		if advSrc {
			i++
			srcEnd += srcDtau[i]
		}
	}
}
