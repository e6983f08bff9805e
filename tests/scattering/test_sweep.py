"""Following the near-horizon geometry in omega (sweep.py) and the extended-precision path (fastpath.py).

Checks against independent computations in the project and against
published facts:
* the frame data (singular points, exponents, polynomial part) from the
  equation derived once with omega symbolic equal those of the k-space
  representation derived at each omega (fourier.py; residues of E' at the
  zeros of B, DLMF 1.10 for the Laurent expansion, common practice);
* a followed spectrum equals a traced one (follow=False) to the requested
  accuracy; the thimble decomposition is made of integers that change only at
  Stokes lines (M. V. Berry, Proc. R. Soc. A 422 (1989) 7);
* the extended-precision S-matrix satisfies its own error bound against the
  mpmath one (first-order error analysis, N. J. Higham, Accuracy and
  Stability of Numerical Algorithms, 2002) and conserves the norm
  (pseudo-unitarity, common practice);
* |Gamma(1/2 + i y)|^2 = pi / cosh(pi y) (DLMF 5.4.4), used by the fast
  branch-point constants, against mpmath.gamma.
"""
import math
import warnings

import mpmath
import numpy as np
import pytest

import contourkit as ck
from contourkit.scattering import fastpath, smatrix as scattering, spectra, sweep

warnings.simplefilter("ignore", ck.CoalescenceWarning)

KAPPA, LAMBDA = 0.05, 2.5        # our own scenario values, kappa / Lambda = 0.02


@pytest.fixture(scope="module", params=["superluminal", "subluminal"])
def model(request):
    return ck.catalogue.quartic_flow(kappa=KAPPA, Lambda=LAMBDA, branch=request.param)


def test_frame_matches_the_kspace_representation(model):
    fam = sweep.Family(model)
    for w in (0.01, 0.07):
        rep = model.mode_equation(w).fourier()
        fr = sweep.Frame(fam, w)
        fr.order_like(rep._kj)
        assert np.max(np.abs(fr._kj - rep._kj)) < 1e-13
        assert np.max(np.abs(fr._nu - rep._nu)) < 1e-12
        assert np.max(np.abs(fr._Q - rep._Q)) < 1e-12 * np.max(np.abs(rep._Q))
        Q, kj, nu, _ = fr.mp_data(30)
        Qr, kjr, nur, _ = rep.mp_data(30)
        with mpmath.workdps(30):
            assert max(abs(a - b) for a, b in zip(kj, kjr)) < mpmath.mpf(10) ** -25
            assert max(abs(a - b) for a, b in zip(nu, nur)) < mpmath.mpf(10) ** -25
            assert max(abs(a - b) for a, b in zip(Q, Qr)) < mpmath.mpf(10) ** -25 * max(abs(c) for c in Qr)
        ef = fastpath.ExtFrame(fr)
        assert np.max(np.abs(ef.kj.astype(complex) - rep._kj)) < 1e-14
        assert np.max(np.abs(ef.nu.astype(complex) - rep._nu)) < 1e-13


def test_followed_spectrum_equals_traced(model):
    ws = np.linspace(0.1, 3.0, 30) * KAPPA
    a = model.spectrum(ws, rtol=1e-12)
    b = model.spectrum(ws, rtol=1e-12, follow=False)
    geo = [r.extra["geometry"] for r in a.results]
    assert geo[0] == "traced" and sum(g.startswith("continued") for g in geo) >= 25
    assert all(r.extra["geometry"] == "traced" for r in b.results)
    for x, y in zip(a, b):
        for key in ("thermal_ratio", "occupation", "effective_temperature"):
            assert abs(x[key] / y[key] - 1) < 1e-12
        assert x["unitarity_residual"] < 1e-20 and x["success"]
    for ra, rb in zip(a.results, b.results):
        # the same modes with the same labels; near-horizon roots where the labels were read
        for ma, mb in zip(ra.in_modes + ra.out_modes, rb.in_modes + rb.out_modes):
            assert (ma.name, ma.origin) == (mb.name, mb.origin)
            if ma.origin == "branch point":      # saddle wavenumbers depend on the position X of the reading
                assert abs(ma.k - mb.k) <= 1e-9 * max(1.0, abs(mb.k))
            na, nb = ma.data.get("near_horizon"), mb.data.get("near_horizon")
            assert (na is None) == (nb is None)
            if na is not None:
                assert abs(na["k"] - nb["k"]) <= 1e-6 * max(1.0, abs(nb["k"]))
                assert abs(na["x"] - nb["x"]) <= 1e-6 * max(1.0, abs(nb["x"]))


def test_extended_path_respects_its_bound(model):
    ws = np.linspace(0.1, 3.0, 15) * KAPPA
    fast = model.spectrum(ws, rtol=1e-8)
    arith = [r.extra.get("arithmetic") for r in fast.results]
    assert arith.count("numpy extended precision") >= 10
    for r in fast.results:
        ref = model.scatter(r.omega, dps=20)
        for key in ("thermal_ratio", "occupation"):
            err = abs(float(getattr(r, key)) / float(getattr(ref, key)) - 1)
            assert err <= max(r.error_estimate, 1e-15) and err < 1e-8
        assert r.unitarity_residual <= 1e-10
        assert r.success


def test_spectrum_keeps_the_order_given(model):
    ws = [0.06, 0.02, 0.04]
    spec = model.spectrum(ws, rtol=1e-8)
    assert [row["omega"] for row in spec] == ws
    for w, row in zip(ws, spec):
        ref = model.scatter(w)
        assert abs(row["thermal_ratio"] / ref.thermal_ratio - 1) < 1e-8


def test_large_steps_are_followed_in_substeps():
    # singular points k = 0 and k = -omega: a step from omega to 3 omega moves -omega by
    # twice their distance, so follow() halves the step until points can be matched
    m = ck.catalogue.quartic_flow(kappa=KAPPA, Lambda=LAMBDA)
    keep = {}
    scattering._scatter(m, 0.01, 8, keep)
    res, new = spectra._continued(m, sweep.Family(m), keep["state"], 0.03, 8)
    ref = m.scatter(0.03)
    assert abs(res.thermal_ratio / ref.thermal_ratio - 1) < 1e-8
    assert new["omega"] == 0.03


def test_a_state_cannot_jump_to_an_unmatched_configuration():
    # a frame whose singular points cannot be matched to the state's is refused
    m = ck.catalogue.quartic_flow(kappa=KAPPA, Lambda=LAMBDA)
    fr = sweep.Frame(sweep.Family(m), 0.02)
    with pytest.raises(sweep.Lost):
        fr.order_like(np.array([5.0 + 0j, 7.0 + 0j]))
    with pytest.raises(sweep.Lost):
        fr.order_like(np.array([0j]))


def test_follow_flag_is_checked():
    m = ck.catalogue.quartic_flow(kappa=KAPPA, Lambda=LAMBDA)
    with pytest.raises(ck.InputError, match="follow"):
        m.spectrum([0.02], follow="yes")


@pytest.mark.parametrize("y", [0.0, 0.3, 2.0, 7.5])
def test_gamma_modulus_on_the_critical_line(y):
    # DLMF 5.4.4: |Gamma(1/2 + i y)|^2 = pi / cosh(pi y), against mpmath.gamma
    with mpmath.workdps(30):
        ref = abs(mpmath.gamma(mpmath.mpf(1) / 2 + 1j * y)) ** 2
        assert abs(ref / (mpmath.pi / mpmath.cosh(mpmath.pi * y)) - 1) < mpmath.mpf(10) ** -25
    fast = float(fastpath.PI / np.cosh(fastpath.PI * np.longdouble(y)))
    assert abs(fast / float(ref) - 1) < 1e-15


def test_fast_constants_equal_mpmath_constants(model):
    # flux constants of every propagating mode: extended precision against mpmath (modes.py closed forms)
    keep = {}
    scattering._scatter(model, 0.02, 8, keep)
    fam, state = sweep.Family(model), keep["state"]
    fr, new, _ = sweep.follow(fam, state, 0.021)
    ef = fastpath.ExtFrame(fr)
    for side in new["sides"]:
        mods_mp, _ = sweep.side_constants(fr, side, state["terms"], 30)
        mods_x, _, _, bounds = fastpath.side_data(fr, ef, side, state["terms"])
        for a, b, e in zip(mods_mp, mods_x, bounds):
            if a.constant is None:
                assert b.constant is None
                continue
            with mpmath.workdps(30):
                rel = float(abs(mpmath.mpf(str(b.constant)) / a.constant - 1))
            assert rel <= 2 * e + 1e-19 and rel < 1e-16
