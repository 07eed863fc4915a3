#!/usr/bin/env python3
"""Refit the crater score (crates/craters/src/survey.rs, `crater_score`).

Builds demo patches of seeds 11, 12 and 13 (the training patches; never scored by
scripts/accuracy-heldout.sh), surveys each with the shape gates alone (QB_MIN_SCORE=0 in the
craters crate's demo_eval example), labels every candidate by whether it matches a planted
crater (centre within 0.25 D, diameter within 20%, as the accuracy test), fits a logistic
regression on six dimensionless terms and prints the intercept and raw-unit weights to paste
into survey.rs. Needs numpy and scikit-learn (`pip install numpy scikit-learn`).

    scripts/fit-crater-score.py [SEED ...]        default: 11 12 13
"""
import csv
import os
import subprocess
import sys

import numpy as np
from sklearn.linear_model import LogisticRegression
from sklearn.preprocessing import StandardScaler

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
WORK = os.path.join(os.environ.get("TMPDIR", "/tmp"), "quietbowl-heldout")
TERMS = ["d/D over fresh", "crest fraction", "rim relief / depth",
         "diameter sd / diameter", "depth sd / depth", "roughness / depth"]


def run(*args, env=None):
    subprocess.run(args, cwd=ROOT, check=True, env=env, stdout=subprocess.DEVNULL)


def candidates(seed):
    patch = os.path.join(WORK, f"seed{seed}")
    if not os.path.exists(os.path.join(patch, "truth.json")):
        run("target/release/examples/make_demo", patch, str(seed))
    dump = os.path.join(WORK, f"score-candidates-seed{seed}.csv")
    env = dict(os.environ, QB_MIN_SCORE="0", QB_DUMP=dump)
    run("target/release/examples/demo_eval", patch, env=env)
    rows = []
    with open(dump) as f:
        for r in csv.DictReader(f):
            x = [float(r["ddf"]), float(r["crestf"]), float(r["relief_depth"]),
                 float(r["dsd"]), float(r["depsd"]), float(r["rough"])]
            if all(np.isfinite(x)):
                rows.append((x, int(r["matched"])))
    return rows


def main():
    seeds = [int(s) for s in sys.argv[1:]] or [11, 12, 13]
    os.makedirs(WORK, exist_ok=True)
    run("cargo", "build", "--release", "-q", "-p", "quietbowl-synthetic", "--example", "make_demo")
    run("cargo", "build", "--release", "-q", "-p", "quietbowl-craters", "--example", "demo_eval")
    rows = [r for s in seeds for r in candidates(s)]
    x = np.array([r[0] for r in rows])
    y = np.array([r[1] for r in rows])
    scale = StandardScaler().fit(x)
    fit = LogisticRegression(C=1.0, max_iter=5000).fit(scale.transform(x), y)
    w = fit.coef_[0] / scale.scale_
    b = fit.intercept_[0] - np.sum(fit.coef_[0] * scale.mean_ / scale.scale_)
    print(f"seeds {seeds}: {len(y)} candidates, {int(y.sum())} matched")
    print(f"SCORE_INTERCEPT: f64 = {b:.4f};")
    print("SCORE_WEIGHTS: [f64; 6] = [" + ", ".join(f"{v:.4f}" for v in w) + "];")
    for t, v in zip(TERMS, w):
        print(f"  {t:24s} {v:+.4f}")


if __name__ == "__main__":
    main()
