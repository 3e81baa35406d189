#!/bin/sh
# Smoke test of the PyInstaller bundle: it starts without a screen, opens the demo plan,
# computes, renders the window to a PNG and exits 0; the PNG must be a real picture of at
# least 1280 x 800 pixels and more than 10 kB.
#
#     packaging/smoke_test.sh [BUNDLE_PROGRAM]     (default dist/epochpoint/epochpoint)
set -eu
cd "$(dirname "$0")/.."
program="${1:-dist/epochpoint/epochpoint}"
if [ ! -x "$program" ]; then
    echo "smoke_test: $program not found; run 'make package' first" >&2
    exit 1
fi
scratch="$(mktemp -d)"
trap 'rm -rf "$scratch"' EXIT
png="$scratch/window.png"

QT_QPA_PLATFORM=offscreen HOME="$scratch" \
    "$program" gui sample_targets/loma_candil_plan.json --screenshot "$png"

if [ ! -s "$png" ]; then
    echo "smoke_test: no PNG written" >&2
    exit 1
fi
size=$(wc -c < "$png")
# PNG: an 8-byte signature, then the IHDR chunk with width and height as big-endian 32-bit
# numbers at bytes 16-23 (PNG specification, ISO/IEC 15948, sections 5.2 and 11.2.2).
signature=$(od -An -tx1 -N8 "$png" | tr -d ' \n')
width=$(od -An -tu1 -j16 -N4 "$png" | awk '{print $1*16777216 + $2*65536 + $3*256 + $4}')
height=$(od -An -tu1 -j20 -N4 "$png" | awk '{print $1*16777216 + $2*65536 + $3*256 + $4}')
if [ "$signature" != "89504e470d0a1a0a" ]; then
    echo "smoke_test: $png is not a PNG" >&2
    exit 1
fi
if [ "$size" -le 10240 ] || [ "$width" -lt 1280 ] || [ "$height" -lt 800 ]; then
    echo "smoke_test: PNG too small: ${width}x${height}, $size bytes" >&2
    exit 1
fi
echo "smoke_test: ok (${width}x${height} PNG, $size bytes)"
