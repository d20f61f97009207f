#!/usr/bin/env bash
# Round the values of GIS ASCII rasters to one decimal in place, keeping the
# six header lines and NODATA (-9999) as they are. Used to keep the demo
# maps small, e.g. for the screening ensemble of examples/vardel:
#   scripts/round_raster.sh examples/vardel/ensemble/perm_*.asc
set -euo pipefail
for f in "$@"; do
  tmp="$f.tmp.$$"
  awk 'NR <= 6 { print; next }
       { out = ""
         for (i = 1; i <= NF; i++) {
           v = ($i == "-9999") ? "-9999" : sprintf("%.1f", $i)
           out = out (i > 1 ? " " : "") v
         }
         print out }' "$f" > "$tmp"
  mv "$tmp" "$f"
done
