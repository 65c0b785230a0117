#!/usr/bin/env bash
# SPDX-License-Identifier: GPL-3.0-or-later
# The report of a real run in a real browser: `voidsign run` on report_scenario.yaml, then
# Debian's chromium, headless, must render DIR/report.html with every section and plot, without
# a console message, to a screenshot that is not blank; every plot is also a standalone SVG.
#
# Usage: run_report_check.sh VOIDSIGN PNG_CHECK WORK_DIR   (ctest passes the built programs)
set -euo pipefail

voidsign=$1
png_check=$2
work=$3
here=$(dirname "$0")

source "$here/check_lib.sh"

"$voidsign" run "$here/report_scenario.yaml" --out "$work/run" >"$work/run.log" 2>&1 ||
  { tail -n 20 "$work/run.log" >&2; fail "voidsign run failed"; }
report="$work/run/report.html"
[ -s "$report" ] || fail "the run wrote no report.html"
check_self_contained "$report"
plots=(section settlement anomaly tilt strain ambient)
for plot in "${plots[@]}"; do
  head -c 5 "$work/run/plots/$plot.svg" | grep -q '<?xml' || fail "plots/$plot.svg is missing or not a standalone SVG"
done
n_svg=$(grep -o '<svg[ >]' "$report" | wc -l)
[ "$n_svg" -eq "${#plots[@]}" ] || fail "report.html holds $n_svg <svg> elements, expected ${#plots[@]}"

url="file://$report"
run_browser dom --dump-dom "$url" >"$work/dom.html"
for id in verdict verdict-table verdict-how ground fig-section static fig-settlement fig-anomaly fig-tilt fig-strain stability \
          dynamic fig-ambient provenance cautions; do
  grep -q "id=\"$id\"" "$work/dom.html" || fail "the rendered DOM has no element with id \"$id\""
done
n_svg_dom=$(grep -o '<svg[ >]' "$work/dom.html" | wc -l)
[ "$n_svg_dom" -eq "${#plots[@]}" ] || fail "the rendered DOM holds $n_svg_dom <svg> elements, expected ${#plots[@]}"
for word in "not detectable" "Input SHA-256" "elastic screening model"; do
  grep -q "$word" "$work/dom.html" || fail "the rendered report does not say \"$word\""
done
msgs=$(console_messages "$work/dom.log")
[ -z "$msgs" ] || fail "console messages while loading the report: $msgs"

width=1280
height=4000
run_browser shot --screenshot="$work/report.png" --window-size="$width,$height" "$url"
msgs=$(console_messages "$work/shot.log")
[ -z "$msgs" ] || fail "console messages while rendering the report: $msgs"
"$png_check" "$work/report.png" --size "${width}x$height" --min-ink 0.02 --min-levels 16 --min-extent 0.5 ||
  fail "the screenshot looks blank (see $work/report.png)"
echo "run report check: ok: every section, ${#plots[@]} plots, no console messages, screenshot $work/report.png"
