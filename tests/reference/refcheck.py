"""Shared plumbing for the reference checks in tests/reference/test_*.py:
the common arguments and a pass/fail tally. Imported, never run by ctest
(ctest runs test_*.py only).

    from refcheck import parse_args, Tally
    args = parse_args(required=("cairn",))
    t = Tally("test_name")
    t.check(ok, "what was checked")
    sys.exit(t.finish())
"""
import argparse
import os
import shutil
import subprocess


def parse_args(required=("cairn",)):
    """--cairn PATH --tools DIR --source DIR --build DIR; unknown arguments are ignored."""
    parser = argparse.ArgumentParser()
    for name in ("cairn", "tools", "source", "build"):
        parser.add_argument("--" + name, required=name in required)
    args, _ = parser.parse_known_args()
    return args


class Tally:
    def __init__(self, name):
        self.name = name
        self.passed = 0
        self.failed = 0

    def check(self, ok, what):
        if ok:
            self.passed += 1
        else:
            self.failed += 1
            print("FAIL:", what)
        return ok

    def finish(self):
        """Prints the closing 'N passed, N failed' line; returns the exit code."""
        print("%s: %d passed, %d failed" % (self.name, self.passed, self.failed))
        return 1 if self.failed else 0


def demo_under_xvfb(t, cairn, tmp):
    """The demo's camp.cairn, built by `cairn demo` in TMP, for checks that run
    the UI on a virtual display; None (with the failure tallied) when Xvfb is
    missing or the demo cannot be built."""
    if not t.check(shutil.which("Xvfb") is not None, "Xvfb is installed (scripts/install-deps.sh --test)"):
        return None
    demo = os.path.join(tmp, "demo")
    r = subprocess.run([cairn, "demo", demo], capture_output=True, text=True)
    if not t.check(r.returncode == 0, "cairn demo builds the demo area: " + r.stderr):
        return None
    return os.path.join(demo, "camp.cairn")
