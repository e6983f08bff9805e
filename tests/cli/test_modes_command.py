"""``contourkit modes``: the complex-frequency search from the command line.

The numbers themselves are checked in tests/profiles/test_unstable.py (argument
principle, time-domain growth rates); here the command must print and write the
same modes as ``ck.direct.unstable_modes`` and refuse bad requests in one line.
"""
import csv
import os
import subprocess
import sys

import pytest

import contourkit as ck


def _run(*args, cwd):
    env = dict(os.environ, PYTHONPATH=os.pathsep.join(filter(None, [os.path.dirname(os.path.dirname(
        ck.__file__)), os.environ.get("PYTHONPATH")])))
    return subprocess.run([sys.executable, "-m", "contourkit", "modes", *args], capture_output=True, text=True,
                          env=env, cwd=cwd, timeout=300)


def test_unstable_modes_table_and_figure_match_the_api(tmp_path):
    out, fig = tmp_path / "modes.csv", tmp_path / "modes.png"
    done = _run("--catalogue", "horizon_pair", "--param", "L=2.5", "--out", str(out), "--figure", str(fig),
                cwd=tmp_path)
    assert done.returncode == 0, done.stderr
    rows = list(csv.DictReader(open(out)))
    api = ck.direct.unstable_modes(ck.catalogue.horizon_pair(L=2.5))
    assert len(rows) == len(api) >= 1
    for r, md in zip(rows, api):
        assert complex(float(r["omega_real"]), float(r["omega_imag"])) == pytest.approx(md.omega, abs=1e-12)
        # conserved check of the search (residual of L phi = 0 between the nodes), common practice
        assert float(r["residual"]) <= 1e-8
        assert float(r["omega_imag"]) > 0
    assert fig.stat().st_size > 10_000


@pytest.mark.parametrize("args", [
    ["--catalogue", "horizon_pair", "--figure", "modes.txt"],
    ["--catalogue", "horizon_pair", "--kind", "ringing"],
    ["--catalogue", "horizon_pair", "--omega-max", "-1"],
    ["--catalogue", "horizon_pair", "--out", "no/such/dir/m.csv"],
])
def test_bad_requests_end_in_one_line(tmp_path, args):
    done = _run(*args, cwd=tmp_path)
    assert done.returncode != 0
    assert len(done.stderr.strip().splitlines()) == 1 and "Traceback" not in done.stderr
