#!/usr/bin/env bash
# Real-browser check of report.html: the map test writes a report, headless
# Chromium (Debian's package) loads it and takes a screenshot, and the
# screenshot must not be blank (enough non-white pixels and grey-level
# variance).  The PNG is decoded with Python's standard zlib, no extra
# packages.
set -euo pipefail
BUILD="${GW_BUILD_DIR:?GW_BUILD_DIR not set}"
BROWSER="$(command -v chromium || command -v chromium-browser || true)"
if [ -z "$BROWSER" ]; then
  echo "chromium is not installed (tools/setup-deps.sh installs it)" >&2
  exit 1
fi
WORK="$(mktemp -d)"
PROFILE="$(mktemp -d)"
trap 'rm -rf "$WORK" "$PROFILE"' EXIT
GW_REPORT_OUT="$WORK/out" "$BUILD/tests/test_map_report" >"$WORK/test.log" 2>&1 || { cat "$WORK/test.log" >&2; exit 1; }
test -s "$WORK/out/report.html"
timeout 120 "$BROWSER" --headless --no-sandbox --disable-gpu --disable-quic --no-first-run \
  --disable-background-networking --disable-component-update --disable-sync \
  --user-data-dir="$PROFILE" --window-size=1366,2400 --hide-scrollbars \
  --screenshot="$WORK/shot.png" "file://$WORK/out/report.html" >/dev/null 2>&1 || true
test -s "$WORK/shot.png" || { echo "no screenshot was written" >&2; exit 1; }
if [ -n "${GW_KEEP_SHOT:-}" ]; then cp "$WORK/shot.png" "$GW_KEEP_SHOT"; fi
python3 - "$WORK/shot.png" <<'PY'
import struct, sys, zlib

def decode(path):
    data = open(path, 'rb').read()
    assert data[:8] == b'\x89PNG\r\n\x1a\n', 'not a PNG'
    pos, idat, w = 8, b'', None
    while pos < len(data):
        n, kind = struct.unpack('>I4s', data[pos:pos + 8])
        body = data[pos + 8:pos + 8 + n]
        if kind == b'IHDR':
            w, h, depth, ctype, _, _, interlace = struct.unpack('>IIBBBBB', body)
            assert depth == 8 and interlace == 0 and ctype in (2, 6), 'unexpected PNG form'
            bpp = 3 if ctype == 2 else 4
        elif kind == b'IDAT':
            idat += body
        pos += 12 + n
    raw = zlib.decompress(idat)
    stride = w * bpp
    prev = bytearray(stride)
    rows = []
    i = 0
    for _ in range(h):
        f = raw[i]; line = bytearray(raw[i + 1:i + 1 + stride]); i += 1 + stride
        for x in range(stride):            # PNG filters (PNG spec, section 9)
            a = line[x - bpp] if x >= bpp else 0
            b = prev[x]
            c = prev[x - bpp] if x >= bpp else 0
            if f == 1: line[x] = (line[x] + a) & 255
            elif f == 2: line[x] = (line[x] + b) & 255
            elif f == 3: line[x] = (line[x] + (a + b) // 2) & 255
            elif f == 4:
                p = a + b - c; pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                pr = a if pa <= pb and pa <= pc else (b if pb <= pc else c)
                line[x] = (line[x] + pr) & 255
        rows.append(line); prev = line
    return w, h, bpp, rows

w, h, bpp, rows = decode(sys.argv[1])
n = s = s2 = nonwhite = colourful = 0
for line in rows[::2]:
    for x in range(0, w * bpp, bpp * 2):
        r, g, b = line[x], line[x + 1], line[x + 2]
        v = (r + g + b) / 3
        n += 1; s += v; s2 += v * v
        if v < 235: nonwhite += 1
        if max(r, g, b) - min(r, g, b) > 40: colourful += 1
var = s2 / n - (s / n) ** 2
print(f"screenshot {w}x{h}: grey variance {var:.0f}, non-white {100 * nonwhite / n:.1f} %, "
      f"coloured {100 * colourful / n:.1f} %")
assert var > 200, 'screenshot looks blank (variance)'
assert nonwhite / n > 0.03, 'screenshot looks blank (almost all white)'
assert colourful / n > 0.01, 'no map colours visible in the screenshot'
print("1 passed, 0 failed")
PY
