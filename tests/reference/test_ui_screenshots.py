"""Every screen of the touch UI renders under Xvfb and writes a real PNG.

`cairn demo` builds the invented field area; `cairn gui camp.cairn --view V
--screenshot OUT --size WxH` is run on a virtual display (tests/tools/xvfb-do) for each screen, outdoors
and at night. Each PNG is decoded here with Python's zlib by the rules of the
PNG standard (W3C, Portable Network Graphics (PNG) Specification, 2nd
edition: signature, IHDR, IDAT, filter types 0-4 of section 9), independently
of stb_image_write that wrote it, and checked:
  - the image is the size asked for, 8-bit RGBA;
  - it is not blank (many distinct colours);
  - the outdoor theme is light (mean luminance, ITU-R BT.709 weights, above 0.6)
    and the night theme dark (below 0.2).
"""
import os
import shutil
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
XVFB_DO = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools", "xvfb-do")
from refcheck import demo_under_xvfb, parse_args, Tally  # noqa: E402
from png_read import read_png  # noqa: E402

W, H = 1024, 700
VIEWS = ["logbook", "station", "pad", "net", "plan", "crosscheck", "camp", "review"]


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
    tmp = tempfile.mkdtemp(prefix="cairn-shots-")
    try:
        camp = demo_under_xvfb(t, args.cairn, tmp)
        if camp is None:
            return t.finish()
        for night in (False, True):
            for view in VIEWS:
                out = os.path.join(tmp, "%s%s.png" % (view, "-night" if night else ""))
                # A virtual display of this run's own (tests/tools/xvfb-do).
                cmd = [XVFB_DO, "1280x900x24", args.cairn, "gui", camp, "--view", view,
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
