"""The Net and the Plan drawn into pixels on the CPU (app/ui/soft_raster.h, on
a worker thread, as the UI always draws them) match Mesa's OpenGL rendering
of the same geometry (through an offscreen framebuffer, in the frame, with
CAIRN_BUILD_IN_FRAME=1).

Reference: Mesa's llvmpipe, an OpenGL implementation the project did not
write, rendering the same Dear ImGui draw list under Xvfb. Both screenshots of
the bundled demo are taken with `cairn gui --view V --screenshot`, once as
usual and once with CAIRN_BUILD_IN_FRAME=1, outdoors and at night, and decoded with
png_read.py (the PNG standard, independently of the writer). Rasterisers may
differ where an edge crosses a pixel (OpenGL 3.2, section 3.6, allows an
implementation its own sample positions within the rules), so the check is:
  - fewer than 0.5% of the pixels differ by more than 48 in any channel;
  - the mean absolute difference is under 1.0 (of 255).
The thresholds are common practice for comparing anti-aliased renderings, no
published source. numpy is Debian's.
"""
import os
import shutil
import subprocess
import sys
import tempfile

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
XVFB_DO = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools", "xvfb-do")
from refcheck import demo_under_xvfb, parse_args, Tally  # noqa: E402
from png_read import read_png  # noqa: E402

W, H = 1024, 700


def shot(cairn, camp, view, out, night, in_frame):
    # No GPS: its state (searching, a fix from whatever listens on the port)
    # depends on the moment and is not what is compared.
    cmd = [XVFB_DO, "1280x900x24", cairn, "gui", camp, "--view", view, "--screenshot", out,
           "--size", "%dx%d" % (W, H), "--no-gps"]
    if night:
        cmd.append("--night")
    env = dict(os.environ)
    env.pop("CAIRN_BUILD_IN_FRAME", None)
    if in_frame:
        env["CAIRN_BUILD_IN_FRAME"] = "1"
    return subprocess.run(cmd, capture_output=True, text=True, timeout=300, env=env)


def pixels(path):
    w, h, rows = read_png(path)
    return np.frombuffer(b"".join(rows), dtype=np.uint8).reshape(h, w, 4)[:, :, :3].astype(int)


def main():
    args = parse_args(required=("cairn",))
    t = Tally("test_soft_raster")
    tmp = tempfile.mkdtemp(prefix="cairn-raster-")
    try:
        camp = demo_under_xvfb(t, args.cairn, tmp)
        if camp is None:
            return t.finish()
        for night in (False, True):
            for view in ("net", "plan"):
                what = view + (" (night)" if night else "")
                gl, cpu = os.path.join(tmp, "gl.png"), os.path.join(tmp, "cpu.png")
                a, b = shot(args.cairn, camp, view, gl, night, True), shot(args.cairn, camp, view, cpu, night, False)
                if not t.check(a.returncode == 0 and b.returncode == 0, what + ": both screenshots written: " +
                               a.stderr + b.stderr):
                    continue
                pa, pb = pixels(gl), pixels(cpu)
                if not t.check(pa.shape == pb.shape, "%s: same size %s %s" % (what, pa.shape, pb.shape)):
                    continue
                d = np.abs(pa - pb).max(axis=2)
                share = float((d > 48).mean())
                mean = float(np.abs(pa - pb).mean())
                # The screenshots must hold a picture at all (not two blank screens that agree).
                t.check(len(np.unique(pb.reshape(-1, 3), axis=0)) > 50, what + ": the picture drawn in pixels is not blank")
                ys, xs = np.nonzero(d > 48)
                where = "" if len(xs) == 0 else " (within x %d-%d, y %d-%d)" % (xs.min(), xs.max(), ys.min(), ys.max())
                t.check(share < 0.005, "%s: %.3f%% of pixels differ by more than 48%s" % (what, 100 * share, where))
                t.check(mean < 1.0, "%s: mean absolute difference %.3f" % (what, mean))
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return t.finish()


if __name__ == "__main__":
    sys.exit(main())
