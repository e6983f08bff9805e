"""Run fingerprints: the model's content, not its name or file layout; differences named.

Behaviour checks (no source needed).
"""
import pathlib

import contourkit as ck
from contourkit.scans.fingerprint import differences, fingerprint

ROOT = pathlib.Path(__file__).resolve().parents[2]
SUPER = ROOT / "worked_examples" / "models" / "superluminal.toml"
OPTS = {"rtol": 1e-12}


def test_same_content_same_fingerprint(tmp_path):
    a = ck.load_model(SUPER)
    text = SUPER.read_text()
    other = tmp_path / "renamed.toml"
    other.write_text("# reformatted copy\n" + text.replace("name = \"superluminal flow, linear profile\"",
                                                           "name = \"another name\""))
    b = ck.load_model(other)
    assert b.name != a.name
    fa = fingerprint(a, [0.01, 0.02], method="contour", options=OPTS)
    fb = fingerprint(b, [0.01, 0.02], method="contour", options=OPTS)
    assert fa["hash"] == fb["hash"] and differences(fa, fb) == []


def test_each_part_is_named(tmp_path):
    a = ck.load_model(SUPER)
    changed = tmp_path / "lambda.toml"
    changed.write_text(SUPER.read_text().replace("Lambda = 2.5", "Lambda = 3.0"))
    b = ck.load_model(changed)
    base = fingerprint(a, [0.01, 0.02], method="contour", options=OPTS)
    cases = {"the model differs in its equation and parameters": fingerprint(b, [0.01, 0.02], method="contour",
                                                                             options=OPTS),
             "the frequency grid differs": fingerprint(a, [0.01, 0.02, 0.03], method="contour", options=OPTS),
             "the method differs": fingerprint(a, [0.01, 0.02], method="direct", options=OPTS),
             "the option rtol differs": fingerprint(a, [0.01, 0.02], method="contour", options={"rtol": 1e-8})}
    for words, fp in cases.items():
        diff = differences(base, fp)
        assert len(diff) == 1 and diff[0].startswith(words), diff
    assert "Lambda=3," in differences(base, cases["the model differs in its equation and parameters"])[0]
    old = dict(base, version="0.0.1")
    assert differences(old, base) == ["the contourkit version differs (file: 0.0.1; this run: %s)" % base["version"]]
