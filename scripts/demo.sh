#!/usr/bin/env bash
# The main job on the shipped demo vessel "Brindle" (an invented 12 m work barge):
# mesh check, hydrostatic table and curves, floating position, GZ curve with free trim,
# IMO 2008 IS Code 2.2 criteria, the rendered heel sweep and the design-review report. Outputs go to
# demo_out/.
set -euo pipefail
cd "$(dirname "$0")/.."
MH="${MESHHYDRO:-meshhydro}"
OUT=demo_out
mkdir -p "$OUT"
# Commands that judge criteria exit 1 when a criterion is not met (a finding, shown); any other failure stops.
judged() { local rc=0; "$@" || rc=$?; [ "$rc" -le 1 ] || exit "$rc"; echo "(exit status $rc: 1 means not all criteria met)"; }
CASE=meshes/cases/brindle_barge.toml
echo "== 1. mesh health check"
"$MH" check meshes/brindle_barge.stl
echo; echo "== 2. hydrostatic table (also $OUT/hydrostatics.csv and the curves $OUT/hydrostatics.png)"
"$MH" table meshes/brindle_barge.stl --drafts 0.2:1.4:0.2 --plot "$OUT/hydrostatics.png"
"$MH" table meshes/brindle_barge.stl --drafts 0.2:1.4:0.1 --format csv --out "$OUT/hydrostatics.csv"
echo; echo "== 3. floating position of the loaded condition"
"$MH" float "$CASE"
"$MH" float "$CASE" --format json --out "$OUT/float.json"
echo; echo "== 4. righting levers with free trim, both directions (GZ plot $OUT/gz.png)"
"$MH" righting "$CASE" --heels 0:180:1 --plot "$OUT/gz.png" --format csv --out "$OUT/gz.csv" --quiet
"$MH" righting "$CASE" --heels 0:90:10 --quiet
echo; echo "== 5. criteria (exit status 1 means not all met)"
judged "$MH" criteria "$CASE" --quiet
judged "$MH" criteria "$CASE" --quiet --format json --out "$OUT/criteria.json"
echo; echo "== 5b. with the weather criterion (IS Code 2.3; plots $OUT/gz_weather.png, gz_weather-levers.png) and the KG limit curve"
judged "$MH" criteria "$CASE" --set imo2008-weather --quiet --plot "$OUT/gz_weather.png" --format json \
    --out "$OUT/criteria_weather.json"
"$MH" kg-limits "$CASE" --displacements 30:50:5 --set imo2008-weather --plot "$OUT/kg_limits.png" --quiet
echo; echo "== 6. heel sweep: frames, section view, contact sheet, GIF in $OUT/sweep/"
"$MH" sweep "$CASE" --heels 0:60:5 --out "$OUT/sweep" --sheet --gif --quiet
echo; echo "== 7. design-review report: one self-contained HTML file $OUT/review.html (exit 1: a condition fails)"
judged "$MH" report "$CASE" --out "$OUT/review.html" --sections 10 --quiet
echo; echo "done: outputs in $OUT/"
ls -1 "$OUT" "$OUT/sweep"
