#!/bin/sh
# Renders a riskmin HTML report to a PNG with headless Chromium, so that a person can look at it
# (or attach it to an issue) without opening a browser.
#
# Usage: scripts/render-report.sh REPORT.html [OUT.png] [WIDTH] [HEIGHT]
#   OUT.png  defaults to REPORT.png beside the report
#   WIDTH    window width in pixels (default 1400: two plots side by side)
#   HEIGHT   window height in pixels (default 4400: a report with two stopping tests); the
#            screenshot is of the window, so raise it for reports with more stopping tests
#
# Needs Debian's chromium package (apt-get install -y chromium); set CHROMIUM to use another
# binary. The report references nothing outside itself; Chromium's own background traffic is
# switched off by the flags below, and a throwaway profile directory is removed afterwards.
set -eu

if [ $# -lt 1 ] || [ $# -gt 4 ]; then
    echo "usage: $0 REPORT.html [OUT.png] [WIDTH] [HEIGHT]" >&2
    exit 2
fi
report=$1
if [ ! -f "$report" ]; then
    echo "$0: report file '$report' not found" >&2
    exit 2
fi
out=${2:-${report%.html}.png}
width=${3:-1400}
height=${4:-4400}
case "$width$height" in
    *[!0-9]*|'') echo "$0: WIDTH ($width) and HEIGHT ($height) must be whole numbers of pixels" >&2; exit 2 ;;
esac

browser=${CHROMIUM:-chromium}
if ! command -v "$browser" >/dev/null 2>&1; then
    echo "$0: '$browser' not found; install it with: apt-get install -y chromium" >&2
    exit 3
fi

report_abs=$(cd "$(dirname "$report")" && pwd)/$(basename "$report")
out_dir=$(cd "$(dirname "$out")" && pwd)
out_abs=$out_dir/$(basename "$out")

profile=$(mktemp -d)
trap 'rm -rf "$profile"' EXIT INT TERM
rm -f "$out_abs"

# Chromium reports harmless D-Bus errors in containers; keep its log and show it only on failure.
if ! "$browser" --headless --no-sandbox --disable-gpu --disable-quic --no-first-run \
        --disable-background-networking --disable-component-update --disable-sync \
        --hide-scrollbars --user-data-dir="$profile" --window-size="$width,$height" \
        --screenshot="$out_abs" "file://$report_abs" >"$profile/log" 2>&1 || [ ! -s "$out_abs" ]; then
    cat "$profile/log" >&2
    echo "$0: chromium did not write $out_abs" >&2
    exit 1
fi
echo "$out_abs"
