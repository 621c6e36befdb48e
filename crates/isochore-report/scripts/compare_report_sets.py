#!/usr/bin/env python3
"""Compares two report folders written by `vhfit fit FILE --report DIR` (say, by the build
before a change and the build after it) and says whether the reports show the same things.

- HTML, Markdown and the two CSV tables: the same lines, except the recorded run (the
  "analysed" time and the command line, which name the run and its folder).
- SVG figures: the same bytes.
- PNG figures: the same size and the same decoded pixels (RGBA, Pillow), whatever the
  colour type or compression of the file; the same resolution tag.
- PDF: the same text (pdftotext, without the run's lines) and page count (pdfinfo); every
  image the PDF embeds (pdfimages) is one of the folder's PNG figures, pixel for pixel, or
  else is reported with its size (a figure embedded at another resolution).

Needs Pillow and numpy (`pip install pillow numpy`) and poppler's pdftotext, pdfinfo and
pdfimages. Usage: compare_report_sets.py BEFORE_DIR AFTER_DIR. Exit status 1 on a difference.
"""

import glob
import os
import re
import subprocess
import sys
import tempfile

import numpy as np
from PIL import Image

RUN_LINES = ("analysed", "Analysed", "command line", "vhfit fit ")
RUN_TIME = re.compile(r"^\d{4}-\d\d-\d\d \d\d:\d\d UTC$")  # the time alone (pdftotext)


def run_free(lines):
    return [l for l in lines if not any(k in l for k in RUN_LINES) and not RUN_TIME.match(l)]


def text_lines(path):
    with open(path, encoding="utf-8") as f:
        return f.read().splitlines()


def rgba(path):
    return np.asarray(Image.open(path).convert("RGBA"))


def pdf_text(path):
    out = subprocess.run(["pdftotext", path, "-"], check=True, capture_output=True, text=True)
    return out.stdout.splitlines()


def pdf_pages(path):
    out = subprocess.run(["pdfinfo", path], check=True, capture_output=True, text=True)
    return next(l.split()[1] for l in out.stdout.splitlines() if l.startswith("Pages:"))


def main(before, after):
    bad = 0
    names = sorted(os.path.basename(p) for p in glob.glob(os.path.join(before, "*")))
    if names != sorted(os.path.basename(p) for p in glob.glob(os.path.join(after, "*"))):
        print("the folders hold different files")
        bad += 1
    for name in names:
        a, b = os.path.join(before, name), os.path.join(after, name)
        if not os.path.exists(b):
            continue
        ext = name.rsplit(".", 1)[-1]
        if ext in ("html", "md", "csv"):
            same = run_free(text_lines(a)) == run_free(text_lines(b))
        elif ext == "svg":
            same = open(a, "rb").read() == open(b, "rb").read()
        elif ext == "png":
            pa, pb = rgba(a), rgba(b)
            same = pa.shape == pb.shape and np.array_equal(pa, pb)
            same = same and Image.open(a).info.get("dpi") == Image.open(b).info.get("dpi")
        elif ext == "pdf":
            same = run_free(pdf_text(a)) == run_free(pdf_text(b)) and pdf_pages(a) == pdf_pages(b)
            figures = {n: rgba(os.path.join(after, n)) for n in names if n.endswith(".png")}
            with tempfile.TemporaryDirectory() as tmp:
                subprocess.run(["pdfimages", "-png", b, os.path.join(tmp, "i")], check=True)
                for img in sorted(glob.glob(os.path.join(tmp, "i-*.png"))):
                    px = rgba(img)
                    match = [n for n, f in figures.items() if f.shape == px.shape and np.array_equal(f, px)]
                    print(f"  {name} image {os.path.basename(img)} {px.shape[1]}×{px.shape[0]}: "
                          + (f"the pixels of {match[0]}" if match else "not one of the PNG figures"))
        else:
            continue
        print(f"{'same' if same else 'DIFFERENT'}  {name}")
        bad += not same
    return 1 if bad else 0


if __name__ == "__main__":
    if len(sys.argv) != 3:
        sys.exit(__doc__)
    sys.exit(main(sys.argv[1], sys.argv[2]))
