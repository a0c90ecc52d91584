#!/usr/bin/env bash
# Regenerates the pictures the README shows, from the program itself (never drawn by hand):
#   docs/demo-contact-sheet.png  the contact sheet of `thinfoil demo` (invented scenario, simulated images)
#   docs/explorer.png            a screenshot of `thinfoil explore` (npm run screenshot; needs Debian's chromium)
#   docs/walkthrough-identify.png the identify figure of the README walk-through (SYNTHETIC micrographs in scenarios/walkthrough/)
# Run from the repository root after `npm install`.
set -euo pipefail
cd "$(dirname "$0")/.."
tmp="$(mktemp -d)"
trap 'rm -rf "$tmp"' EXIT
node dist/cli/main.js demo --out "$tmp/demo" > /dev/null
mkdir -p docs
cp "$tmp/demo/contact-sheet.png" docs/demo-contact-sheet.png
(cd scenarios/walkthrough && node ../../dist/cli/main.js identify scenario.json --micrograph g11m1=g11m1.png --micrograph g2m20=g2m20.png \
  --micrograph g020=g020.png --micrograph g20m2=g20m2.png --out "$tmp/walkthrough" > /dev/null)
cp "$tmp/walkthrough/identify-figure.png" docs/walkthrough-identify.png
if [ -x /usr/bin/chromium ]; then npm run --silent screenshot > /dev/null; fi
echo "wrote docs/demo-contact-sheet.png, docs/walkthrough-identify.png${CHROMIUM_NOTE:-} (and docs/explorer.png when chromium is present)"
