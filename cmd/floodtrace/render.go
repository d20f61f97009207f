package main

import (
	"fmt"

	"github.com/spf13/pflag"

	"floodtrace/internal/outdir"
	"floodtrace/render"
	"floodtrace/runfolder"
)

var renderFlags struct {
	size   string
	format string
	frames framesValue
}

func init() {
	register(&command{
		Name:  "render",
		Usage: "render DIR [--size WxH] [--format png|svg] [--frames auto|none|N]",
		Short: "redraw the pictures and the report of a finished run",
		Long: `Render redraws the maps, charts, animation and report.html of a finished run from
its output files, without recomputing anything: use it for another picture size
or chart format. DIR must hold a finished run (with summary.json).

Examples:
  floodtrace render out/vardel --size 1280x720
  floodtrace render out/vardel --format svg
  floodtrace render out/vardel --frames 12
  floodtrace render out/vardel --frames none`,
		NArgs: exactly(1),
		Flags: func(fs *pflag.FlagSet) {
			fs.StringVar(&renderFlags.size, "size", "1920x1080", "picture size WxH")
			fs.StringVar(&renderFlags.format, "format", "png", "chart format: png or svg")
			renderFlags.frames = framesValue(runfolder.FramesAuto)
			fs.Var(&renderFlags.frames, "frames", "animation frames: auto (every saved map), none (no animation), or a count from 1 to 1000 chosen evenly among the saved maps")
		},
		Run: runRender,
	})
}

func runRender(args []string) error {
	dir := args[0]
	w, h, err := parseSize(renderFlags.size)
	if err != nil {
		return usageError{err.Error()}
	}
	if renderFlags.format != "png" && renderFlags.format != "svg" {
		return usageError{fmt.Sprintf("--format must be png or svg, not %q", renderFlags.format)}
	}
	if err := runfolder.Finished(dir); err != nil {
		return err
	}
	// Reopen the folder so the manifest lists the new pictures and the
	// run's own files are kept; the old pictures not drawn again (another
	// size or format) are removed when it closes, so the folder never
	// holds a mix.
	d, err := outdir.Reopen(dir)
	if err != nil {
		return err
	}
	d.Redraw(runfolder.IsPicture)
	rep, err := render.Run(dir, render.Options{Width: w, Height: h, Format: renderFlags.format, Frames: int(renderFlags.frames)})
	if err != nil {
		return err
	}
	d.Adopt(rep.Files...)
	if err := d.Close(); err != nil {
		return err
	}
	for _, n := range rep.Notes {
		fmt.Fprintf(stderr, "note: %s\n", n)
	}
	fmt.Fprintf(stdout, "drew %d file(s) in %s\n", len(rep.Files), dir)
	return nil
}
