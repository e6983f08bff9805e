"""The command line as a user drives it: subprocesses of ``python -m contourkit``.

Checks are of behaviour (exit codes, one-line error messages, the tables
written); the physics values are checked against the exact non-dispersive
result |beta/alpha|^2 = exp(-2 pi omega/kappa) (Unruh 1981) and, for the
dispersive model, against pseudo-unitarity (no source needed).
"""
import csv
import json
import math
import os
import pathlib
import subprocess
import sys

import pytest

ROOT = pathlib.Path(__file__).resolve().parents[2]
MODELS = ROOT / "worked_examples" / "models"
NONDISP = MODELS / "nondispersive.toml"
SUPER = MODELS / "superluminal.toml"
COUNTER = MODELS / "counter_current.toml"


def run(*args, cwd=None, timeout=240):
    """Run ``python -m contourkit ARGS`` as a user would; return the CompletedProcess."""
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT) + os.pathsep + env.get("PYTHONPATH", "")
    env["MPLBACKEND"] = "Agg"
    return subprocess.run([sys.executable, "-m", "contourkit", *map(str, args)], capture_output=True,
                          text=True, cwd=cwd, env=env, timeout=timeout)


def assert_one_line_error(proc):
    assert proc.returncode != 0, proc.stdout
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1, proc.stderr
    assert lines[0].startswith("contourkit: error: "), proc.stderr
    assert "Traceback" not in proc.stderr


@pytest.mark.parametrize("command", [None, "derive", "spectrum", "figures", "check"])
def test_help(command):
    proc = run(*([command] if command else []), "--help")
    assert proc.returncode == 0, proc.stderr
    assert "usage: contourkit" in proc.stdout
    if command:
        assert "--example" in proc.stdout and "--catalogue" in proc.stdout


def test_derive_text_and_latex():
    proc = run("derive", SUPER, "--omega", "0.05")
    assert proc.returncode == 0, proc.stderr
    out = proc.stdout
    assert "surface gravity kappa" in out and "0.05" in out
    assert "exponent E(k)" in out and "8*I*k**3/15" in out        # i k^3 (4/Lambda^2)/(3 kappa) ... closed form
    assert "branch points" in out and "-1/20" in out              # k = -omega at the horizon
    proc = run("derive", "--example", "airy", "--latex")
    assert proc.returncode == 0, proc.stderr
    assert proc.stdout.startswith("\\begin{align*}") and "\\end{align*}" in proc.stdout
    assert "E(k) &= \\frac{i k^{3}}{3}" in proc.stdout            # DLMF 9.5.4


def test_spectrum_table_and_json(tmp_path):
    out, js = tmp_path / "spec.csv", tmp_path / "spec.json"
    proc = run("spectrum", NONDISP, "--omega-min", "0.01", "--omega-max", "0.04", "--points", "3", "--log",
               "--out", out, "--json", js, "--workers", "1")
    assert proc.returncode == 0, proc.stderr
    lines = out.read_text().splitlines()
    assert lines[0].startswith("# contourkit run {")          # the run fingerprint (docs/vocabulary.md)
    rows = list(csv.DictReader(lines[1:]))
    assert [float(r["omega"]) for r in rows] == pytest.approx([0.01, 0.02, 0.04])
    for r in rows:   # exact thermal factor (Unruh 1981)
        assert float(r["thermal_ratio"]) == pytest.approx(math.exp(-2 * math.pi * float(r["omega"]) / 0.05),
                                                          rel=1e-12)
    doc = json.loads(js.read_text())
    assert doc["model"]["kappa"] == 0.05 and len(doc["rows"]) == 3
    assert doc["fingerprint"] == json.loads(lines[0][len("# contourkit run "):])
    assert doc["rows"][1]["omega"] == float(rows[1]["omega"])
    assert "3 rows" in proc.stdout


def test_spectrum_catalogue_model_with_params():
    proc = run("spectrum", "--catalogue", "quartic_flow", "--param", "branch=subluminal", "--param", "kappa=0.05",
               "--omega-min", "0.02", "--points", "1", "--workers", "1")
    assert proc.returncode == 0, proc.stderr
    line = [ln for ln in proc.stdout.splitlines() if ln.strip().startswith("0.02")]
    assert line and line[0].endswith("yes")


def test_check_against_direct_solver():
    proc = run("check", "--example", "quartic_superluminal", "--omega", "0.02")
    assert proc.returncode == 0, proc.stdout + proc.stderr
    row = [ln.split() for ln in proc.stdout.splitlines() if ln.strip().startswith("0.02")][0]
    t_contour, t_direct = float(row[2]), float(row[3])
    # kappa/Lambda = 0.02: both close to Hawking (Corley & Jacobson 1996; tolerance from memory)
    assert abs(t_contour - 1) < 1e-2 and abs(t_direct - 1) < 1e-2


def test_check_reports_failures_in_one_line():
    # the linear profile has no uniform asymptotic region: the direct solver refuses it
    proc = run("check", NONDISP, "--omega", "0.02")
    assert_one_line_error(proc)
    assert "# note:" in proc.stdout


def test_figures(tmp_path):
    pytest.importorskip("matplotlib")
    proc = run("figures", NONDISP, "--omega", "0.02", "--x", "10", "--out-dir", tmp_path / "fig",
               "--points", "3", "--workers", "1")
    assert proc.returncode == 0, proc.stderr
    names = sorted(p.name for p in (tmp_path / "fig").iterdir())
    # the real-axis contour and each of the two basis contours (second-order equation)
    assert names == ["dispersion_x+10.png", "landscape_x+10.png", "landscape_x+10_C1.png", "landscape_x+10_C2.png",
                     "spectrum.png"]
    assert all((tmp_path / "fig" / n).stat().st_size > 1000 for n in names)


def _bad_cases(tmp):
    bad_toml = tmp / "bad.toml"
    bad_toml.write_text("[model]\nkind = dispersion\n")        # unquoted string: not TOML
    unknown_param = tmp / "unknown.toml"
    unknown_param.write_text(NONDISP.read_text().replace("[horizon]", "[horizon]\nwidth = 3"))
    blocker = tmp / "plainfile"
    blocker.write_text("")
    return {
        "missing file": ["spectrum", tmp / "nope.toml"],
        "malformed TOML": ["derive", bad_toml],
        "unknown key in the model file": ["derive", unknown_param],
        "unknown option": ["spectrum", NONDISP, "--omega-maxx", "1"],
        "unknown catalogue parameter": ["derive", "--catalogue", "quartic_flow", "--param", "kapa=0.1"],
        "unknown catalogue model": ["derive", "--catalogue", "no_such_flow"],
        "omega range reversed": ["spectrum", NONDISP, "--omega-min", "0.04", "--omega-max", "0.01"],
        "non-numeric value": ["spectrum", NONDISP, "--omega-min", "abc"],
        "non-numeric points": ["spectrum", NONDISP, "--points", "3.5"],
        "zero points": ["spectrum", NONDISP, "--points", "0"],
        "negative omega": ["spectrum", NONDISP, "--omega-min", "-0.1"],
        "negative omega in check": ["check", NONDISP, "--omega", "-0.02"],
        "unwritable output (no folder)": ["spectrum", NONDISP, "--out", tmp / "no" / "dir" / "s.csv"],
        "unwritable output (under a file)": ["spectrum", NONDISP, "--out", blocker / "s.csv"],
        "output is a directory": ["spectrum", NONDISP, "--out", tmp],
        "unknown subcommand": ["integrate", NONDISP],
        "no subcommand": [],
        "directory instead of a model file": ["derive", tmp],
        "no model": ["spectrum", "--points", "3"],
        "two models": ["derive", NONDISP, "--example", "airy"],
        "spectrum of an equation without horizon": ["spectrum", "--example", "airy"],
        "above the cut-off": ["spectrum", "--example", "quartic_superluminal", "--omega-min", "0.6",
                              "--points", "1"],
        "bad figure format": ["figures", NONDISP, "--formats", "bmpx"],
        "infinite value": ["derive", NONDISP, "--omega", "inf"],
    }


def test_bad_invocations_give_one_line(tmp_path):
    cases = _bad_cases(tmp_path)
    assert len(cases) >= 10
    failures = []
    for name, args in cases.items():
        proc = run(*args, cwd=tmp_path)
        lines = proc.stderr.strip().splitlines()
        if (proc.returncode == 0 or len(lines) != 1 or "Traceback" in proc.stderr
                or not lines[0].startswith("contourkit: error: ")):
            failures.append(f"{name}: exit {proc.returncode}, stderr {proc.stderr!r}")
    assert not failures, "\n".join(failures)


def test_debug_shows_traceback(tmp_path):
    proc = run("derive", tmp_path / "nope.toml", "--debug")
    assert proc.returncode != 0 and "Traceback" in proc.stderr


def test_error_names_the_problem(tmp_path):
    proc = run("spectrum", NONDISP, "--omega-min", "0.04", "--omega-max", "0.01")
    assert_one_line_error(proc)
    assert "--omega-min" in proc.stderr and "--omega-max" in proc.stderr
    proc = run("derive", "--catalogue", "quartic_flow", "--param", "kapa=0.1")
    assert_one_line_error(proc)
    assert "kapa" in proc.stderr and "kappa" in proc.stderr


@pytest.mark.slow
def test_check_horizonless_flow(tmp_path):
    """A horizonless model file: the blocked wave is totally reflected (common practice) by both methods,
    pseudo-unitarity holds, and the S-matrices agree; the table goes to CSV."""
    out = tmp_path / "check.csv"
    proc = run("check", COUNTER, "--omega", 0.26, 0.28, "--out", out)
    assert proc.returncode == 0, proc.stderr
    assert "horizonless flow" in proc.stdout
    with open(out) as fh:
        rows = [r for r in csv.DictReader(line for line in fh if not line.startswith("#"))]
    assert len(rows) == 2
    for r in rows:
        for m in ("contour", "direct"):
            assert abs(float(r[f"reflection_{m}"]) - 1) < 1e-8
            assert float(r[f"unitarity_residual_{m}"]) < 1e-8
        assert float(r["max_abs_diff_S"]) < 0.05


def test_horizonless_flow_refused_where_a_horizon_is_needed():
    for cmd in (("spectrum", COUNTER, "--points", 3), ("greybody", COUNTER)):
        proc = run(*cmd)
        assert_one_line_error(proc)
        assert "horizonless flow" in proc.stderr and "contourkit check" in proc.stderr
