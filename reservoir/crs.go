package reservoir

import (
	"os"
	"regexp"
	"strconv"
	"strings"
)

// CRS is the coordinate reference system of a case's map coordinates,
// from `crs: EPSG:n` in the case file or from a .prj file (WKT) beside one
// of its raster maps. The zero value is unknown: outputs then carry none.
type CRS struct {
	// EPSG is the EPSG code (0: unknown), from the crs key or the last
	// EPSG authority of the WKT.
	EPSG int
	// WKT is the text of the .prj file, "" when the CRS came from the crs
	// key alone.
	WKT string
	// From names where the CRS came from (the case file line or the .prj
	// path), for messages.
	From string
}

// Known reports whether the CRS is set.
func (c CRS) Known() bool { return c.EPSG > 0 || c.WKT != "" }

// epsgAuthority matches an EPSG authority in WKT 1 (AUTHORITY["EPSG","n"])
// or WKT 2 (ID["EPSG",n]).
var epsgAuthority = regexp.MustCompile(`(?i)(?:AUTHORITY|ID)\[\s*"EPSG"\s*,\s*"?(\d+)"?\s*\]`)

// WKTEPSG returns the EPSG code of a WKT text: that of its last EPSG
// authority, which in WKT 1 belongs to the outermost system (0 if none;
// the WKT 2 outermost ID is also last).
func WKTEPSG(wkt string) int {
	m := epsgAuthority.FindAllStringSubmatch(wkt, -1)
	if len(m) == 0 {
		return 0
	}
	n, _ := strconv.Atoi(m[len(m)-1][1])
	return n
}

// ParseEPSG reads "EPSG:n" (case-insensitive, n from 1 to 32766: the range
// GeoTIFF keys hold); ok is false otherwise.
func ParseEPSG(s string) (int, bool) {
	s = strings.TrimSpace(s)
	if len(s) < 6 || !strings.EqualFold(s[:5], "EPSG:") {
		return 0, false
	}
	n, err := strconv.Atoi(strings.TrimSpace(s[5:]))
	if err != nil || n < 1 || n > 32766 {
		return 0, false
	}
	return n, true
}

// readPRJ reads the .prj beside a raster map, if there is one.
func readPRJ(mapPath string) (CRS, bool) {
	p := strings.TrimSuffix(mapPath, fileExt(mapPath)) + ".prj"
	b, err := os.ReadFile(p)
	if err != nil {
		return CRS{}, false
	}
	wkt := strings.TrimSpace(strings.TrimPrefix(string(b), "\xef\xbb\xbf"))
	if wkt == "" {
		return CRS{}, false
	}
	return CRS{EPSG: WKTEPSG(wkt), WKT: wkt, From: p}, true
}

func fileExt(p string) string {
	i := strings.LastIndexAny(p, `./\`)
	if i < 0 || p[i] != '.' {
		return ""
	}
	return p[i:]
}
