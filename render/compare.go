package render

import "image/color"

// pairDashes is the dash pattern of the B line of a Pair (points at
// 1920x1080); the A line is solid.
var pairDashes = []float64{8, 4}

// pairKeyColor is the neutral grey of the two legend keys of PairSeries.
var pairKeyColor = color.RGBA{90, 90, 90, 255}

// Pair is one quantity from two sources, A and B (two runs, say), each a
// curve of points.
type Pair struct {
	Name   string
	AX, AY []float64
	BX, BY []float64
}

// PairSeries returns the series of a chart comparing pairs: one colour per
// pair (the categorical palette, in order), A solid and B dashed
// (pairDashes). The legend names each pair once, then keys the two line
// styles in grey with nameA and nameB.
func PairSeries(pairs []Pair, nameA, nameB string) []Series {
	out := make([]Series, 0, 2*len(pairs)+2)
	for i, p := range pairs {
		col, _ := SeriesStyle(i)
		out = append(out,
			Series{Name: p.Name, X: p.AX, Y: p.AY, Style: &LineStyle{Color: col}},
			Series{Name: p.Name, X: p.BX, Y: p.BY, Style: &LineStyle{Color: col, Dashes: pairDashes}, NoLegend: true})
	}
	return append(out,
		Series{Name: nameA, Style: &LineStyle{Color: pairKeyColor}},
		Series{Name: nameB, Style: &LineStyle{Color: pairKeyColor, Dashes: pairDashes}})
}
