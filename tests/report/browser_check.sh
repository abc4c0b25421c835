#!/usr/bin/env bash
# Renders the HTML comparison report of the demo regimens in headless Chromium, to PNG and to PDF, and checks
# that the page is not blank: its screenshot must be much larger than the screenshot of an empty page of the
# same size, and the printed PDF must hold the caution and the comparison table.
#
#   browser_check.sh PLATEAU_BINARY SOURCE_DIR
#
# The first figure is also rendered alone, at its own size, and its screenshot must be far from blank: the
# inline SVG draws in a real browser.
#
# Uses Debian's chromium-headless-shell (scripts/install-deps --test installs it), else chromium; set
# PLATEAU_CHROMIUM to use another binary. Exits 77 (ctest: skipped) when none is installed. Chromium runs with
# networking features off and a fresh profile in a temporary folder, which is removed at the end.
set -euo pipefail

plateau=${1:?usage: browser_check.sh PLATEAU_BINARY SOURCE_DIR}
src=${2:?usage: browser_check.sh PLATEAU_BINARY SOURCE_DIR}
chromium=${PLATEAU_CHROMIUM:-}
if [[ -z "$chromium" ]]; then
  for c in /usr/bin/chromium-headless-shell /usr/bin/chromium; do
    [[ -x "$c" ]] && chromium=$c && break
  done
fi

if [[ -z "$chromium" || ! -x "$chromium" ]]; then
  echo "SKIP: no Chromium (apt-get install chromium-headless-shell, or set PLATEAU_CHROMIUM): report not rendered"
  exit 77
fi

work=$(mktemp -d "${TMPDIR:-/tmp}/plateau-browser-XXXXXX")
trap 'rm -rf "$work"' EXIT

fail() {
  echo "FAIL: $*"
  for log in "$work"/*.log; do
    [[ -f "$log" ]] || continue
    echo "--- $log (last lines)"
    grep -v 'dbus/' "$log" | tail -n 15 || true
  done
  exit 1
}

size_of() { stat -c %s "$1"; }

# One Chromium run with its own profile: render URL, extra flags in "$@" after the URL and the log name.
render() {
  local url=$1 log=$2
  shift 2
  local profile
  profile=$(mktemp -d "$work/profile-XXXXXX")
  timeout 120 "$chromium" --headless --no-sandbox --disable-gpu --disable-quic --no-first-run \
    --disable-background-networking --disable-component-update --disable-sync \
    --user-data-dir="$profile" "$@" "$url" >"$work/$log.log" 2>&1 ||
    fail "Chromium exited with status $? rendering $url"
}

# The report.
"$plateau" compare "$src/regimens/zelmarin-q8h-30min.toml" "$src/regimens/zelmarin-q8h-4h.toml" \
  "$src/regimens/zelmarin-load-q8h-4h.toml" "$src/regimens/zelmarin-continuous.toml" \
  --report "$work/report.html" >"$work/compare.log" 2>&1 || fail "plateau compare failed"
[[ -s "$work/report.html" ]] || fail "no report written"

# An empty page, for the size of a blank screenshot.
printf '<!DOCTYPE html>\n<html lang="en"><head><meta charset="utf-8"><title>blank</title></head><body></body></html>\n' \
  >"$work/blank.html"

render "file://$work/blank.html" blank --screenshot="$work/blank.png" --window-size=1200,2000
render "file://$work/report.html" report --screenshot="$work/report.png" --window-size=1200,2000
for png in blank report; do
  [[ -s "$work/$png.png" ]] || fail "no screenshot $png.png"
  [[ "$(head -c 8 "$work/$png.png" | od -An -tx1 | tr -d ' \n')" == "89504e470d0a1a0a" ]] ||
    fail "$png.png is not a PNG file"
done
blank=$(size_of "$work/blank.png")
report=$(size_of "$work/report.png")
echo "screenshot sizes: empty page $blank bytes, report $report bytes"
# A page of text, tables and figures compresses far worse than a white one: at least 10 times the bytes.
((report > 10 * blank)) || fail "the report's screenshot ($report bytes) is not clearly larger than a blank page ($blank bytes)"

# The figure area: the first inline SVG figure of the report alone on a page of its size (900 x 420), against a
# blank page of that size. Axes, labels and curves make its screenshot several times larger than a white one.
{
  printf '<!DOCTYPE html>\n<html lang="en"><head><meta charset="utf-8"><title>figure</title>'
  printf '<style>body{margin:0} svg{display:block;width:900px;height:420px}</style></head><body>\n'
  awk '/<svg/ {f = 1} f {print} /<\/svg>/ {if (f) exit}' "$work/report.html" | sed 's/^.*<svg/<svg/'
  printf '</body></html>\n'
} >"$work/figure.html"
grep -q '</svg>' "$work/figure.html" || fail "the report has no inline SVG figure"
grep -q '<path\|<polyline' "$work/figure.html" || fail "the report's first figure draws no curve"
render "file://$work/blank.html" blank-figure --screenshot="$work/blank-figure.png" --window-size=900,420
render "file://$work/figure.html" figure --screenshot="$work/figure.png" --window-size=900,420
[[ -s "$work/figure.png" ]] || fail "no screenshot of the figure"
blank_figure=$(size_of "$work/blank-figure.png")
figure=$(size_of "$work/figure.png")
echo "figure area: empty $blank_figure bytes, first figure $figure bytes"
((figure > 5 * blank_figure)) || fail "the figure's screenshot ($figure bytes) is close to blank ($blank_figure bytes)"

# Printed: a PDF of several pages that holds the caution and the comparison table.
render "file://$work/report.html" print --no-pdf-header-footer --print-to-pdf="$work/report.pdf"
[[ -s "$work/report.pdf" ]] || fail "no PDF printed"
[[ "$(head -c 5 "$work/report.pdf")" == "%PDF-" ]] || fail "report.pdf is not a PDF file"
echo "printed PDF: $(size_of "$work/report.pdf") bytes"
if command -v pdfinfo >/dev/null && command -v pdftotext >/dev/null; then
  pages=$(pdfinfo "$work/report.pdf" | awk '/^Pages:/ {print $2}')
  echo "printed pages: $pages"
  ((pages >= 2)) || fail "the printed report has $pages page(s); expected the table, figures and one section per regimen"
  pdftotext -layout "$work/report.pdf" "$work/report.txt"
  text=$(tr -s ' \n' ' ' <"$work/report.txt")
  for want in "CAUTION: Research simulation only, not clinical advice" "Figures side by side" \
    "Steady-state trough" "zelmarin-continuous" "Dosing intervals"; do
    [[ "$text" == *"$want"* ]] || fail "the printed report lacks '$want'"
  done
  caution_count=$(grep -o "CAUTION: Research simulation only" <<<"$text" | wc -l || true)
  ((caution_count == 2)) || fail "the printed report shows the caution $caution_count time(s), expected 2"
else
  echo "note: pdfinfo/pdftotext not found (apt-get install poppler-utils): printed text not checked"
fi
echo "PASS: the report renders and prints"
