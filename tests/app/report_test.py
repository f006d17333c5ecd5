#!/usr/bin/python3
# SPDX-License-Identifier: MIT
"""umbra-cli report and export-findings on a case written by hand per docs/case-file.md
(findings and measurements given, recipe null = the defaults), one case per ctest test.

usage: report_test.py UMBRA_CLI WORKDIR CASE

Outside references: the CSV is read back with Python's csv module (RFC 4180 dialect) and the
JSON with Python's json module; the PDF is read with poppler-utils (pdfinfo, pdftotext,
pdfimages); SHA-256 from Python's hashlib.
"""
import csv
import hashlib
import io
import json
import os
import shutil
import subprocess
import sys
import unicodedata

HERE = os.path.dirname(os.path.abspath(__file__))
sys.dont_write_bytecode = True  # keep the source tree clean
sys.path.insert(0, HERE)
from cli_case import CASE, CLI, WORK, check, main, run  # noqa: E402,F401

SCENE = os.path.join(HERE, "fixtures", "small_block_scene.json")
# Text with a comma, a double quote and a line break: RFC 4180 quoting must keep it whole.
DESCRIPTION = 'Round echo at the hole, "sharp" rim,\nsecond line'


def fresh_dir():
    d = os.path.join(WORK, "report_" + CASE)
    shutil.rmtree(d, ignore_errors=True)
    os.makedirs(d)
    return d


def sha256(path):
    with open(path, "rb") as f:
        return hashlib.sha256(f.read()).hexdigest()


def write_case(d, header=True, capture_path="cap.h5"):
    """Simulates the small block (one Ø1 mm side-drilled hole at x = 0, depth 4 mm) and writes a
    case by hand: an extent box and a caliper, two findings, recipe null."""
    cap = os.path.join(d, "cap.h5")
    rc, out, err = run("simulate", SCENE, "-o", cap)
    check(rc == 0, f"simulate exit {rc}: {err}")
    case = {
        "format": "umbracase",
        "version": 1,
        "title": "Hand-written test case",
        "background": "Check of the side-drilled hole after machining.",
        "pertinent_negatives": ["No echo between the hole and the back wall"],
        "prior_comparison": "No prior examination.",
        "active_capture": 0,
        "captures": [{
            "path": capture_path,
            "sha256": sha256(cap),
            "recipe": None,
            "measurements": [
                {"id": "M1", "kind": "extent box", "label": "hole", "frame": 0,
                 "points_mm": [[-1.2, 3.3], [1.1, 4.6]]},
                {"id": "M2", "kind": "caliper", "label": "", "frame": 0,
                 "points_mm": [[-2.0, 1.0], [2.0, 1.0]]},
            ],
        }],
        "findings": [
            {"id": "F1", "number": 1,
             "indication": {"location": "frame 1, x = 0.0 mm, depth 4.0 mm", "capture": 0, "frame": 0,
                            "x_mm": 0.0, "depth_mm": 4.0, "length_mm": 2.3, "height_mm": 1.3, "peak_db": -6.4,
                            "reference": "frame peak", "measurements": ["M1"], "description": DESCRIPTION},
             "interpretation": {"class": "relevant", "reason": "the drilled reference hole"},
             "evaluation": {"outcome": "acceptable", "criterion": "test criterion 1"}},
            {"id": "F2", "number": 2,
             "indication": {"location": "near surface", "capture": 0, "frame": 0,
                            "x_mm": None, "depth_mm": None, "length_mm": None, "height_mm": None, "peak_db": None,
                            "reference": "", "measurements": ["M2"], "description": "ring-down band"},
             "interpretation": {"class": "false", "reason": "array ring-down"},
             "evaluation": {"outcome": "unset", "criterion": ""}},
        ],
    }
    if header:
        case["report_header"] = {"part": "Test block TB-8", "site": "Bench 3", "date": "2026-12-02",
                                 "examiner": "A. Examiner (level 2)", "reviewer": "", "procedure": "TP-001 rev. B",
                                 "criteria": "test criteria, clause 4"}
    path = os.path.join(d, "test.umbracase")
    with open(path, "w") as f:
        json.dump(case, f, indent=2)
    return path, cap, case


def case_export_findings():
    d = fresh_dir()
    path, cap, case = write_case(d)
    out_csv = os.path.join(d, "findings.csv")
    rc, out, err = run("export-findings", path, "-o", out_csv)
    check(rc == 0, f"export-findings csv exit {rc}: {err}")
    raw = open(out_csv, "rb").read()
    check(b"\r\n" in raw and raw.endswith(b"\r\n"), "CRLF line ends (RFC 4180)")
    rows = list(csv.reader(io.StringIO(raw.decode("utf-8"), newline="")))
    check(len(rows) == 3, f"header and two rows, got {len(rows)}")
    head = rows[0]
    for col in ("finding", "location", "length_mm", "height_mm", "peak_db", "interpretation", "evaluation",
                "criterion", "measurements"):
        check(col in head, f"column {col}")
    r1 = dict(zip(head, rows[1]))
    r2 = dict(zip(head, rows[2]))
    check(r1["description"] == DESCRIPTION, f"description with comma, quote and line break kept: {r1['description']!r}")
    check(float(r1["length_mm"]) == 2.3 and float(r1["height_mm"]) == 1.3, "numbers as in the case")
    check(float(r1["peak_db"]) == -6.4, "peak as in the case")
    check(r1["interpretation"] == "relevant" and r1["evaluation"] == "acceptable", f"levels apart: {r1}")
    check(r1["criterion"] == "test criterion 1", "criterion")
    check("M1" in r1["measurements"] and "extent box" in r1["measurements"], f"linked measurement: {r1['measurements']}")
    check(r2["length_mm"] == "" and r2["peak_db"] == "", "not measured = empty cell")
    check(r2["evaluation"] == "not applicable", f"false indication not evaluated: {r2['evaluation']}")
    check(r1["frame"] == "1", "frames counted from 1")

    out_json = os.path.join(d, "findings.json")
    rc, out, err = run("export-findings", path, "-o", out_json)
    check(rc == 0, f"export-findings json exit {rc}: {err}")
    j = json.load(open(out_json))
    check(len(j["findings"]) == 2, "two findings")
    f1 = j["findings"][0]
    check(f1["indication"]["length_mm"] == 2.3 and f1["indication"]["description"] == DESCRIPTION, "JSON values")
    check(f1["measurements"][0]["points_mm"] == [[-1.2, 3.3], [1.1, 4.6]], "measurement points")
    check(j["findings"][1]["indication"]["x_mm"] is None, "null = not measured")

    rc, out, err = run("export-findings", path, "-o", os.path.join(d, "findings.txt"))
    check(rc == 2 and ".csv" in err, f"unknown extension refused: {rc} {err}")
    bad = os.path.join(d, "bad.umbracase")
    open(bad, "w").write("{not json")
    rc, out, err = run("export-findings", bad, "-o", out_csv)
    check(rc == 2 and "bad.umbracase" in err, f"bad case named: {rc} {err}")


def pdf_text(pdf):
    p = subprocess.run(["pdftotext", "-layout", pdf, "-"], capture_output=True, text=True)
    check(p.returncode == 0, f"pdftotext: {p.stderr}")
    return p.stdout


def pdf_pages(pdf):
    p = subprocess.run(["pdfinfo", pdf], capture_output=True, text=True)
    check(p.returncode == 0, f"pdfinfo: {p.stderr}")
    for line in p.stdout.splitlines():
        if line.startswith("Pages:"):
            return int(line.split()[1])
    return 0


def case_report():
    d = fresh_dir()
    path, cap, case = write_case(d)
    pdf = os.path.join(d, "report.pdf")
    rc, out, err = run("report", path, "-o", pdf, "--threads", "2", timeout=300)
    check(rc == 0, f"report exit {rc}: {err}")
    check(os.path.exists(pdf) and not os.path.exists(pdf + ".part"), "PDF written, no temporary left")
    pages = pdf_pages(pdf)
    check(pages >= 2, f"pages {pages}")
    text = pdf_text(pdf)
    # NFKC folds the ligatures pdftotext gives for "fi", "ff" (Unicode normalization, UAX #15).
    flat = unicodedata.normalize("NFKC", " ".join(text.split()))
    # Sections in the order docs/report.md gives.
    order = ["Hand-written test case", "Examination report", "Part", "Site", "Date of examination", "Examiner",
             "Reviewer", "Procedure", "Acceptance criteria", "Background", "Technique", "Findings", "Images",
             "Pertinent negatives", "Comparison with prior examinations", "Cautions", "Provenance", "Sign-off"]
    pos = []
    for s in order:
        i = flat.find(s, pos[-1] if pos else 0)
        check(i >= 0, f"section or field '{s}' present in order")
        pos.append(i if i >= 0 else (pos[-1] if pos else 0))
    # Header fields from the case, and a blank line for the reviewer the case leaves empty.
    for v in ("Test block TB-8", "Bench 3", "2026-12-02", "A. Examiner (level 2)", "TP-001 rev. B", "test criteria, clause 4"):
        check(v in flat, f"header value {v}")
    check("____" in flat, "blank line to sign for the missing reviewer")
    # Numbers as in the case, each with its expanded uncertainty.
    for v in ("length 2.3 ±", "height 1.3 ±", "depth 4.0 ±", "-6.4 dB re frame peak"):
        check(v in flat, f"value '{v}' as in the case")
    check("Round echo at the hole" in flat and "relevant" in flat and "acceptable" in flat, "finding levels")
    check("not applicable" in flat, "false indication: evaluation not applicable")
    # Page numbers on every page.
    for k in range(1, pages + 1):
        check(f"page {k} of {pages}" in flat, f"page {k} of {pages}")
    # Provenance: the capture's SHA-256 (hashlib), the software version, the default recipe.
    check(sha256(cap) in flat, "capture SHA-256 in the provenance, unbroken")
    check("umbra-cli report" in flat and "Umbra" in flat, "software named")
    check("the default settings (the case holds no recipe)" in flat, "recipe null = defaults")
    check("SYNTHETIC DATA" in flat and "synthetic data" in flat, "synthetic label")
    check("is an aid" in flat and "qualified" in flat, "cautions")
    check("No echo between the hole and the back wall" in flat, "pertinent negative")
    check("full matrix" in flat and "single_element" not in flat, "transmit in words, no internal name")
    p = subprocess.run(["pdfimages", "-list", pdf], capture_output=True, text=True)
    images = [ln for ln in p.stdout.splitlines()[2:] if ln.strip()]
    check(len(images) >= 1, f"annotated image embedded ({len(images)} image(s))")
    print(f"report: {pages} pages, {len(images)} image(s)")


def case_report_missing_capture():
    """A case whose capture is gone: still a report (no image, the problem said), blank header lines."""
    d = fresh_dir()
    path, cap, case = write_case(d, header=False)
    os.remove(cap)
    pdf = os.path.join(d, "report.pdf")
    rc, out, err = run("report", path, "-o", pdf, timeout=300)
    check(rc == 0, f"report exit {rc}: {err}")
    flat = unicodedata.normalize("NFKC", " ".join(pdf_text(pdf).split()))
    check("not found" in flat, "missing capture said")
    check(flat.count("____") >= 7, "seven blank header lines")
    check("file not found" in flat, "provenance says the file is missing")
    rc, out, err = run("report", os.path.join(d, "nope.umbracase"), "-o", pdf)
    check(rc == 2 and "nope.umbracase" in err, f"missing case file: exit {rc} {err}")
    rc, out, err = run("report", path)
    check(rc == 2 and "-o" in err, f"no -o: exit {rc} {err}")


def case_report_second_reading():
    """A second reading of the same capture (the interpretation of F2 differs): the report gains
    the inter-reader agreement section; a reading of another capture is refused (exit 2)."""
    d = fresh_dir()
    path, cap, case = write_case(d)
    second = json.loads(json.dumps(case))
    second["title"] = "Blind re-read"
    second["findings"][1]["interpretation"] = {"class": "non-relevant", "reason": "surface echo"}
    second_path = os.path.join(d, "second.umbracase")
    with open(second_path, "w") as f:
        json.dump(second, f, indent=2)
    pdf = os.path.join(d, "report.pdf")
    rc, out, err = run("report", path, "-o", pdf, "--second-reading", second_path, timeout=300)
    check(rc == 0, f"report exit {rc}: {err}")
    flat = unicodedata.normalize("NFKC", " ".join(pdf_text(pdf).split()))
    a, c = flat.find("Inter-reader agreement"), flat.find("Cautions")
    check(a >= 0 and c > a, "agreement section present, before the cautions")
    section = flat[a:c]
    check("Found by every reader: 1" in section, "the located finding F1 is matched between the readings")
    check("Interpretation class, matched indications" in section, "interpretation confusion table present")
    other = dict(second)
    other["captures"] = [dict(second["captures"][0], sha256="0" * 64)]
    other_path = os.path.join(d, "other.umbracase")
    with open(other_path, "w") as f:
        json.dump(other, f, indent=2)
    rc, out, err = run("report", path, "-o", os.path.join(d, "r2.pdf"), "--second-reading", other_path, timeout=300)
    check(rc == 2, f"reading of another capture: exit {rc} {err}")


if __name__ == "__main__":
    main(globals())
