#!/bin/sh
# The study report in a real browser (issue 21): renders each report.html given with Debian's
# chromium, headless, and checks that
#  * it loads with no console message at all (the page carries a Content-Security-Policy of
#    default-src 'none', so a script, a font, an image or any other network request would be
#    blocked and reported on the console; so would a markup error the browser logs);
#  * every figure the page declares (<main data-figures="N">) is in the rendered DOM as an
#    <svg> with its <title> and <desc>, and every section of the page is there;
#  * it prints (PDF) and gives a screenshot; both are kept as artefacts in OUT_DIR.
# Not part of the CTest suite: .ci/run calls it, after installing chromium when it can.
#
#   sh tests/browser/check_report.sh OUT_DIR REPORT.html [REPORT.html ...]
set -u
out=$1; shift
fail() { echo "browser check: $*"; exit 1; }
browser=""
for b in chromium chromium-browser; do command -v "$b" > /dev/null 2>&1 && { browser=$b; break; }; done
[ -n "$browser" ] || fail "chromium not found"
mkdir -p "$out" || fail "cannot create $out"
flags="--headless --no-sandbox --disable-gpu --hide-scrollbars --virtual-time-budget=5000"
n=0
for report in "$@"; do
  n=$((n + 1))
  [ -s "$report" ] || fail "no report at $report"
  url="file://$(cd "$(dirname "$report")" && pwd)/$(basename "$report")"
  name="report-$n"
  # shellcheck disable=SC2086
  timeout 120 "$browser" $flags --enable-logging=stderr --v=0 --dump-dom "$url" \
    > "$out/$name.dom.html" 2> "$out/$name.console.log" || fail "$browser failed on $report"
  if grep -q 'CONSOLE' "$out/$name.console.log"; then
    grep 'CONSOLE' "$out/$name.console.log"
    fail "$report: the browser console has messages (above)"
  fi
  /usr/bin/python3 - "$out/$name.dom.html" "$report" <<'PY' || fail "$report: figures missing (above)"
import re, sys
dom = open(sys.argv[1], encoding="utf-8").read()
m = re.search(r'<main data-figures="(\d+)"', dom)
if not m:
    sys.exit(f"{sys.argv[2]}: no <main data-figures> in the rendered page")
declared = int(m.group(1))
svgs = re.findall(r"<svg\b.*?</svg>", dom, re.S)
problems = []
if len(svgs) != declared:
    problems.append(f"{declared} figures declared, {len(svgs)} <svg> rendered")
for k, svg in enumerate(svgs):
    if "<title" not in svg or "<desc" not in svg:
        problems.append(f"figure {k + 1} has no title or text alternative")
    if not re.search(r"<(polyline|rect|line|g) ", svg):
        problems.append(f"figure {k + 1} draws nothing")
for section in ("caution", "answer", "hydrographs", "hyetographs", "long-sections",
                "schematic", "attenuation", "findings", "checks", "provenance"):
    if f'<section id="{section}">' not in dom:
        problems.append(f"section {section} missing")
if problems:
    sys.exit(sys.argv[2] + ":\n  " + "\n  ".join(problems))
print(f"browser check: {sys.argv[2]}: {declared} figures rendered, each with a title and a text alternative")
PY
  # shellcheck disable=SC2086
  timeout 120 "$browser" $flags --window-size=1200,2600 --screenshot="$out/$name.png" "$url" \
    > /dev/null 2>&1 || fail "$browser could not take a screenshot of $report"
  [ "$(wc -c < "$out/$name.png")" -gt 20000 ] || fail "$out/$name.png is (nearly) empty"
  # shellcheck disable=SC2086
  timeout 120 "$browser" $flags --no-pdf-header-footer --print-to-pdf="$out/$name.pdf" "$url" \
    > /dev/null 2>&1 || fail "$browser could not print $report"
  head -c 5 "$out/$name.pdf" | grep -q '%PDF-' || fail "$out/$name.pdf is not a PDF"
  echo "browser check: $report: screenshot $out/$name.png, print $out/$name.pdf"
done
echo "browser check: passed ($n report(s))"
