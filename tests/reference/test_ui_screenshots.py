"""Every screen of the touch UI renders under Xvfb and writes a real PNG.

`cairn demo` builds the invented field area; `cairn gui camp.cairn --view V
--screenshot OUT --size WxH` is run under xvfb-run for each screen, outdoors
and at night. Each PNG is decoded here with Python's zlib by the rules of the
PNG specification (W3C, Portable Network Graphics (PNG) Specification, 2nd
edition: signature, IHDR, IDAT, filter types 0-4 of section 9), independently
of stb_image_write that wrote it, and checked:
  - the image is the size asked for, 8-bit RGBA;
  - it is not blank (many distinct colours);
  - the outdoor theme is light (mean luminance, ITU-R BT.709 weights, above 0.6)
    and the night theme dark (below 0.2).
"""
import os
import shutil
import struct
import subprocess
import sys
import tempfile
import zlib

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from refcheck import parse_args, Tally  # noqa: E402

W, H = 1024, 700
VIEWS = ["logbook", "station", "pad", "net", "plan", "crosscheck", "camp", "review"]


def read_png(path):
    """(width, height, rows of RGBA bytes) of an 8-bit RGBA, non-interlaced PNG."""
    data = open(path, "rb").read()
    assert data[:8] == b"\x89PNG\r\n\x1a\n", "not a PNG signature"
    pos, idat, ihdr = 8, b"", None
    while pos < len(data):
        (length,) = struct.unpack(">I", data[pos:pos + 4])
        kind = data[pos + 4:pos + 8]
        body = data[pos + 8:pos + 8 + length]
        crc = struct.unpack(">I", data[pos + 8 + length:pos + 12 + length])[0]
        assert zlib.crc32(kind + body) & 0xFFFFFFFF == crc, "bad CRC in %r" % kind
        if kind == b"IHDR":
            ihdr = struct.unpack(">IIBBBBB", body)
        elif kind == b"IDAT":
            idat += body
        pos += 12 + length
    w, h, depth, colour, _, _, interlace = ihdr
    assert depth == 8 and colour == 6 and interlace == 0, "expected 8-bit RGBA, not interlaced: %r" % (ihdr,)
    raw = zlib.decompress(idat)
    bpp, stride = 4, w * 4
    rows, prev = [], bytearray(stride)
    i = 0
    for _ in range(h):
        f = raw[i]
        line = bytearray(raw[i + 1:i + 1 + stride])
        i += 1 + stride
        for x in range(stride):
            a = line[x - bpp] if x >= bpp else 0
            b = prev[x]
            c = prev[x - bpp] if x >= bpp else 0
            if f == 1:
                line[x] = (line[x] + a) & 0xFF
            elif f == 2:
                line[x] = (line[x] + b) & 0xFF
            elif f == 3:
                line[x] = (line[x] + (a + b) // 2) & 0xFF
            elif f == 4:
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                pred = a if pa <= pb and pa <= pc else (b if pb <= pc else c)
                line[x] = (line[x] + pred) & 0xFF
        rows.append(bytes(line))
        prev = line
    return w, h, rows


def stats(rows):
    """Mean luminance (BT.709) and the number of distinct colours, on every 4th pixel."""
    total, n, colours = 0.0, 0, set()
    for y in range(0, len(rows), 4):
        r = rows[y]
        for x in range(0, len(r), 16):
            red, green, blue = r[x], r[x + 1], r[x + 2]
            total += (0.2126 * red + 0.7152 * green + 0.0722 * blue) / 255.0
            n += 1
            colours.add((red, green, blue))
    return total / n, len(colours)


def main():
    args = parse_args(required=("cairn",))
    t = Tally("test_ui_screenshots")
    if not t.check(shutil.which("xvfb-run") is not None, "xvfb-run is installed (scripts/install-deps.sh --test)"):
        return t.finish()
    tmp = tempfile.mkdtemp(prefix="cairn-shots-")
    try:
        demo = os.path.join(tmp, "demo")
        r = subprocess.run([args.cairn, "demo", demo], capture_output=True, text=True)
        if not t.check(r.returncode == 0, "cairn demo builds the demo area: " + r.stderr):
            return t.finish()
        camp = os.path.join(demo, "camp.cairn")
        for night in (False, True):
            for view in VIEWS:
                out = os.path.join(tmp, "%s%s.png" % (view, "-night" if night else ""))
                cmd = ["xvfb-run", "-a", "-s", "-screen 0 1280x900x24", args.cairn, "gui", camp, "--view", view,
                       "--screenshot", out, "--size", "%dx%d" % (W, H), "--station", "BK-05"]
                if night:
                    cmd.append("--night")
                r = subprocess.run(cmd, capture_output=True, text=True, timeout=300)
                what = "%s%s" % (view, " (night)" if night else "")
                if not t.check(r.returncode == 0 and os.path.exists(out), what + ": cairn gui wrote a PNG: " + r.stderr):
                    continue
                w, h, rows = read_png(out)
                t.check((w, h) == (W, H), "%s: %dx%d, asked %dx%d" % (what, w, h, W, H))
                lum, colours = stats(rows)
                t.check(colours >= 8, "%s: not blank (%d colours)" % (what, colours))
                if night:
                    t.check(lum < 0.2, "%s: night theme is dark (mean luminance %.2f)" % (what, lum))
                else:
                    t.check(lum > 0.6, "%s: outdoor theme is light (mean luminance %.2f)" % (what, lum))
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return t.finish()


if __name__ == "__main__":
    sys.exit(main())
