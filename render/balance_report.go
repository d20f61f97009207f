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

// BalanceRow is one injector's row of the balance report, formatted by
// the caller.
type BalanceRow struct {
	Injector, RateNow, RateRecommended, Change, EfficiencyNow, EfficiencyRecommended, Limit string
}

// BalanceReport is the text of the balance report: the headline lines,
// the injector table and the flagged producers.
type BalanceReport struct {
	Title    string
	Headline []string
	RateUnit string
	Rows     []BalanceRow
	Flags    []string
	Method   []string
}

// WriteBalanceReport writes report.html into the balance folder dir: the
// recommendation, the injector table, the flagged producers, the method
// and the pictures files names (relative to dir, drawn before), embedded.
func WriteBalanceReport(dir string, rep BalanceReport, files []string) (string, error) {
	type fig struct {
		Src     template.URL
		Caption string
	}
	caption := map[string]string{
		BalanceEfficiencyChart: "Injection efficiency per injector (attributed oil over injected water) over the horizon, at the current and at the recommended rates.",
		BalancePairsNowMap:     "Well pairs at the current rates: line width in proportion to the water the injector sends to the producer, colour the pair efficiency.",
		BalancePairsRecMap:     "Well pairs at the recommended rates (same scales).",
		BalanceOilChart:        "Field oil rate of the two forecasts.",
		BalanceWaterCutChart:   "Field water cut of the two forecasts.",
	}
	var figs []fig
	for _, f := range files {
		b, err := os.ReadFile(filepath.Join(dir, f))
		if err != nil {
			return "", fmt.Errorf("render: %w", err)
		}
		figs = append(figs, fig{template.URL("data:image/png;base64," + base64.StdEncoding.EncodeToString(b)), caption[f]})
	}
	var buf bytes.Buffer
	if err := balanceTemplate.Execute(&buf, struct {
		BalanceReport
		Figures []fig
	}{rep, figs}); err != nil {
		return "", fmt.Errorf("render: balance report: %w", err)
	}
	if err := writeFileAtomic(filepath.Join(dir, runfolder.ReportFile), buf.Bytes()); err != nil {
		return "", err
	}
	return runfolder.ReportFile, nil
}

var balanceTemplate = template.Must(template.New("balance").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{{.Title}} · injection balance</title>
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
<body><main>
<header><div class="kicker">Injection balance</div><h1>{{.Title}}</h1>
{{range .Headline}}<div>{{.}}</div>{{end}}</header>
<section><h2>Injectors</h2>
<table><tr><th>injector</th><th class="n">rate now ({{.RateUnit}})</th><th class="n">recommended</th><th class="n">change</th><th class="n">efficiency now</th><th class="n">recommended</th><th>limit</th></tr>
{{range .Rows}}<tr><td>{{.Injector}}</td><td class="n">{{.RateNow}}</td><td class="n">{{.RateRecommended}}</td><td class="n">{{.Change}}</td><td class="n">{{.EfficiencyNow}}</td><td class="n">{{.EfficiencyRecommended}}</td><td>{{.Limit}}</td></tr>
{{end}}</table></section>
{{if .Flags}}<section><h2>Producers that mostly cycle water</h2>
{{range .Flags}}<div class="flag">{{.}}</div>{{end}}</section>{{end}}
<section><h2>Pictures</h2>
{{range .Figures}}<figure><img src="{{.Src}}" alt=""><figcaption>{{.Caption}}</figcaption></figure>
{{end}}</section>
<section><h2>Method</h2>{{range .Method}}<p>{{.}}</p>{{end}}</section>
</main></body></html>
`))
