#!/usr/bin/env bash
# SPDX-License-Identifier: GPL-3.0-or-later
# The HTML report in a real browser (docs/report.md). Writes the example report, then has
# Debian's chromium, headless, (1) dump the DOM, which must hold the expected sections, figures
# and number of inline SVGs, and (2) take a screenshot, which must not be blank; neither run may
# print a console message (a script error, or an SVG attribute the browser rejects, such as a
# path with "nan" in it). A negative control then renders a deliberately broken, blank page and
# requires both detectors to fire, so that a change in chromium's log format or a PNG check gone
# lenient cannot make the test pass blind. Chromium missing is a failure, not a skip.
#
# Usage: browser_check.sh REPORT_SAMPLE PNG_CHECK WORK_DIR   (ctest passes the built programs)
set -euo pipefail

sample=$1
png_check=$2
work=$3

source "$(dirname "$0")/check_lib.sh"

"$sample" "$work/report" || fail "report_sample could not write the example report"
report="$work/report/report.html"
[ -s "$report" ] || fail "no report.html"

# --- The file itself: self-contained, no scripts. -------------------------------------------
check_self_contained "$report"
n_svg_file=$(grep -o '<svg[ >]' "$report" | wc -l)
[ "$n_svg_file" -eq 3 ] || fail "report.html holds $n_svg_file <svg> elements, expected 3"
for plot in section profile spectrum; do
  head -c 5 "$work/report/plots/$plot.svg" | grep -q '<?xml' || fail "plots/$plot.svg is not a standalone SVG"
done

width=1280
height=3400
url="file://$report"

run_browser dom --dump-dom "$url" >"$work/dom.html"
for id in summary ground signature dynamics provenance fig-section fig-profile fig-spectrum verdict-table; do
  grep -q "id=\"$id\"" "$work/dom.html" || fail "the rendered DOM has no element with id \"$id\""
done
n_svg_dom=$(grep -o '<svg[ >]' "$work/dom.html" | wc -l)
[ "$n_svg_dom" -eq 3 ] || fail "the rendered DOM holds $n_svg_dom <svg> elements, expected 3"
grep -q '<table' "$work/dom.html" || fail "the rendered DOM has no table"
grep -q 'Figure 3\.' "$work/dom.html" || fail "the rendered DOM stops before the third figure"
msgs=$(console_messages "$work/dom.log")
[ -z "$msgs" ] || fail "console messages while loading the report: $msgs"

run_browser shot --screenshot="$work/report.png" --window-size="$width,$height" "$url"
[ -s "$work/report.png" ] || fail "chromium wrote no screenshot"
msgs=$(console_messages "$work/shot.log")
[ -z "$msgs" ] || fail "console messages while rendering the report: $msgs"
"$png_check" "$work/report.png" --size "${width}x$height" --min-ink 0.02 --min-levels 16 \
  --min-extent 0.5 || fail "the screenshot looks blank (see $work/report.png)"

# --- Negative control: both detectors must catch a broken, blank page. -----------------------
mkdir -p "$work/control"
cat >"$work/control/broken.html" <<'EOF'
<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8" /><title>broken</title></head>
<body><svg width="10" height="10"><path d="M0,nan L5,5" stroke="#ffffff"/></svg>
<script>console.error("deliberate error");</script></body></html>
EOF
run_browser control --screenshot="$work/control/broken.png" --window-size=400,300 \
  "file://$work/control/broken.html"
[ -n "$(console_messages "$work/control.log")" ] ||
  fail "the console check did not see the deliberate errors: chromium's log format may have changed"
rc=0
"$png_check" "$work/control/broken.png" >/dev/null || rc=$?
[ "$rc" -eq 1 ] || fail "the PNG check did not call a blank page blank (exit $rc)"

echo "browser check: ok: sections, 3 inline SVGs, no console messages, screenshot $work/report.png"
