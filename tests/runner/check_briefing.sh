#!/usr/bin/env bash
# The briefing pictures of a result: movie frame count and duration (ffprobe), a poster that is
# not blank and whose legend holds text-coloured pixels, cooling curves of the right size.
# Usage: check_briefing.sh EMBERLITH RESULT_FOLDER
set -euo pipefail
emberlith="$1"; result="$2"
"$emberlith" brief "$result" --force --fps 4 --title "Small test sill"
b="$result/briefing"
outputs=$(/usr/bin/python3 -c "import json,sys; print(len(json.load(open(sys.argv[1]))['frames']))" "$result/provenance.json")
frames=$(ffprobe -v error -count_frames -select_streams v:0 -show_entries stream=nb_read_frames -of csv=p=0 "$b/cooling.mp4")
duration=$(ffprobe -v error -show_entries format=duration -of csv=p=0 "$b/cooling.mp4")
echo "movie: $frames frames (outputs: $outputs), $duration s"
[ "$frames" -eq "$outputs" ] || { echo "FAIL frame count"; exit 1; }
/usr/bin/python3 - "$b" "$outputs" "$duration" <<'PY'
import sys, zlib, struct
folder, outputs, duration = sys.argv[1], int(sys.argv[2]), float(sys.argv[3])
assert abs(duration - outputs / 4.0) < 0.3, "movie lasts %g s, expected %g" % (duration, outputs / 4.0)

def png(path):
    """Width, height and RGB rows of an 8-bit RGB/RGBA PNG (the format the viewer writes)."""
    data = open(path, "rb").read()
    pos, chunks, w = 8, b"", None
    while pos < len(data):
        n, kind = struct.unpack(">I4s", data[pos:pos + 8])
        body = data[pos + 8:pos + 8 + n]
        if kind == b"IHDR":
            w, h, depth, colour = struct.unpack(">IIBB", body[:10])
            channels = {2: 3, 6: 4}[colour]
        elif kind == b"IDAT":
            chunks += body
        pos += 12 + n
    raw, rows, stride, prev = zlib.decompress(chunks), [], w * channels, bytearray(w * channels)
    for y in range(h):
        f, line = raw[y * (stride + 1)], bytearray(raw[y * (stride + 1) + 1:(y + 1) * (stride + 1)])
        for i in range(stride):
            a = line[i - channels] if i >= channels else 0
            b, c = prev[i], prev[i - channels] if i >= channels else 0
            if f == 1: line[i] = (line[i] + a) & 255
            elif f == 2: line[i] = (line[i] + b) & 255
            elif f == 3: line[i] = (line[i] + (a + b) // 2) & 255
            elif f == 4:
                p = a + b - c; pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                line[i] = (line[i] + (a if pa <= pb and pa <= pc else b if pb <= pc else c)) & 255
        rows.append([tuple(line[i:i + 3]) for i in range(0, stride, channels)])
        prev = line
    return w, h, rows

w, h, rows = png(folder + "/poster.png")
colours = {p for row in rows[::8] for p in row[::8]}
assert len(colours) > 50, "poster looks blank (%d colours)" % len(colours)
legend = [p for row in rows[int(0.15 * h):int(0.9 * h)] for p in row[int(0.8 * w):]]
dark = sum(1 for p in legend if max(p) < 80)  # the legend's labels are near-black text
assert dark > 200, "no text-coloured pixels in the legend region (%d)" % dark
cw, ch, _ = png(folder + "/cooling_curves.png")
assert (cw, ch) == (1200, 900), "cooling curves are %dx%d, expected 1200x900" % (cw, ch)
print("ok   poster %dx%d (%d colours, %d legend text pixels), curves %dx%d" % (w, h, len(colours), dark, cw, ch))
PY
