"""``contourkit greybody``: the far-region table from a model file, as a user runs it.

Physics checks: a flow with constant sound speed has V = 0 (conformal invariance
of 1+1 flows), so Gamma = 1 and occupation_far = |beta_H|^2 thermal, the Planck
factor 1/(exp(omega/T_eff) - 1) (Hawking 1975); |R|^2 + Gamma = 1 (common practice).
"""
import csv
import math
import os
import pathlib
import subprocess
import sys

ROOT = pathlib.Path(__file__).resolve().parents[2]

MODEL = """\
[model]
name = "tanh flow with a transverse wavenumber"
kind = "dispersion"
equation = "(omega - v*k)**2 - k**2 - k**4/Lambda**2"

[parameters]
kappa = 0.05
Lambda = 2.5
D = 0.5

[profiles]
v = "-1 + D*tanh(kappa*x/D)"
"""


def run(*args, cwd):
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT) + os.pathsep + env.get("PYTHONPATH", "")
    env["MPLBACKEND"] = "Agg"
    return subprocess.run([sys.executable, "-m", "contourkit", *map(str, args)], capture_output=True,
                          text=True, cwd=cwd, env=env, timeout=400)


def test_greybody_command_writes_the_far_table(tmp_path):
    (tmp_path / "flow.toml").write_text(MODEL)
    p = run("greybody", "flow.toml", "--omega-min", "0.005", "--omega-max", "0.03", "--points", "3",
            "--out", "far.csv", cwd=tmp_path)
    assert p.returncode == 0, p.stderr
    rows = list(csv.DictReader(open(tmp_path / "far.csv")))
    assert len(rows) == 3
    for r in rows:
        w, G, T = float(r["omega"]), float(r["greybody"]), float(r["effective_temperature"])
        assert abs(G - 1) < 1e-8 and abs(G + float(r["reflection"]) - 1) < 1e-8
        assert math.isclose(float(r["occupation_far"]), G / math.expm1(w / T), rel_tol=1e-12)
    # with a transverse wavenumber the barrier closes the channel below its threshold 0.866 k_perp
    p = run("greybody", "flow.toml", "--omega-min", "0.005", "--omega-max", "0.03", "--points", "2",
            "--k-perp", "0.01", "--out", "far2.csv", "--quiet", cwd=tmp_path)
    assert p.returncode == 0, p.stderr
    rows = list(csv.DictReader(open(tmp_path / "far2.csv")))
    assert float(rows[0]["greybody"]) == 0.0 and 0.99 < float(rows[1]["greybody"]) < 1
    assert float(rows[1]["k_perp"]) == 0.01


def test_greybody_command_errors_are_one_line(tmp_path):
    (tmp_path / "flow.toml").write_text(MODEL)
    for args in (("greybody", "flow.toml", "--omega-min", "0.01"),
                 ("greybody", "flow.toml", "--omega-min", "0.02", "--omega-max", "0.01"),
                 ("greybody", "missing.toml", "--omega-min", "0.01", "--omega-max", "0.02"),
                 ("greybody", "flow.toml", "--omega-min", "0.01", "--omega-max", "0.02", "--k-perp", "x")):
        p = run(*args, cwd=tmp_path)
        assert p.returncode != 0
        lines = p.stderr.strip().splitlines()
        assert len(lines) == 1 and lines[0].startswith("contourkit: error: ") and "Traceback" not in p.stderr
