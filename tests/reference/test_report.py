#!/usr/bin/python3
"""Checks of `cairn report` against outside tools.

A small invented project is written by tests/tools/report_fixture (through the storage
API); its counts below follow from how that fixture is built, not from Cairn's output.
The report is then checked with:
  - Python's xml.etree.ElementTree: every inline SVG parses as XML (W3C XML 1.0) and
    gives back names that carry XML's special characters and non-ASCII letters;
  - Python's html.parser (HTML5 character references) for the page's own text;
  - headless Chromium (Debian `chromium`): the page renders, and its screenshot
    (a PNG, decoded here with zlib by the PNG specification, W3C/ISO 15948) is not blank;
  - the report must be self-contained: no script, nothing fetched (no src/href/url()).
"""
import argparse
import hashlib
import html.parser
import os
import re
import shutil
import subprocess
import sys
import tempfile
import xml.etree.ElementTree as ET

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from png_read import decode_png  # noqa: E402  (the PNG standard, decoded with zlib)

FAILS = []
SVG_NS = "{http://www.w3.org/2000/svg}"


def check(ok, what):
    if not ok:
        FAILS.append(what)
        print("FAIL:", what)
    return ok


def run(cmd, **kw):
    return subprocess.run(cmd, capture_output=True, text=True, **kw)


# ---------------------------------------------------------------- HTML helpers

class TextOf(html.parser.HTMLParser):
    """Collects the text of <h1> and the cells of every table row."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.h1, self.rows = "", []
        self._in_h1 = False
        self._cell = None
        self._depth_svg = 0

    def handle_starttag(self, tag, attrs):
        if tag == "svg":
            self._depth_svg += 1
        if tag == "h1":
            self._in_h1 = True
        elif tag == "tr":
            self.rows.append([])
        elif tag in ("td", "th"):
            self._cell = ""

    def handle_endtag(self, tag):
        if tag == "svg":
            self._depth_svg -= 1
        if tag == "h1":
            self._in_h1 = False
        elif tag in ("td", "th") and self._cell is not None:
            self.rows[-1].append(" ".join(self._cell.split()))
            self._cell = None

    def handle_data(self, data):
        if self._depth_svg:
            return
        if self._in_h1:
            self.h1 += data
        if self._cell is not None:
            self._cell += data


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--cairn", required=True)
    ap.add_argument("--tools", required=True)
    ap.add_argument("--source")
    ap.add_argument("--build")
    a = ap.parse_args()

    tmp = tempfile.mkdtemp(prefix="cairn-report-")
    try:
        project = os.path.join(tmp, "ridge.cairn")
        r = run([os.path.join(a.tools, "report_fixture"), project])
        if not check(r.returncode == 0, "fixture: " + r.stderr):
            return 1
        out = os.path.join(tmp, "report.html")
        r = run([a.cairn, "report", project, "-o", out])
        if not check(r.returncode == 0, "cairn report failed: " + r.stderr):
            return 1
        with open(out, encoding="utf-8") as f:
            page = f.read()

        # Self-contained: no script, nothing to fetch.
        check(page.startswith("<!DOCTYPE html>"), "doctype")
        check("<script" not in page.lower(), "no script")
        check(re.search(r"\b(src|href)\s*=", page) is None, "no src= or href=")
        check("url(" not in page, "no url() in CSS")
        check("<link" not in page.lower(), "no <link>")
        others = set(re.findall(r"https?://[^\s\"'<>]+", page)) - {"http://www.w3.org/2000/svg"}
        check(not others, "no network addresses: %s" % sorted(others))
        check("@page" in page and "size: auto" in page, "print rules for A4 and Letter")

        # Every inline SVG parses as XML.
        svgs = re.findall(r"<svg\b.*?</svg>", page, flags=re.S)
        parsed = []
        for i, s in enumerate(svgs):
            try:
                parsed.append(ET.fromstring(s))
            except ET.ParseError as e:
                check(False, "SVG %d does not parse: %s" % (i, e))
        classes = [p.get("class") or "" for p in parsed]
        check(classes.count("plan") == 1, "one plan, found %d" % classes.count("plan"))
        nets = [p for p in parsed if p.get("class") == "net"]
        # Two units with readings and one contact (fixture design).
        check(len(nets) == 3, "three nets, found %d" % len(nets))
        titles = [(p.find(SVG_NS + "title").text if p.find(SVG_NS + "title") is not None else "") for p in nets]
        check("Stereonet: Unit Kb<&> – \"upper\" marl & 'shale' – ä" in titles,
              "unit name survives escaping: %r" % titles)
        check("Stereonet: Contact Ka/Kb <base>" in titles, "contact name survives escaping: %r" % titles)
        for n in nets:  # the net's own text: the N label at least
            texts = [t.text for t in n.iter(SVG_NS + "text")]
            check("N" in texts, "net has its north label")

        # The page's text.
        tp = TextOf()
        tp.feed(page)
        check(tp.h1 == "Test ridge <&> \"α\" 'q'", "title escaped and recovered: %r" % tp.h1)
        rows = tp.rows
        # Summary rows (fixture: AQ 12 stations, 12 bedding + 3 foliation, 4 lineations,
        # 8 contact points on day 1; BR 8 stations, 8 bedding + 1 foliation + a slope face
        # + the bedding beside it, 3 lineations on day 2).
        check(any(r[:6] == ["2026-07-06", "AQ (Ana Quill)", "12", "15", "4", "8"] for r in rows),
              "summary row for day 1")
        check(any(r[:6] == ["2026-07-07", "BR (Bo Reed)", "8", "11", "3", "0"] for r in rows),
              "summary row for day 2")
        # Flags: the hazard (bedding daylighting in the slope face at BR-16) comes first,
        # with its severity as a word and its caution.
        flag_rows = [r for r in rows if len(r) == 5 and r[0] in ("note", "query", "conflict", "hazard")]
        check(flag_rows and flag_rows[0][0] == "hazard" and flag_rows[0][1] == "daylighting",
              "hazard first: %r" % flag_rows[:1])
        check(flag_rows and "Caution:" in flag_rows[0][4], "the hazard carries its caution")
        check("BR-16" in (flag_rows[0][2] if flag_rows else ""), "hazard at BR-16")
        # Contact fit: the points lie on a plane 030/30 (fixture design); the fit table
        # states it to within a degree (UTM grid convergence here is well under 1 degree
        # and the fit is turned back to true north).
        fit_rows = [r for r in rows if r and r[0] == "Ka/Kb <base>"]
        check(len(fit_rows) == 1, "one fit row")
        if fit_rows:
            m = re.match(r"(\d+(?:\.\d+)?)/(\d+(?:\.\d+)?)", fit_rows[0][3])
            check(m and abs(float(m.group(1)) - 30) < 1 and abs(float(m.group(2)) - 30) < 1,
                  "fitted 030/30: %r" % fit_rows[0][3])
        check("WMM2025" in page and "2026-07-06" in page and "2026-07-07" in page, "declination over the dates")
        check("project setting" in page, "the magnetic reading's declination source")

        # Equal-angle nets on request.
        out2 = os.path.join(tmp, "wulff.html")
        r = run([a.cairn, "report", project, "-o", out2, "--net", "equal-angle"])
        check(r.returncode == 0 and "Equal-angle net (Wulff)" in open(out2, encoding="utf-8").read(),
              "--net equal-angle")

        # Bad input: a clear error, nothing written.
        digest = hashlib.sha256(open(project, "rb").read()).hexdigest()
        r = run([a.cairn, "report", project, "-o", project])
        check(r.returncode == 2 and "overwrite the project" in r.stderr, "refuses to overwrite the project")
        check(hashlib.sha256(open(project, "rb").read()).hexdigest() == digest, "project untouched")
        missing_out = os.path.join(tmp, "never.html")
        r = run([a.cairn, "report", os.path.join(tmp, "missing.cairn"), "-o", missing_out])
        check(r.returncode != 0 and "missing.cairn" in r.stderr, "missing project named: %r" % r.stderr)
        check(not os.path.exists(missing_out), "nothing written for a missing project")
        r = run([a.cairn, "report", project])
        check(r.returncode == 2 and "-o" in r.stderr, "-o required")
        r = run([a.cairn, "report", project, "-o", os.path.join(tmp, "no", "such", "dir", "r.html")])
        check(r.returncode == 1 and "no folder" in r.stderr, "unwritable place named: %r" % r.stderr)
        r = run([a.cairn, "report", project, "-o", out2, "--net", "polar"])
        check(r.returncode == 2 and "--net" in r.stderr, "bad --net named")

        # Headless Chromium renders the page and the screenshot is not blank.
        chromium = shutil.which("chromium") or ("/usr/bin/chromium" if os.path.exists("/usr/bin/chromium") else None)
        if chromium is None:
            print("SKIP: chromium is not installed (scripts/install-deps.sh --test installs it); "
                  "the rendering check did not run")
        else:
            shot = os.path.join(tmp, "shot.png")
            profile = tempfile.mkdtemp(prefix="cairn-chromium-", dir=tmp)
            r = run([chromium, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                     "--disable-background-networking", "--disable-component-update", "--disable-sync",
                     "--user-data-dir=" + profile, "--screenshot=" + shot, "--window-size=1200,1600",
                     "file://" + out], timeout=300)
            if check(os.path.exists(shot), "chromium wrote no screenshot: %s" % r.stderr[-2000:]):
                w, h, ch, px = decode_png(open(shot, "rb").read())
                check((w, h) == (1200, 1600), "screenshot size %dx%d" % (w, h))
                total = w * h
                ink = coloured = 0
                for i in range(0, len(px), ch):
                    r_, g_, b_ = px[i], px[i + 1], px[i + 2]
                    if min(r_, g_, b_) < 200:
                        ink += 1
                    if max(r_, g_, b_) - min(r_, g_, b_) > 100:
                        coloured += 1
                print("screenshot: %.2f%% ink, %d coloured pixels" % (100.0 * ink / total, coloured))
                check(ink > 0.01 * total, "screenshot is blank (%.3f%% ink)" % (100.0 * ink / total))
                # The severity shapes are drawn in colour in the summary and the flags table.
                check(coloured > 50, "no coloured SVG marks rendered (%d pixels)" % coloured)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print("%d failure(s)" % len(FAILS))
    return 1 if FAILS else 0


if __name__ == "__main__":
    sys.exit(main())
