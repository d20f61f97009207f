package runfolder

// File names and CSV headers of a balance folder (floodtrace balance,
// docs/OUTPUTS.md).
const (
	BalanceFile         = "balance.csv"
	BalanceJSONFile     = "balance.json"
	BalancedCaseFile    = "case_balanced.yaml"
	BalanceForecastFile = "balance_forecast.csv"
)

// Columns of the balance folder's CSV files.
const (
	ColRateNow               = "rate_now"
	ColRateRecommended       = "rate_recommended"
	ColChange                = "change"
	ColEfficiencyNow         = "efficiency_now"
	ColEfficiencyRecommended = "efficiency_recommended"
	ColLimit                 = "limit"
	ColForecast              = "forecast"
)

// The headers of balance.csv and balance_forecast.csv.
var (
	BalanceColumns         = []string{ColInjector, ColRateNow, ColRateRecommended, ColChange, ColEfficiencyNow, ColEfficiencyRecommended, ColLimit}
	BalanceForecastColumns = []string{ColTime, ColForecast, ColOilRate, ColWaterRate, ColWaterCut, ColCumOil, ColCumWater}
)
