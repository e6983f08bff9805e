"""Long runs as a user leaves them: interrupted, resumed, refused, restarted (subprocesses).

Behaviour checks (no source needed): the file of an interrupted and resumed
run equals byte for byte the file of an uninterrupted one; a file of another
run is refused with a message naming the difference; pseudo-unitarity of
every row (a conservation law) is checked on the finished table.
"""
import os
import pathlib
import signal
import subprocess
import sys

import pytest

from contourkit.scans.table import read_table

ROOT = pathlib.Path(__file__).resolve().parents[2]
SUPER = ROOT / "worked_examples" / "models" / "superluminal.toml"
# 40 frequencies: blocks of 10 rows (engine.block_length), so a kill after 13 rows falls inside block 2
GRID = ["--omega-min", "0.004", "--omega-max", "0.06", "--points", "40"]


def _env():
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT) + os.pathsep + env.get("PYTHONPATH", "")
    return env


def _cli(*args):
    return [sys.executable, "-m", "contourkit", *map(str, args)]


def run(*args):
    return subprocess.run(_cli(*args), env=_env(), capture_output=True, text=True, timeout=300)


@pytest.fixture(scope="module")
def reference(tmp_path_factory):
    ref = tmp_path_factory.mktemp("ref") / "ref.csv"
    done = run("spectrum", SUPER, *GRID, "--quiet", "--workers", "2", "--out", ref)
    assert done.returncode == 0, done.stderr
    rows = read_table(ref)
    assert len(rows) == 40 and all(r["success"] for r in rows)
    assert max(r["unitarity_residual"] for r in rows) < 1e-10          # pseudo-unitarity
    return ref


@pytest.mark.parametrize("sig", [signal.SIGINT, signal.SIGKILL], ids=["SIGINT", "SIGKILL"])
def test_interrupted_then_resumed_equals_uninterrupted(tmp_path, reference, sig, interrupt_scan):
    out = tmp_path / "run.csv"
    code, err, partial = interrupt_scan(_cli("spectrum", SUPER, *GRID, "--quiet", "--workers", "1", "--out", out),
                                        out, rows=13, total=40, sig=sig, env=_env())
    if sig == signal.SIGINT:
        assert code == 130 and len(err.strip().splitlines()) == 1 and "Traceback" not in err, err
        assert "interrupted" in err
    else:
        assert code == -signal.SIGKILL
    assert 13 <= partial < 40
    again = run("spectrum", SUPER, *GRID, "--quiet", "--workers", "1", "--out", out)
    assert again.returncode == 0, again.stderr
    assert f"{40 - partial} computed, {partial} from an earlier run" in again.stdout
    assert out.read_bytes() == reference.read_bytes()


@pytest.mark.parametrize("change, words", [
    (["--param-model"], "the model differs"),
    (["--points", "41"], "the frequency grid differs"),
    (["--rtol", "1e-8"], "the option rtol differs"),
    (["--method", "direct"], "the method differs"),
])
def test_another_run_into_the_same_file_is_refused(tmp_path, reference, change, words):
    out = tmp_path / "run.csv"
    out.write_bytes(reference.read_bytes())
    args = list(GRID)
    if change == ["--param-model"]:
        other = tmp_path / "other.toml"
        other.write_text(SUPER.read_text().replace("kappa = 0.05", "kappa = 0.06"))
        assert other.read_text() != SUPER.read_text()
        model = other
    else:
        model = SUPER
        if change[0] == "--points":
            args[args.index("--points") + 1] = change[1]
        else:
            args += change
    proc = run("spectrum", model, *args, "--quiet", "--workers", "1", "--out", out)
    assert proc.returncode != 0
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1 and "Traceback" not in proc.stderr, proc.stderr
    assert words in lines[0] and "--restart" in lines[0]
    assert out.read_bytes() == reference.read_bytes()          # the file is left as it was


def test_restart_starts_afresh(tmp_path, reference):
    out = tmp_path / "run.csv"
    out.write_bytes(reference.read_bytes())
    proc = run("spectrum", SUPER, "--omega-min", "0.004", "--omega-max", "0.06", "--points", "3", "--quiet",
               "--workers", "1", "--out", out, "--restart")
    assert proc.returncode == 0, proc.stderr
    rows = read_table(out)
    assert [r["omega"] for r in rows] == pytest.approx([0.004, 0.032, 0.06])
    assert "3 computed, 0 from an earlier run" in proc.stdout
    # a file of the old format (no fingerprint line) is refused, and --restart takes it over
    old = tmp_path / "old.csv"
    old.write_text(reference.read_text().split("\n", 1)[1])
    proc = run("spectrum", SUPER, *GRID, "--quiet", "--workers", "1", "--out", old)
    assert proc.returncode != 0 and "without a run fingerprint" in proc.stderr
    assert len(proc.stderr.strip().splitlines()) == 1
