package render

import (
	"html/template"
	"sync"
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
	caption := map[string]string{
		BalanceEfficiencyChart: "Injection efficiency per injector (attributed oil over injected water) over the horizon, at the current and at the recommended rates.",
		BalancePairsNowMap:     "Well pairs at the current rates: line width in proportion to the water the injector sends to the producer, colour the pair efficiency.",
		BalancePairsRecMap:     "Well pairs at the recommended rates (same scales).",
		BalanceOilChart:        "Field oil rate of the two forecasts.",
		BalanceWaterCutChart:   "Field water cut of the two forecasts.",
	}
	figs, err := embedFigures(dir, files, caption)
	if err != nil {
		return "", err
	}
	return writePage(dir, balanceTemplate(), struct {
		BalanceReport
		Figures []pageFigure
	}{rep, figs}, "balance")
}

var balanceTemplate = sync.OnceValue(func() *template.Template {
	return template.Must(template.New("balance").Parse(`` + pageHead("injection balance") + `<body><main>
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
})
