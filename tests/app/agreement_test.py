# SPDX-License-Identifier: MIT
"""umbra-cli blind-copy and agreement on hand-written case files (docs/case-file.md).
Kappa is checked against scikit-learn's cohen_kappa_score, the interval against statsmodels'
cohens_kappa, Bland-Altman bias and limits against numpy; usage: UMBRA_CLI WORKDIR CASE."""
import hashlib
import json
import os
import shutil

import numpy as np
from sklearn.metrics import cohen_kappa_score
from statsmodels.stats.inter_rater import cohens_kappa, fleiss_kappa

from cli_case import CASE, WORK, check, main, run

DIR = os.path.join(WORK, f"agreement_{CASE}_{os.getpid()}")

INTERP = ["unset", "false", "non-relevant", "relevant"]


def capture(name, content):
    path = os.path.join(DIR, name)
    with open(path, "wb") as f:
        f.write(content)
    return path, hashlib.sha256(content).hexdigest()


def write_case(name, captures, findings, **texts):
    doc = {"format": "umbracase", "version": 1, "title": texts.get("title", ""),
           "background": texts.get("background", ""), "technique": texts.get("technique", ""),
           "pertinent_negatives": texts.get("negatives", []), "prior_comparison": texts.get("prior", ""),
           "active_capture": 0,
           "captures": [{"path": p, "sha256": s, "recipe": {"das": {"f_number": 1.5}},
                         "measurements": [{"id": "M1", "kind": "caliper", "label": texts.get("label", "m"),
                                           "frame": 0, "points_mm": [[0, 1], [2, 3]]}]} for p, s in captures],
           "findings": []}
    for i, (x, z, cls, ev, length) in enumerate(findings):
        doc["findings"].append({
            "id": f"F{i + 1}", "number": i + 1,
            "indication": {"location": texts.get("location", "here"), "capture": 0, "frame": 2, "x_mm": x,
                           "depth_mm": z, "length_mm": length, "height_mm": None, "peak_db": None,
                           "reference": "", "measurements": [], "description": texts.get("description", "echo")},
            "interpretation": {"class": cls, "reason": texts.get("reason", "")},
            "evaluation": {"outcome": ev, "criterion": texts.get("criterion", "")}})
    path = os.path.join(DIR, name)
    with open(path, "w") as f:
        json.dump(doc, f)
    return path


def setup():
    shutil.rmtree(DIR, ignore_errors=True)
    os.makedirs(DIR)


def readers():
    """Three readers on the same capture: 12 indications at the same places, ratings differ."""
    cap = capture("c.h5", b"synthetic capture bytes")
    rng = np.random.default_rng(3)
    base = [(x, 10.0 + (x % 3)) for x in range(-24, 24, 4)]
    cases, ratings, lengths = [], [], []
    for r in range(3):
        fs, rs, ls = [], [], []
        for i, (x, z) in enumerate(base):
            cls = INTERP[3] if (i + r * (i % 4 == 0)) % 3 else INTERP[2]
            ev = "rejectable" if cls == "relevant" and i % 2 else ("acceptable" if cls == "relevant" else "unset")
            ln = 5.0 + 0.1 * i + rng.normal(0, 0.3)
            fs.append((x + rng.uniform(-1, 1), z + rng.uniform(-1, 1), cls, ev, ln))
            rs.append((cls, ev))
            ls.append(ln)
        cases.append(write_case(f"reader{r + 1}.umbracase", [cap], fs))
        ratings.append(rs)
        lengths.append(ls)
    return cases, ratings, lengths


def case_two_readers():
    setup()
    cases, ratings, lengths = readers()
    rc, out, err = run("agreement", cases[0], cases[1], "--json")
    check(rc == 0, f"agreement exits 0 (rc {rc}, {err})")
    j = json.loads(out)
    check(j["readers"] == 2 and j["matched"] == 12 and j["unmatched"] == 0, f"counts {j['readers']} {j['matched']} {j['unmatched']}")
    a = [r[0] for r in ratings[0]]
    b = [r[0] for r in ratings[1]]
    ref = cohen_kappa_score(a, b, labels=INTERP)
    check(abs(j["interpretation"]["cohen_kappa"] - ref) < 1e-12, f"kappa {j['interpretation']['cohen_kappa']} vs sklearn {ref}")
    table = np.array(j["interpretation"]["confusion"]["matrix"])
    sm = cohens_kappa(table)
    lo, hi = j["interpretation"]["ci95"]
    check(abs(lo - sm.kappa_low) < 1e-9 and abs(hi - sm.kappa_upp) < 1e-9, f"ci {lo} {hi} vs statsmodels {sm.kappa_low} {sm.kappa_upp}")
    ea = [r[1] for r in ratings[0]]
    eb = [r[1] for r in ratings[1]]
    labels = ["unset", "acceptable", "rejectable", "refer-for-review"]
    refe = cohen_kappa_score(ea, eb, labels=labels)
    check(abs(j["evaluation"]["cohen_kappa"] - refe) < 1e-12, f"evaluation kappa vs sklearn {refe}")
    d = np.array(lengths[1]) - np.array(lengths[0])
    check(abs(j["sizes"]["bias_mm"] - d.mean()) < 1e-9, "length bias as numpy")
    loa = j["sizes"]["limits_of_agreement_mm"]
    check(abs(loa[1] - (d.mean() + 1.959963984540054 * d.std(ddof=1))) < 1e-9, "upper limit as numpy")
    rc, out, err = run("agreement", cases[0], cases[1])
    check(rc == 0 and "Cohen's κ" in out and "limits of agreement" in out, "readable output")


def case_three_readers():
    setup()
    cases, ratings, _ = readers()
    rc, out, err = run("agreement", *cases, "--json")
    check(rc == 0, f"agreement exits 0 (rc {rc}, {err})")
    j = json.loads(out)
    table = np.zeros((12, 4))
    for r in ratings:
        for i, (cls, _) in enumerate(r):
            table[i, INTERP.index(cls)] += 1
    ref = fleiss_kappa(table)
    check(j["readers"] == 3 and "cohen_kappa" not in j["interpretation"], "three readers: no Cohen's kappa")
    check(abs(j["interpretation"]["fleiss_kappa"] - ref) < 1e-12, f"Fleiss' kappa {j['interpretation']['fleiss_kappa']} vs statsmodels {ref}")


def case_other_captures():
    setup()
    c1 = write_case("a.umbracase", [capture("a.h5", b"one")], [(0, 10, "relevant", "acceptable", 3)])
    c2 = write_case("b.umbracase", [capture("b.h5", b"two")], [(0, 10, "relevant", "acceptable", 3)])
    rc, out, err = run("agreement", c1, c2, "--json")
    check(rc == 2 and "SHA-256" in err and "b.umbracase" in err, f"different captures: exit 2 naming the case ({rc}, {err})")
    rc, _, err = run("agreement", c1)
    check(rc == 2, "one case is a usage error")
    rc, _, err = run("agreement", c1, os.path.join(DIR, "missing.umbracase"))
    check(rc == 2 and "missing.umbracase" in err, "missing case named")


def case_blind_copy():
    setup()
    os.makedirs(os.path.join(DIR, "alpha"))
    cap = capture("alpha/c.h5", b"capture")
    src = write_case("alpha/first.umbracase", [cap], [(1, 10, "relevant", "rejectable", 4)], title="Read by Alpha Reader",
                     background="Alpha bg", technique="Alpha tech", negatives=["Alpha neg"], prior="Alpha prior",
                     label="Alpha caliper", location="Alpha loc", description="Alpha desc", reason="Alpha reason",
                     criterion="Alpha crit")
    os.makedirs(os.path.join(DIR, "beta"))
    dst = os.path.join(DIR, "beta", "blind.umbracase")
    rc, out, err = run("blind-copy", src, "-o", dst, "--copy-captures")
    check(rc == 0, f"blind-copy exits 0 ({err})")
    text = open(dst).read()
    check("Alpha" not in text and "alpha" not in text, "no string of the first reader in the blind copy")
    j = json.loads(text)
    check(j["findings"] == [] and j["captures"][0]["measurements"] == [], "no findings or measurements")
    check(j["captures"][0]["sha256"] == cap[1], "same capture")
    check(j["captures"][0]["recipe"] == {"das": {"f_number": 1.5}}, "same recipe")
    rc, _, err = run("blind-copy", src, "-o", src)
    check(rc == 2, "refuses to overwrite the source")
    rc, _, err = run("blind-copy", os.path.join(DIR, "nope.umbracase"), "-o", dst)
    check(rc == 2 and "nope.umbracase" in err, "missing source named")


main({"case_two_readers": case_two_readers, "case_three_readers": case_three_readers,
      "case_other_captures": case_other_captures, "case_blind_copy": case_blind_copy},
     cleanup=lambda: shutil.rmtree(DIR, ignore_errors=True))
