"""Bad input, across the public entry points: every case ends in a ContourkitError or in a
correct result; never in a foreign exception, NaN, a hang or a wrong result with success=True.

Each case is (name, call, check): ``check`` is None when the call must be refused with a
ContourkitError, else a function that asserts the result is correct (sources named there).
"""
import math
import warnings

import numpy as np
import pytest
import sympy as sp

import contourkit as ck
from contourkit.catalogue import nondispersive_flow, quartic_flow

X = sp.Symbol("x")
Y = sp.Function("y")
W, K = sp.symbols("omega k")
AIRY = ck.ModeEquation.from_coefficients([0, 0, 1], [-1, 0, 0])     # y'' - x y = 0


def _airy_rep():
    return AIRY.fourier()


def _model_file(tmp_path, text, name="m.toml"):
    p = tmp_path / name
    p.write_text(text)
    return p


FLOW_FILE = ('[model]\nkind = "dispersion"\nequation = "(omega - v*k)**2 - k**2 - k**4/L**2"\n'
             '[parameters]\nkap = 0.05\nL = 2.5\n[profiles]\nv = "{v}"\n{horizon}')


def _flow_file(tmp_path, v="-1 + kap*x", horizon=""):
    return _model_file(tmp_path, FLOW_FILE.format(v=v, horizon=horizon))


def _no_nan(obj):
    for name in ("thermal_ratio", "occupation", "unitarity_residual", "error_estimate"):
        v = getattr(obj, name, None)
        if v is not None:
            assert math.isfinite(float(v)), name


def _thermal(res):
    """Non-dispersive horizon: |beta/alpha|^2 = exp(-2 pi omega/kappa) exactly (Hawking 1975)."""
    assert res.success
    assert abs(res.thermal_ratio / math.exp(-2 * math.pi * res.omega / res.kappa) - 1) < 1e-10


def _no_channel(res):
    """Above the cut-off (omega_max closed form, REFERENCES.md): no Hawking channel."""
    assert res.hawking_channel is False and res.thermal_ratio == 0.0 and res.effective_temperature is None


def _airy_value(v):
    """Ai(-10) (DLMF 9.5.4 with the real-axis form 2 pi Ai(x); reference scipy.special.airy)."""
    from scipy.special import airy
    assert abs(complex(v) / (2 * math.pi * airy(-10.0)[0]) - 1) < 1e-8


CASES = [
    # -- equations -----------------------------------------------------------------------
    ("nonlinear in y", lambda tp: ck.ModeEquation.from_ode(Y(X).diff(X, 2) + Y(X) ** 2, Y, X), None),
    ("nan coefficient", lambda tp: ck.ModeEquation.from_ode(sp.nan * X * Y(X) + Y(X).diff(X, 2), Y, X), None),
    ("infinite coefficient", lambda tp: ck.ModeEquation.from_ode(sp.oo * Y(X) + Y(X).diff(X, 2), Y, X), None),
    ("source term", lambda tp: ck.ModeEquation.from_ode(Y(X).diff(X, 2) + 1, Y, X), None),
    ("x squared coefficient", lambda tp: ck.ModeEquation.from_ode(Y(X).diff(X, 2) - X ** 2 * Y(X), Y, X), None),
    ("shifted argument", lambda tp: ck.ModeEquation.from_ode(Y(X).diff(X, 2) - Y(2 * X), Y, X), None),
    ("equation as a string", lambda tp: ck.ModeEquation.from_ode("y'' - x y", Y, X), None),
    ("coefficients nan", lambda tp: ck.ModeEquation.from_coefficients([0, 0, 1], [float("nan"), 0, 0]), None),
    ("coefficients inf", lambda tp: ck.ModeEquation.from_coefficients([0, 0, float("inf")], [-1, 0, 0]), None),
    ("coefficients strings", lambda tp: ck.ModeEquation.from_coefficients(["a", 0, 1], [-1, 0, 0]), None),
    ("coefficients empty", lambda tp: ck.ModeEquation.from_coefficients([], []), None),
    # -- horizon models ------------------------------------------------------------------
    ("no omega k term", lambda tp: ck.HorizonModel.from_dispersion(K ** 2 - X, omega=W, k=K, x=X), None),
    ("undefined symbol", lambda tp: ck.HorizonModel.from_dispersion(
        (W + K) ** 2 - sp.Symbol("c") * K ** 2 * X, omega=W, k=K, x=X), None),
    ("not polynomial in k", lambda tp: ck.HorizonModel.from_dispersion(
        (W + K) ** 2 - K ** 2 + X / K, omega=W, k=K, x=X), None),
    ("dispersion as a string", lambda tp: ck.HorizonModel.from_dispersion("omega**2 - k**2", omega=W, k=K, x=X),
     None),
    ("symbol given as a string", lambda tp: ck.HorizonModel.from_dispersion(W ** 2 - K ** 2, omega="w", k=K, x=X),
     None),
    ("nan parameter", lambda tp: ck.HorizonModel.from_dispersion(
        (W - (-1 + sp.Symbol("a") * X) * K) ** 2 - K ** 2, omega=W, k=K, x=X,
        parameters={"a": float("nan")}), None),
    ("kink at the horizon", lambda tp: ck.HorizonModel.from_dispersion(
        (W - (-1 + X ** 2 / 20) * K) ** 2 - K ** 2, omega=W, k=K, x=X, horizon=0.0), None),
    ("no horizon", lambda tp: ck.HorizonModel.from_dispersion(
        (W + 2 * K + X / 1000 * 0) ** 2 - K ** 2, omega=W, k=K, x=X), None),
    # -- model files ---------------------------------------------------------------------
    ("missing file", lambda tp: ck.load_model(tp / "absent.toml"), None),
    ("not TOML", lambda tp: ck.load_model(_model_file(tp, "this is = = not toml")), None),
    ("position not a horizon", lambda tp: ck.load_model(_flow_file(tp, horizon="[horizon]\nposition = 10\n")),
     None),
    # v = -1 + kappa x reaches +1 at x = 40: a horizon of a flow towards +x, which is now supported
    # (model.orientation); its spectrum must be the thermal one, T_eff/T_H -> 1 for kappa << Lambda
    # (Unruh 1995; Corley 1998), with pseudo-unitarity (common practice)
    ("window around a v = +1 point", lambda tp: ck.load_model(
        _flow_file(tp, horizon="[horizon]\nwindow = [5, 50]\n")).scatter(0.05),
     lambda r: (r.success and abs(r.effective_temperature / r.hawking_temperature - 1) < 1e-2
                and r.unitarity_residual < 1e-10 and r.convention.flow == "+x") or pytest.fail(str(r))),
    ("kink profile", lambda tp: ck.load_model(_flow_file(tp, v="-1 + kap*sqrt(x**2)",
                                                         horizon="[horizon]\nposition = 0\n")), None),
    ("code in an expression", lambda tp: ck.load_model(_flow_file(tp, v="__import__('os').getcwd()")), None),
    ("unknown section", lambda tp: ck.load_model(_model_file(tp, '[modle]\nkind = "ode"\n')), None),
    ("parameter as a string", lambda tp: ck.load_model(_model_file(
        tp, '[model]\nkind = "dispersion"\nequation = "omega**2 - k**2"\n[parameters]\na = "1"\n')), None),
    ("huge exponent", lambda tp: ck.load_model(_flow_file(tp, v="-1 + kap*x**n").parent / "m.toml")
     if False else ck.load_model(_model_file(
         tp, FLOW_FILE.format(v="-1 + kap*x", horizon="").replace("L = 2.5", "L = 2.5\nn = 100000")
         .replace("k**4/L**2", "k**4/L**n"))), None),
    ("path of a wrong type", lambda tp: ck.load_model(123), None),
    # -- numeric edge cases --------------------------------------------------------------
    ("omega zero", lambda tp: quartic_flow().scatter(0.0), None),
    ("omega negative", lambda tp: quartic_flow().scatter(-0.1), None),
    ("omega nan", lambda tp: quartic_flow().scatter(float("nan")), None),
    ("omega inf", lambda tp: quartic_flow().scatter(float("inf")), None),
    ("omega text", lambda tp: quartic_flow().scatter("abc"), None),
    ("omega complex", lambda tp: quartic_flow().scatter(0.1j), None),
    ("dps far too large", lambda tp: quartic_flow().scatter(0.05, dps=100000), None),
    ("dps too small", lambda tp: quartic_flow().scatter(0.05, dps=3), None),
    ("dps not an integer", lambda tp: quartic_flow().scatter(0.05, dps=20.5), None),
    ("evaluate at nan", lambda tp: _airy_rep().evaluate(ck.Contour.real_axis(), float("nan")), None),
    ("evaluate negative derivative", lambda tp: _airy_rep().evaluate(ck.Contour.real_axis(), 1.0,
                                                                     derivative=-1), None),
    ("evaluate dps far too large", lambda tp: _airy_rep().evaluate(ck.Contour.real_axis(), 1.0, dps=10 ** 6),
     None),
    ("evaluate a non-contour", lambda tp: _airy_rep().evaluate("real axis", 1.0), None),
    ("contour from a valley to itself", lambda tp: ck.Contour.between(0, 0), None),
    ("loop at a regular point", lambda tp: _airy_rep().evaluate(ck.Contour.loop(3.0), 1.0), None),
    ("empty spectrum", lambda tp: quartic_flow().spectrum([]), None),
    ("spectrum of text", lambda tp: quartic_flow().spectrum("abc"), None),
    ("validity tolerance out of range", lambda tp: quartic_flow(D=0.5).scatter(0.05, validity_tol=2), None),
    ("direct solver on a linear profile", lambda tp: ck.direct.scatter(quartic_flow(), 0.05), None),
    ("direct solver at the cut-off", lambda tp: ck.direct.scatter(quartic_flow(D=0.5),
                                                                  quartic_flow(D=0.5).omega_max), None),
    ("catalogue kappa text", lambda tp: quartic_flow(kappa="a"), None),
    ("catalogue kappa nan", lambda tp: quartic_flow(kappa=float("nan")), None),
    ("catalogue D with a second horizon", lambda tp: quartic_flow(D=2.5), None),
    # -- wrong types ---------------------------------------------------------------------
    ("direct on a ModeEquation", lambda tp: ck.direct.scatter(AIRY, 0.1), None),
    ("direct on a string", lambda tp: ck.direct.scatter("quartic", 0.1), None),
    ("compare on a ModeEquation", lambda tp: ck.compare(AIRY, [0.1]), None),
    ("compare on a string", lambda tp: ck.compare("quartic", [0.1]), None),
    ("scatter on a ModeEquation", lambda tp: ck.scattering.scatter(AIRY, 0.1), None),
    ("compare options not a dict", lambda tp: ck.compare(quartic_flow(D=0.5), [0.05], contour_options=3), None),
    # -- correct results at the edges ----------------------------------------------------
    ("non-dispersive flow at a tiny frequency", lambda tp: nondispersive_flow(kappa=0.05).scatter(1e-6), _thermal),
    ("direct solver above the cut-off", lambda tp: ck.direct.scatter(quartic_flow(D=0.5), 0.6), _no_channel),
    ("contour method above the cut-off", lambda tp: quartic_flow(D=0.5).scatter(0.6), _no_channel),
    ("Airy at dps = 5", lambda tp: _airy_rep().evaluate(ck.Contour.real_axis(), -10.0, dps=5), _airy_value),
]


#: messages that must name the actual problem (issue 12, "Misleading messages"); (must contain, must not)
MESSAGES = {
    "nan coefficient": ("non-finite", "source"),
    "infinite coefficient": ("non-finite", "source"),
    "nan parameter": ("parameter a", None),
    "dps far too large": ("5000", None),
    "direct on a ModeEquation": ("horizon model", None),
    "compare on a string": ("horizon model", None),
    "position not a horizon": ("m.toml", None),
    "kink profile": ("kappa", None),
}


def test_enough_cases():
    assert len(CASES) >= 40


@pytest.mark.parametrize("name, call, check", CASES, ids=[c[0] for c in CASES])
def test_bad_input(name, call, check, tmp_path):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        if check is None:
            with pytest.raises(ck.ContourkitError) as info:
                call(tmp_path)
            msg = str(info.value)
            assert len(msg) > 20
            want, avoid = MESSAGES.get(name, (None, None))
            assert want is None or want in msg
            assert avoid is None or avoid not in msg
            assert "move x" not in msg
            if name != "no omega k term":      # that message is rewritten with the horizon orientation
                assert "array(" not in msg and "np.float64" not in msg      # no numpy reprs in messages
        else:
            res = call(tmp_path)
            _no_nan(res)
            check(res)
