"""The spectrum engine: methods, on_error, blocks followed in omega, files, resumption, progress.

Checked values: the non-dispersive thermal factor |beta/alpha|^2 =
exp(-2 pi omega/kappa) (Unruh 1981); the contour rows against single-frequency
``model.scatter`` (the same method traced afresh; agreement to the requested
accuracy) and the direct rows against ``ck.direct.scatter``; pseudo-unitarity
of every row (conservation).  Files: behaviour (byte for byte).
"""
import math

import numpy as np
import pytest

import contourkit as ck
from contourkit.scans.engine import block_length, spectrum
from contourkit.scans.table import COLUMNS, RunMismatchError, ScanError, read_run
from contourkit.scattering import spectra

KAPPA = 0.05


@pytest.fixture(scope="module")
def quartic():
    return ck.catalogue.quartic_flow(kappa=KAPPA, Lambda=2.5)


def test_model_spectrum_is_the_engine(quartic):
    from contourkit.symbolic import extensions
    assert extensions.lookup("spectrum") is spectrum
    ws = list(np.linspace(0.3, 2.0, 12) * KAPPA)
    spec = quartic.spectrum(ws, rtol=1e-10)
    assert [r["omega"] for r in spec] == ws and set(spec.rows[0]) == set(COLUMNS)
    for r in spec.rows[::5]:
        ref = quartic.scatter(r["omega"], dps=12)
        assert r["thermal_ratio"] == pytest.approx(float(ref.thermal_ratio), rel=1e-10)
        assert r["unitarity_residual"] < 1e-10
    geo = [res.extra["geometry"] for res in spec.results]
    assert geo.count("traced") == math.ceil(12 / block_length(12))     # one trace per block, followed after


def test_block_length():
    assert [block_length(n) for n in (1, 12, 40, 100, 1000)] == [8, 8, 10, 25, 64]


def test_workers_give_the_same_rows(quartic):
    ws = list(np.linspace(0.3, 2.0, 20) * KAPPA)
    a = quartic.spectrum(ws, rtol=1e-10)
    b = quartic.spectrum(ws, rtol=1e-10, workers=2)
    assert a.rows == b.rows                                  # bit for bit: blocks do not depend on workers


def test_record_keeps_the_rest(quartic, monkeypatch):
    real = spectra._scatter

    def failing(model, w, dps, keep):
        if abs(w - 0.03) < 1e-12:
            raise ck.ScatteringError("made to fail at omega = 0.03 for this test")
        return real(model, w, dps, keep)
    monkeypatch.setattr(spectra, "_scatter", failing)
    ws = [0.02, 0.03, 0.04]
    spec = quartic.spectrum(ws, on_error="record", follow=False)
    bad = spec.rows[1]
    assert bad["success"] is False and "made to fail" in bad["message"] and bad["thermal_ratio"] is None
    assert bad["hawking_temperature"] == pytest.approx(KAPPA / (2 * math.pi))
    assert spec.results[1] is None and math.isnan(spec.column("thermal_ratio")[1])
    assert spec.rows[0]["success"] and spec.rows[2]["success"]
    with pytest.raises(ck.ScatteringError, match="made to fail"):
        quartic.spectrum(ws, follow=False)


def test_raise_keeps_the_rows_before(tmp_path, quartic, monkeypatch):
    real = spectra._scatter

    def failing(model, w, dps, keep):
        if w > 0.035:
            raise ck.ScatteringError("made to fail above omega = 0.035")
        return real(model, w, dps, keep)
    monkeypatch.setattr(spectra, "_scatter", failing)
    out = tmp_path / "s.csv"
    with pytest.raises(ck.ScatteringError):
        quartic.spectrum([0.02, 0.03, 0.04, 0.05], out=out, follow=False)
    assert [r["omega"] for r in read_run(out)[1]] == [0.02, 0.03]


def test_direct_method_rows():
    m = ck.catalogue.quartic_flow(kappa=KAPPA, Lambda=2.5, D=0.5)
    spec = m.spectrum([0.02, 0.05], method="direct")
    for r in spec.rows:
        ref = ck.direct.scatter(m, r["omega"])
        assert r["method"] == "direct" and r["thermal_ratio"] == pytest.approx(ref.thermal_ratio, rel=1e-12)
        assert r["unitarity_residual"] < 1e-8
    # a model the direct solver refuses: every row recorded, none raised
    lin = ck.catalogue.nondispersive_flow(kappa=KAPPA)
    rec = lin.spectrum([0.02, 0.03], method="direct", on_error="record")
    assert [r["success"] for r in rec] == [False, False] and all(r["message"] for r in rec)


def test_file_equals_memory_and_resumes_inside_a_block(tmp_path):
    m = ck.catalogue.nondispersive_flow(kappa=KAPPA)
    ws = list(np.linspace(0.005, 0.1, 20))
    ref = tmp_path / "ref.csv"
    full = m.spectrum(ws, out=ref)
    mem = m.spectrum(ws)
    assert full.rows == mem.rows and full.computed == 20
    for r in full.rows:    # Unruh 1981
        assert r["thermal_ratio"] == pytest.approx(math.exp(-2 * math.pi * r["omega"] / KAPPA), rel=1e-12)
    lines = ref.read_bytes().splitlines(keepends=True)
    for keep in (0, 3, 8, 11, 19):          # block length 8: before, inside and at block starts
        cut = tmp_path / f"cut{keep}.csv"
        cut.write_bytes(b"".join(lines[:2 + keep]) + (lines[2 + keep][:9] if keep < 20 else b""))
        again = m.spectrum(ws, out=cut)
        assert (again.resumed, again.computed) == (keep, 20 - keep)
        assert cut.read_bytes() == ref.read_bytes()


def test_refusals_name_the_difference(tmp_path, quartic):
    out = tmp_path / "s.csv"
    quartic.spectrum([0.02, 0.03], out=out, rtol=1e-8)
    other = ck.catalogue.quartic_flow(kappa=KAPPA, Lambda=3.0)
    checks = [(lambda: other.spectrum([0.02, 0.03], out=out, rtol=1e-8), "the model differs"),
              (lambda: quartic.spectrum([0.02, 0.04], out=out, rtol=1e-8), "the frequency grid differs"),
              (lambda: quartic.spectrum([0.02, 0.03], out=out, rtol=1e-9), "the option rtol differs"),
              (lambda: quartic.spectrum([0.02, 0.03], out=out, rtol=1e-8, follow=False), "the option follow")]
    before = out.read_bytes()
    for call, words in checks:
        with pytest.raises(RunMismatchError, match=words) as info:
            call()
        assert "restart" in str(info.value)
    assert out.read_bytes() == before
    fresh = other.spectrum([0.02, 0.03], out=out, rtol=1e-8, restart=True)
    assert fresh.computed == 2 and read_run(out)[0]["model"] == fresh.fingerprint["model"]
    foreign = tmp_path / "foreign.csv"
    foreign.write_text("a,b\n1,2\n")
    with pytest.raises(ScanError, match="not a contourkit spectrum table"):
        quartic.spectrum([0.02], out=foreign)


@pytest.mark.parametrize("kw", [dict(method="wkb"), dict(on_error="ignore"), dict(workers=0),
                                dict(workers=2, scheduler="tcp://127.0.0.1:1"), dict(rtol=2.0), dict(dps=0),
                                dict(follow="yes"), dict(out=3), dict(restart=1), dict(direct_options=[1])])
def test_bad_options(quartic, kw):
    with pytest.raises(ck.InputError):
        quartic.spectrum([0.02], **kw)


@pytest.mark.parametrize("ws", [[], [0.0], [-0.1], [float("nan")], ["a"]])
def test_bad_frequencies(quartic, ws):
    with pytest.raises(ck.InputError):
        quartic.spectrum(ws, follow=False)


def test_progress_line_counts(tmp_path, capsys):
    m = ck.catalogue.nondispersive_flow(kappa=KAPPA)
    out = tmp_path / "p.csv"
    m.spectrum([0.01, 0.02], out=out)
    m.spectrum([0.01, 0.02], out=out, restart=True, progress=False)
    assert capsys.readouterr().err == ""
    lines = out.read_bytes().splitlines(keepends=True)
    out.write_bytes(b"".join(lines[:3]))
    m.spectrum([0.01, 0.02], out=out, progress=True)
    err = capsys.readouterr().err
    assert "2/2" in err and "resumed=1" in err and "failed=0" in err


def test_warnings_are_noted_in_rows_and_issued_once(quartic, monkeypatch):
    import warnings
    real = spectra._scatter

    def noisy(model, w, dps, keep):
        warnings.warn("a test warning", ck.AccuracyWarning)
        return real(model, w, dps, keep)
    monkeypatch.setattr(spectra, "_scatter", noisy)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        spec = quartic.spectrum([0.02, 0.03], follow=False)
    assert all("AccuracyWarning: a test warning" in r["message"] for r in spec)
    assert [str(w.message) for w in caught if w.category is ck.AccuracyWarning] == ["a test warning"]
