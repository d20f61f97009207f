package render

import (
	"bytes"
	"encoding/base64"
	"fmt"
	"html/template"
	"os"
	"path/filepath"

	"floodtrace/runfolder"
)

// The one-page reports of the balance and calibration folders share their
// head (the style) and the way they embed pictures and are written.

// pageHead returns the HTML head of a folder's report page, its title
// the case title followed by kind.
func pageHead(kind string) string {
	return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{{.Title}} · ` + kind + `</title>
<style>
body { margin:0; background:#f3f4f6; color:#1f2328; font: 15px/1.5 "Segoe UI", "Helvetica Neue", Arial, "DejaVu Sans", sans-serif; }
main { max-width: 1180px; margin: 0 auto; padding: 28px 28px 60px; }
header { border-left: 6px solid #0b5f8a; background: #fff; padding: 20px 26px; }
header .kicker { letter-spacing: .14em; text-transform: uppercase; font-size: 12px; color: #0b5f8a; font-weight: 600; }
h1 { margin: 4px 0 6px; font-size: 30px; }
section { background: #fff; margin-top: 22px; padding: 18px 26px 22px; }
h2 { font-size: 19px; margin: 0 0 12px; padding-bottom: 6px; border-bottom: 1px solid #d8dce2; }
table { border-collapse: collapse; width: 100%; font-variant-numeric: tabular-nums; }
th, td { padding: 6px 10px; text-align: left; border-bottom: 1px solid #d8dce2; }
th { font-size: 13px; color: #5b6470; background: #f7f8fa; }
td.n, th.n { text-align: right; }
.flag { border-left: 5px solid #b3261e; background: #fdecea; padding: 10px 16px; margin: 6px 0; }
figure { margin: 0 0 26px; }
figure img { display: block; width: 100%; height: auto; border: 1px solid #d8dce2; }
figcaption { color: #5b6470; font-size: 13.5px; margin-top: 6px; }
</style>
</head>
`
}

// pageFigure is a picture embedded in a report page.
type pageFigure struct {
	Src     template.URL
	Caption string
}

// embedFigures reads the PNG pictures files (relative to dir) and returns
// them as data URLs with their captions.
func embedFigures(dir string, files []string, caption map[string]string) ([]pageFigure, error) {
	var figs []pageFigure
	for _, f := range files {
		b, err := os.ReadFile(filepath.Join(dir, f))
		if err != nil {
			return nil, fmt.Errorf("render: %w", err)
		}
		figs = append(figs, pageFigure{template.URL("data:image/png;base64," + base64.StdEncoding.EncodeToString(b)), caption[f]})
	}
	return figs, nil
}

// writePage executes t with data and writes it atomically as the
// report.html of dir; what names the report in errors.
func writePage(dir string, t *template.Template, data any, what string) (string, error) {
	var buf bytes.Buffer
	if err := t.Execute(&buf, data); err != nil {
		return "", fmt.Errorf("render: %s report: %w", what, err)
	}
	if err := writeFileAtomic(filepath.Join(dir, runfolder.ReportFile), buf.Bytes()); err != nil {
		return "", err
	}
	return runfolder.ReportFile, nil
}
