// Package render draws the pictures and the report of a floodtrace run from
// the files the run wrote (see docs/OUTPUTS.md): property and saturation
// maps, streamlines, partitions, line charts, an animated saturation GIF
// and one self-contained HTML report. It knows no physics: everything it
// draws is read from a finished output folder, so a folder can be redrawn
// later at another size or format without recomputing the run.
//
// The maps are drawn with github.com/fogleman/gg on top of a raster filled
// pixel by pixel; the charts with gonum.org/v1/plot. render is the only
// package that draws: other packages hand it data and labels (a Scene,
// values, an Overlay of markers, a Chart of Series with optional line
// styles) and get pictures back. Colour maps are built
// from published anchor colours and re-spaced to equal steps in the Oklab
// colour space (Ottosson 2020), following the equal-perceptual-contrast
// idea of Kovesi (2015). Output bytes are deterministic: no time stamps,
// fixed palettes, fixed drawing order.
package render
