#!/usr/bin/env python3
"""End-to-end: the report of a bundled scenario rendered in headless Chromium.

Runs `coilwright design` on configs/gradient-pair.toml with a small search budget and a project
name holding markup, then checks (common practice for browser smoke tests, no source):
  1. the page loads without console messages (the report has no scripts, so any message is an
     error) — and, as a control, that a deliberately failing page is caught the same way;
  2. every figure written to figures/ is inline in the page as an <svg>, and no file or network
     resource is referenced;
  3. the project name containing <script> is shown as text: the DOM holds no <script> element
     and the heading reads the name literally;
  4. every inline figure, laid out alone in a fixed cell of a screenshot, is not blank (the
     pixel variance of its cell is far above that of an empty cell), and the report page's own
     screenshot is not blank.
Usage: report_in_browser.py <coilwright binary> <source dir> <work dir>
"""
import html
import os
import re
import shutil
import subprocess
import sys
import tempfile

from PIL import Image, ImageStat

CHROMIUM = "/usr/bin/chromium"
NAME = 'gradient <script>alert("x")</script> & co'


def chromium(url, *extra):
    profile = tempfile.mkdtemp(prefix="coilwright-chromium-")
    try:
        r = subprocess.run(
            [CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
             "--disable-background-networking", "--disable-component-update", "--disable-sync",
             "--enable-logging=stderr", "--v=0", f"--user-data-dir={profile}", *extra, url],
            capture_output=True, text=True, timeout=120)
    finally:
        shutil.rmtree(profile, ignore_errors=True)
    return r


def console_messages(stderr):
    return [line for line in stderr.splitlines() if "CONSOLE" in line or "Uncaught" in line]


def main():
    binary, source, work = sys.argv[1:4]
    shutil.rmtree(work, ignore_errors=True)
    os.makedirs(work)
    failures = []

    # The scenario with a hostile name and a quick search.
    text = open(os.path.join(source, "configs", "gradient-pair.toml")).read()
    toml_name = NAME.replace("\\", "\\\\").replace('"', '\\"')
    text = re.sub(r'(?m)^name = "gradient-pair"', f'name = "{toml_name}"', text)
    text = re.sub(r"(?m)^starts = .*", "starts = 2", text)
    text = re.sub(r"(?m)^max_evaluations = .*", "max_evaluations = 400", text)
    text = re.sub(r'(?m)^max_time = .*', 'max_time = "10 s"', text)
    config = os.path.join(work, "scenario.toml")
    open(config, "w").write(text)
    out = os.path.join(work, "results")
    r = subprocess.run([binary, "-q", "design", config, "--out", out], capture_output=True, text=True)
    if r.returncode != 0:
        sys.exit(f"coilwright design failed ({r.returncode}):\n{r.stderr}")
    report = os.path.join(out, "report.html")
    figures = sorted(f for f in os.listdir(os.path.join(out, "figures")) if f.endswith(".svg"))
    page = open(report, encoding="utf-8").read()

    # 2. Figures inline; nothing fetched.
    n_svg = len(re.findall(r"<svg\b", page))
    if not figures or n_svg != len(figures):
        failures.append(f"{len(figures)} figure files but {n_svg} inline <svg> elements")
    if re.search(r'(?i)\b(?:src|href)\s*=\s*"(?!#|data:)', page) or re.search(r"(?i)<(?:link|script)\b", page):
        failures.append("the report references an external resource or holds a script")

    # 1. Console: a control page that throws must be caught, the report must be silent.
    bad = os.path.join(work, "control.html")
    open(bad, "w").write("<!DOCTYPE html><html><body><script>undefinedFunction();</script></body></html>")
    if not console_messages(chromium("file://" + bad, "--dump-dom").stderr):
        failures.append("control: a page that throws produced no console message; the check is blind")
    r = chromium("file://" + report, "--dump-dom")
    if r.returncode != 0:
        failures.append(f"chromium failed on the report ({r.returncode})")
    msgs = console_messages(r.stderr)
    if msgs:
        failures.append("console messages: " + " | ".join(msgs[:5]))
    dom = r.stdout

    # 3. The name is text, not markup.
    if re.search(r"(?i)<script\b", dom):
        failures.append("the DOM holds a <script> element")
    m = re.search(r'<h1 id="project">(.*?)</h1>', dom, re.S)
    if not m or html.unescape(m.group(1)) != NAME:
        failures.append(f"the heading does not show the name as text: {m.group(1) if m else None!r}")
    if len(re.findall(r"<svg\b", dom)) != len(figures):
        failures.append("the rendered DOM lost figures")

    # 4. Pixels: each inline figure alone in a 480 x 360 cell of one page.
    svgs = re.findall(r"<svg\b.*?</svg>", dom, re.S)
    cols, cw, ch = 4, 480, 360
    rows = (len(svgs) + cols - 1) // cols + 1  # one empty row as the blank reference
    sized = '<svg style="width:100%;height:100%"'
    cells = "".join(f'<div style="position:absolute;left:{(i % cols) * cw}px;top:{(i // cols) * ch}px;'
                    f'width:{cw}px;height:{ch}px">' + s.replace("<svg", sized, 1) + "</div>"
                    for i, s in enumerate(svgs))
    sheet = os.path.join(work, "figures.html")
    open(sheet, "w", encoding="utf-8").write(
        f'<!DOCTYPE html><html><head><meta charset="utf-8"><style>body{{margin:0;background:#fff}}</style></head>'
        f"<body>{cells}</body></html>")
    shot = os.path.join(work, "figures.png")
    chromium("file://" + sheet, f"--screenshot={shot}", f"--window-size={cols * cw},{rows * ch}",
             "--hide-scrollbars", "--force-device-scale-factor=1")
    img = Image.open(shot).convert("L")
    blank = ImageStat.Stat(img.crop((0, (rows - 1) * ch, cw, rows * ch))).var[0]
    for i, name in enumerate(svgs):
        box = ((i % cols) * cw, (i // cols) * ch, (i % cols + 1) * cw, (i // cols + 1) * ch)
        stat = ImageStat.Stat(img.crop(box))
        dark = sum(img.crop(box).histogram()[:200]) / (cw * ch)
        if stat.var[0] < 100.0 + 10 * blank or dark < 0.01:
            failures.append(f"figure {i + 1} looks blank: variance {stat.var[0]:.1f}, dark fraction {dark:.4f}")
    page_shot = os.path.join(work, "report.png")
    chromium("file://" + report, f"--screenshot={page_shot}", "--window-size=1200,2400", "--hide-scrollbars")
    if ImageStat.Stat(Image.open(page_shot).convert("L")).var[0] < 100.0:
        failures.append("the report's screenshot is blank")

    if failures:
        print("\n".join(failures))
        sys.exit(1)
    print(f"report rendered: {len(figures)} figures inline and drawn; no console messages; the name shows as text")


if __name__ == "__main__":
    main()
