"""Bad command lines generated from the option table: each ends in one line and a non-zero exit.

For every subcommand of the parser (contourkit.cli.registry) and every
option it declares, wrong values are made from the option's type (not a
number, out of range, not finite), its choices (an unknown choice), its role
(output paths that cannot be written, input files that do not exist, Dask
addresses that are malformed or unreachable on the loopback interface) and
the model arguments (missing, a folder, malformed TOML, bad parameters).
Each invocation must exit with a non-zero code, print exactly one line on
stderr and no Python traceback.  Behaviour checks: no source needed.
"""
import argparse
import os
import pathlib
import socket
import subprocess
import sys

import pytest

from contourkit.cli import build_parser, main
from contourkit.cli import parser as P

ROOT = pathlib.Path(__file__).resolve().parents[2]
SUPER = ROOT / "worked_examples" / "models" / "superluminal.toml"
TANH = "quartic_superluminal"          # shipped example with a tanh profile

BAD_VALUES = {
    P.positive_float: ["abc", "-1", "0", "nan", "inf", "1e400"],
    P.positive_int: ["abc", "0", "-3", "2.5"],
    P.finite_float: ["abc", "nan", "-inf", "1e300"],
    P.tolerance: ["0", "1", "7", "abc"],
}
OUTPUTS = {"out", "json", "out_dir"}
INPUTS = {"table"}


def _free_port():
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


def _base(name):
    """A valid command line of each subcommand, cheap to start."""
    return {"derive": ["derive", "--example", TANH],
            "spectrum": ["spectrum", SUPER, "--points", "2", "--workers", "1", "--quiet"],
            "figures": ["figures", SUPER, "--points", "2", "--workers", "1"],
            "check": ["check", "--example", TANH, "--omega", "0.02"],
            "greybody": ["greybody", "--example", TANH, "--omega-min", "0.01", "--omega-max", "0.02",
                         "--points", "2", "--quiet"],
            "modes": ["modes", "--catalogue", "horizon_pair", "--param", "L=1.0", "--quiet"]}.get(name, [name, SUPER])


def _subparsers():
    top = build_parser()
    sub = next(a for a in top._actions if isinstance(a, argparse._SubParsersAction))
    return sub.choices


def cases(tmp):
    blocker = tmp / "plainfile"
    blocker.write_text("")
    bad_toml = tmp / "bad.toml"
    bad_toml.write_text("[model]\nkind = dispersion\n")
    unwritable = [str(tmp / "no" / "such" / "dir" / "f.csv"), str(blocker / "f.csv"), str(tmp)]
    port = _free_port()
    out = []
    for name, sp in _subparsers().items():
        base = _base(name)
        for action in sp._actions:
            if not action.option_strings or action.dest in ("help", "debug"):
                continue
            opt = action.option_strings[0]
            values = list(BAD_VALUES.get(action.type, []))
            if action.choices:
                values.append("no-such-choice")
            if action.dest in OUTPUTS:
                values += unwritable if action.dest != "out_dir" else [str(blocker), str(blocker / "sub")]
            if action.dest in INPUTS:
                values.append(str(tmp / "missing.csv"))
            if action.dest == "scheduler":
                values += ["tcp://", "http://127.0.0.1:8786", "tcp://127.0.0.1:99999"]
                if name == "spectrum":
                    values.append(f"tcp://127.0.0.1:{port}")
            if action.dest == "param":
                out += [(f"{name} --param {v}", [name, "--catalogue", "quartic_flow", "--param", v])
                        for v in ("noequals", "kapa=0.1", "=3", "kappa=nan")]
                continue
            if action.dest == "formats":
                values += ["bmpx", ","]
            if action.dest == "example":
                out.append((f"{name} --example unknown", [name, "--example", "no_such_example"]))
                continue
            if action.dest == "catalogue":
                out.append((f"{name} --catalogue unknown", [name, "--catalogue", "no_such_flow"]))
                continue
            if action.nargs == 0:
                continue            # flags take no value
            for v in values:
                args = [a for a in base]
                if opt in args:     # replace the base's own value
                    i = args.index(opt)
                    args[i + 1] = v
                else:
                    args += [opt, v]
                out.append((f"{name} {opt} {v}", args))
        out += [(f"{name}: missing model file", [name, tmp / "nope.toml"] + base[2:]),
                (f"{name}: folder as model file", [name, tmp] + base[2:]),
                (f"{name}: malformed TOML", [name, bad_toml] + base[2:]),
                (f"{name}: unknown option", base + ["--no-such-option"])]
    out += [("no command", []), ("unknown command", ["integrate"]),
            ("spectrum: --restart without --out", _base("spectrum") + ["--restart"]),
            ("spectrum: --workers with --scheduler", _base("spectrum") + ["--scheduler", f"tcp://127.0.0.1:{port}"]),
            ("spectrum: above the cut-off", ["spectrum", "--example", TANH, "--omega-min", "0.6", "--points", "1"]),
            ("derive: two models", ["derive", SUPER, "--example", "airy"])]
    return out


def test_at_least_fifty_bad_invocations_each_end_in_one_line(tmp_path, capsys, monkeypatch):
    monkeypatch.setenv("MPLBACKEND", "Agg")
    monkeypatch.chdir(tmp_path)
    todo = cases(tmp_path)
    assert len(todo) >= 50, len(todo)
    failures = []
    for label, args in todo:
        try:
            code = main([str(a) for a in args])
        except BaseException as exc:          # noqa: BLE001 - anything escaping main is a failure
            failures.append(f"{label}: {type(exc).__name__} escaped main: {exc}")
            continue
        err = capsys.readouterr().err
        lines = err.strip().splitlines()
        if code == 0 or len(lines) != 1 or "Traceback" in err or not lines[0].startswith("contourkit: error: "):
            failures.append(f"{label}: exit {code}, stderr {err!r}")
    assert not failures, "\n".join(failures)


def test_a_sample_in_real_processes(tmp_path):
    # the same checks where a traceback could come from elsewhere (destructors, threads, exit)
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT) + os.pathsep + env.get("PYTHONPATH", "")
    env["MPLBACKEND"] = "Agg"
    picked = [c for c in cases(tmp_path) if c[0].startswith(("spectrum --scheduler tcp://127", "derive --param",
                                                             "figures --x", "spectrum --out"))][:6]
    assert len(picked) >= 4
    for label, args in picked:
        proc = subprocess.run([sys.executable, "-m", "contourkit", *map(str, args)], capture_output=True, text=True,
                              env=env, cwd=tmp_path, timeout=120)
        assert proc.returncode != 0, label
        assert len(proc.stderr.strip().splitlines()) == 1 and "Traceback" not in proc.stderr, (label, proc.stderr)


def test_reported_reproducers(tmp_path, capsys, monkeypatch):
    # the two commands of the issue that ended in tracebacks
    monkeypatch.setenv("MPLBACKEND", "Agg")
    monkeypatch.chdir(tmp_path)
    code = main(["derive", "--catalogue", "quartic_flow", "--param", "kappa=1e-300"])
    err = capsys.readouterr().err
    assert "Traceback" not in err and len(err.strip().splitlines()) <= 1
    if code != 0:
        assert err.startswith("contourkit: error: ")
    code = main(["figures", "--example", TANH, "--x", "1e300", "--out-dir", str(tmp_path / "f")])
    err = capsys.readouterr().err
    assert code != 0 and err.count("\n") == 1 and "--x" in err
