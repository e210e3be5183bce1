#!/usr/bin/env python3
"""The demo HTML report in a real browser (ctest report.html_browser).

Writes `breathbeat demo --format html -o OUT/demo.html`, then has Debian's
headless chromium (fresh profile, no network services) take a screenshot
(OUT/demo.png), print it to PDF (OUT/demo.pdf, A4) and dump the DOM it built.
Checks: the screenshot is not blank; the DOM holds as many plots, figures,
points and whiskers as the page that was written; the PDF is A4 with the page
breaks the print style asks for (pdfinfo, poppler-utils), and its first page
is not blank (pdftoppm). The PNG and PDF stay in OUT to be looked at.

Usage: html_report_browser.py BREATHBEAT OUT_DIR
Exits 77 (ctest SKIP_RETURN_CODE) with a message when chromium, pdfinfo or
pdftoppm is not installed (scripts/bootstrap installs them).
"""
import os
import re
import shutil
import struct
import subprocess
import sys
import tempfile
import zlib

SKIP = 77


def fail(message):
    print("FAIL: " + message)
    sys.exit(1)


def png_pixels(path):
    """(width, height, channels, rows of bytes) of an 8-bit PNG, filters undone."""
    with open(path, "rb") as f:
        data = f.read()
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        fail(path + " is not a PNG")
    pos, idat = 8, b""
    width = height = channels = 0
    while pos < len(data):
        length, kind = struct.unpack(">I4s", data[pos:pos + 8])
        body = data[pos + 8:pos + 8 + length]
        if kind == b"IHDR":
            width, height, depth, colour = struct.unpack(">IIBB", body[:10])
            if depth != 8 or colour not in (0, 2, 6):
                fail("unexpected PNG format (depth %d, colour type %d)" % (depth, colour))
            channels = {0: 1, 2: 3, 6: 4}[colour]
        elif kind == b"IDAT":
            idat += body
        pos += 12 + length
    raw = zlib.decompress(idat)
    stride = width * channels
    rows, prev = [], bytearray(stride)
    for y in range(height):
        start = y * (stride + 1)
        kind, line = raw[start], bytearray(raw[start + 1:start + 1 + stride])
        if kind == 1:
            for i in range(channels, stride):
                line[i] = (line[i] + line[i - channels]) & 255
        elif kind == 2:
            for i in range(stride):
                line[i] = (line[i] + prev[i]) & 255
        elif kind == 3:
            for i in range(stride):
                left = line[i - channels] if i >= channels else 0
                line[i] = (line[i] + ((left + prev[i]) >> 1)) & 255
        elif kind == 4:
            for i in range(stride):
                a = line[i - channels] if i >= channels else 0
                b = prev[i]
                c = prev[i - channels] if i >= channels else 0
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                pred = a if pa <= pb and pa <= pc else (b if pb <= pc else c)
                line[i] = (line[i] + pred) & 255
        rows.append(line)
        prev = line
    return width, height, channels, rows


def dark_fraction(width, height, channels, rows):
    """The share of pixels clearly darker than white (ink)."""
    dark = 0
    for line in rows:
        for x in range(0, width * channels, channels):
            if line[x] < 160:  # red (or grey) channel: text and lines are black
                dark += 1
    return dark / float(width * height)


def pgm_dark_fraction(path):
    with open(path, "rb") as f:
        data = f.read()
    m = re.match(rb"P5\s+(\d+)\s+(\d+)\s+(\d+)\s", data)
    if not m:
        fail(path + " is not a PGM")
    w, h = int(m.group(1)), int(m.group(2))
    pixels = data[m.end():m.end() + w * h]
    return sum(1 for p in pixels if p < 160) / float(w * h)


def count(pattern, text):
    return len(re.findall(pattern, text))


def main():
    if len(sys.argv) != 3:
        print(__doc__)
        return 2
    exe, out = sys.argv[1], sys.argv[2]
    chromium = shutil.which("chromium") or shutil.which("chromium-browser")
    missing = [name for name, found in (("chromium", chromium), ("pdfinfo", shutil.which("pdfinfo")),
                                        ("pdftoppm", shutil.which("pdftoppm"))) if not found]
    if missing:
        print("SKIP: %s not installed (scripts/bootstrap installs chromium and poppler-utils)"
              % ", ".join(missing))
        return SKIP
    os.makedirs(out, exist_ok=True)
    html = os.path.join(out, "demo.html")
    png = os.path.join(out, "demo.png")
    pdf = os.path.join(out, "demo.pdf")
    for f in (png, pdf):
        if os.path.exists(f):
            os.remove(f)
    subprocess.run([exe, "demo", "--format", "html", "-o", html, "--force"], check=True,
                   stdout=subprocess.DEVNULL)
    with open(html, encoding="utf-8") as f:
        page = f.read()
    url = "file://" + os.path.abspath(html)

    with tempfile.TemporaryDirectory(prefix="breathbeat-chromium-") as profile:
        base = [chromium, "--headless", "--no-sandbox", "--disable-gpu", "--no-first-run",
                "--disable-background-networking", "--disable-component-update",
                "--disable-sync", "--user-data-dir=" + profile]

        def run(args):
            r = subprocess.run(base + args + [url], stdout=subprocess.PIPE,
                               stderr=subprocess.PIPE, timeout=120)
            if r.returncode != 0:
                fail("chromium %s exited %d: %s" % (args[0], r.returncode, r.stderr.decode()[-800:]))
            return r.stdout.decode("utf-8", "replace")

        run(["--screenshot=" + png, "--window-size=900,1200", "--hide-scrollbars"])
        run(["--print-to-pdf=" + pdf, "--no-pdf-header-footer"])
        dom = run(["--dump-dom"])

    # The screenshot shows the page (ink on white), not a blank or an error page.
    if not os.path.exists(png):
        fail("no screenshot written")
    w, h, ch, rows = png_pixels(png)
    ink = dark_fraction(w, h, ch, rows)
    print("screenshot %s: %dx%d, %.1f %% ink" % (png, w, h, 100 * ink))
    if not 0.01 < ink < 0.5:
        fail("the screenshot looks blank or wrong (%.2f %% ink)" % (100 * ink))

    # The browser built the page that was written: same plots, figures, points, whiskers.
    for what, pattern in (("svg plots", r"<svg\b"), ("figures", r"<figure\b"),
                          ("points", r'<g class="point '), ("whiskers", r'<g class="whisker"'),
                          ("tables", r"<table\b"), ("cautions", r'id="cautions"')):
        expected, found = count(pattern, page), count(pattern, dom)
        print("%s: %d written, %d in the DOM" % (what, expected, found))
        if expected == 0 or found != expected:
            fail("%s: %d in the page written, %d in the browser's DOM" % (what, expected, found))
    if count(r"<svg\b", dom) < 10:
        fail("fewer than the ten plots of the demo report")

    # The PDF: A4, at least one page per printed section group (summary, plots, details).
    info = subprocess.run(["pdfinfo", pdf], stdout=subprocess.PIPE, check=True).stdout.decode()
    pages = int(re.search(r"^Pages:\s+(\d+)", info, re.M).group(1))
    size = re.search(r"^Page size:\s+([\d.]+) x ([\d.]+) pts", info, re.M)
    print("pdf %s: %d pages, %s x %s pt" % (pdf, pages, size.group(1), size.group(2)))
    if abs(float(size.group(1)) - 595) > 2 or abs(float(size.group(2)) - 842) > 2:
        fail("the PDF is not A4")
    breaks = count(r'<section[^>]*class="page"', page)
    if not breaks + 1 <= pages <= 30:
        fail("%d pages; expected at least %d (the page breaks) and at most 30" % (pages, breaks + 1))
    stem = os.path.join(out, "demo-page")
    subprocess.run(["pdftoppm", "-gray", "-r", "40", "-f", "1", "-l", "1", pdf, stem], check=True)
    first = [f for f in os.listdir(out) if f.startswith("demo-page") and f.endswith(".pgm")]
    if not first:
        fail("pdftoppm wrote no page image")
    page_ink = pgm_dark_fraction(os.path.join(out, sorted(first)[0]))
    print("pdf page 1: %.1f %% ink" % (100 * page_ink))
    if not 0.005 < page_ink < 0.5:
        fail("the first PDF page looks blank (%.2f %% ink)" % (100 * page_ink))
    print("OK")
    return 0


if __name__ == "__main__":
    sys.exit(main())
