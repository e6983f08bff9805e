"""Tests of model files (contourkit.symbolic.modelfile.load_model).

Sources: horizon positions and surface gravities are analytic (root and slope
of the profile); the Airy symbols follow from d/dx -> i k (DLMF 9.5.4 for the
resulting exponent i k^3/3); every malformed-input check is common practice
for validating configuration files.
"""
import textwrap

import pytest
import sympy as sp

import contourkit as ck
from contourkit.errors import ContourkitError, HorizonError, InputError, ModelError, ModelFileError
from contourkit.symbolic.modelfile import example_path, load_model

K = sp.Symbol("k")

TANH_FLOW = """
[model]
name = "tanh flow"
kind = "dispersion"
equation = "(omega - v*k)**2 - k**2"
[parameters]
a = 0.1
b = 2
[profiles]
v = "-1 + a*tanh(b*(x - 3))"
"""


def write(tmp_path, text, name="model.toml"):
    p = tmp_path / name
    p.write_text(textwrap.dedent(text), encoding="utf-8")
    return p


# -- correct files -------------------------------------------------------------
def test_dispersion_file_matches_direct_model(tmp_path):
    m = load_model(write(tmp_path, TANH_FLOW))
    # analytic: v(3) = -1, v'(3) = 0.1*2, so the horizon is x = 3 and kappa = 0.2
    assert abs(m.horizon - 3.0) < 1e-12
    assert abs(m.kappa - 0.2) < 1e-12
    w, k, x, v = sp.symbols("omega k x v")
    direct = ck.HorizonModel.from_dispersion((w - v * k) ** 2 - k ** 2, omega=w, k=k, x=x,
                                             profiles={v: -1 + sp.Rational(1, 10) * sp.tanh(2 * (x - 3))})
    assert m.horizon == direct.horizon and m.kappa == direct.kappa
    assert sp.simplify(m.dispersion - direct.dispersion) == 0
    assert m.name == "tanh flow"


def test_top_level_hook():
    # the package re-exports the loader lazily (DESIGN.md public contract)
    assert ck.load_model is load_model


def test_shipped_quartic_example_matches_catalogue():
    # same model built two ways: the file and contourkit.catalogue.quartic_flow
    m = load_model(example_path("quartic_superluminal"))
    c = ck.catalogue.quartic_flow(kappa=0.05, Lambda=2.5, branch="superluminal", D=0.5)
    # analytic: v(0) = -1 and v'(0) = kappa for v = -1 + D tanh(kappa x / D)
    assert m.horizon == 0.0 and abs(m.kappa - 0.05) < 1e-12
    assert sp.simplify(m.dispersion - c.dispersion) == 0
    assert m.window == (-50.0, 50.0)


def test_airy_example_symbols():
    # analytic: y'' - x y has A = (i k)^2 = -k^2 and B = -1, so E(k) = i k^3/3 (DLMF 9.5.4)
    eq = load_model(example_path("airy.toml"))
    assert isinstance(eq, ck.ModeEquation)
    assert sp.expand(eq.A + K ** 2) == 0 and eq.B == -1


def test_ode_with_profile_matches_direct_model(tmp_path):
    # (omega + i d/dx v)(omega + i v d/dx) phi + phi'' = 0 written out, with the tanh flow
    eqn = ("-omega**2*y - 2*I*omega*v*der(y) - I*omega*der(v)*y + 2*v*der(v)*der(y)"
           " + (v**2 - 1)*der(y, 2)")
    m = load_model(write(tmp_path, f"""
        [model]
        kind = "ode"
        equation = "{eqn}"
        [profiles]
        v = "-1 + 0.1*tanh(2*(x - 3))"
        """))
    # analytic: v(3) = -1, v'(3) = 0.1*2
    assert abs(m.horizon - 3.0) < 1e-12 and abs(m.kappa - 0.2) < 1e-12
    x, w = sp.symbols("x omega")
    y, v = sp.Function("y"), sp.Function("v")
    vx = v(x)
    expr = (-w ** 2 * y(x) - 2 * sp.I * w * vx * y(x).diff(x) - sp.I * w * vx.diff(x) * y(x)
            + 2 * vx * vx.diff(x) * y(x).diff(x) + (vx ** 2 - 1) * y(x).diff(x, 2))
    direct = ck.HorizonModel.from_ode(expr, y, x, profiles={v: -1 + sp.Rational(1, 10) * sp.tanh(2 * (x - 3))},
                                      frequency=w)
    assert m.horizon == direct.horizon and m.kappa == direct.kappa


def test_ode_without_profiles_uses_omega_value(tmp_path):
    # analytic: y'' + (omega + x) y with omega = 1/2 has A = -k^2 + 1/2, B = 1
    eq = load_model(write(tmp_path, """
        [model]
        kind = "ode"
        equation = "der(y, 2) + (omega + x)*y"
        [parameters]
        omega = 0.5
        """))
    assert sp.expand(eq.A - (-K ** 2 + sp.Rational(1, 2))) == 0 and eq.B == 1


def test_horizon_between_grid_points(tmp_path):
    m = load_model(write(tmp_path, TANH_FLOW.replace("x - 3", "x - 3.01")))
    # analytic: v(3.01) = -1, v'(3.01) = 0.1*2
    assert abs(m.horizon - 3.01) < 1e-12 and abs(m.kappa - 0.2) < 1e-12


def test_horizon_position_and_window(tmp_path):
    text = TANH_FLOW + "[horizon]\nposition = 3.0\nwindow = [0, 10]\n"
    m = load_model(write(tmp_path, text))
    assert m.horizon == 3.0 and m.window == (0.0, 10.0) and abs(m.kappa - 0.2) < 1e-12


# -- malformed files -------------------------------------------------------------
MODEL = '[model]\nkind = "{kind}"\nequation = "{eq}"\n'
BAD_FILES = [
    # (file text, error class, message pattern)
    ("", ModelFileError, "the file is empty"),
    ("# only a comment\n", ModelFileError, "the file is empty"),
    ("[model\nkind = 1", ModelFileError, r"not valid TOML: .*line 1"),
    ('[model]\nkind = "ode"\nequation = der(y, 2)\n', ModelFileError, r"not valid TOML: .*line 3"),
    ("[parameters]\na = 1\n", ModelFileError, r"the \[model\] section is missing"),
    ('[model]\nkind = "ode"\n', ModelFileError, r"\[model\] has no 'equation'"),
    ('[model]\nequation = "x"\n', ModelFileError, r"\[model\] has no 'kind'"),
    (MODEL.format(kind="lagrangian", eq="x"), ModelFileError, "kind = 'lagrangian' is not known"),
    ('[model]\nkind = "ode"\nequation = 5\n', ModelFileError, "equation must be a quoted string, got the number 5"),
    ('[model]\nkind = "ode"\nequation = "der(y,2) - x*y"\nauthor = "me"\n', ModelFileError,
     r"unknown key in \[model\]: 'author'; the allowed ones are name, kind, equation, description"),
    (MODEL.format(kind="ode", eq="der(y,2) - x*y") + "[paramters]\na = 1\n", ModelFileError,
     r"unknown section 'paramters' \(did you mean '\[parameters\]'\?\)"),
    ('equation = "x"\n' + MODEL.format(kind="ode", eq="x"), ModelFileError,
     r"the key 'equation' is outside any section \(it belongs under \[model\]\)"),
    (MODEL.format(kind="ode", eq="der(y,2) - a*x*y") + '[parameters]\na = "0.5"\n', ModelFileError,
     r"\[parameters\] a must be a number, got the string '0.5'"),
    (MODEL.format(kind="ode", eq="der(y,2) - a*x*y") + "[parameters]\na = [1, 2]\n", ModelFileError,
     r"\[parameters\] a must be a number, got a list"),
    (MODEL.format(kind="ode", eq="der(y,2) - a*x*y") + "[parameters]\na = true\n", ModelFileError,
     r"\[parameters\] a must be a number, got the boolean true"),
    (MODEL.format(kind="ode", eq="der(y,2) - a*x*y") + "[parameters]\na = nan\n", ModelFileError,
     "must be a finite number"),
    (MODEL.format(kind="ode", eq="der(y,2) - a*x*y") + "[parameters.a]\nb = 1\n", ModelFileError,
     "must be a number, got a table"),
    (MODEL.format(kind="dispersion", eq="(omega - v*k)**2 - k**2") + '[parameters]\nx = 1\n', ModelFileError,
     "the parameter name 'x' is reserved"),
    (MODEL.format(kind="dispersion", eq="(omega - v*k)**2 - k**2") + '[parameters]\npi = 3\n', ModelFileError,
     "the parameter name 'pi' is reserved"),
    (MODEL.format(kind="dispersion", eq="(omega - v*k)**2 - k**2") + '[parameters]\nomega = 0.1\n',
     ModelFileError, "omega: the frequency stays symbolic"),
    (MODEL.format(kind="ode", eq="der(y,2)") + '[parameters]\nlambda = 1\n', ModelFileError,
     "not Python keywords"),
    (MODEL.format(kind="dispersion", eq="(omega - v*k)**2 - k**2") + '[profiles]\nv = "-1 + kappa*x + k"\n'
     '[parameters]\nkappa = 0.1\n', ModelFileError,
     r"\[profiles\] v \(a profile may use only x and the parameters\): unknown name 'k'; the known names are "
     r"kappa, x"),
    (MODEL.format(kind="dispersion", eq="(omega - v*k)**2 - k**2") + '[profiles]\nv = -1\n', ModelFileError,
     r"\[profiles\] v must be a quoted expression"),
    (MODEL.format(kind="ode", eq="der(y, 2) - x*y**2"), ModelError, "not linear in y"),
    (MODEL.format(kind="ode", eq="der(y, 2) - x**2*y"), ModelError, "of degree 2 in x"),
    (MODEL.format(kind="ode", eq="der(y, 2) - c*x*y"), ModelFileError,
     r"\[model\] equation: unknown name 'c'; the known names are omega, x, y"),
    (MODEL.format(kind="ode", eq="der(y, 2) - os.system('ls')*y"), ModelFileError,
     r"\[model\] equation: attribute access 'os.system' is not allowed"),
    (MODEL.format(kind="ode", eq="__import__('os')"), ModelFileError, "call of '__import__' is not allowed"),
    (MODEL.format(kind="dispersion", eq="k**2 - 2**99999"), ModelFileError, "too large"),
    (MODEL.format(kind="ode", eq="der(y, 2) - x**n*y") + "[parameters]\nn = 1000\n", ModelFileError,
     "the exponent of x\\*\\*n is 1000 with the parameters"),
    (MODEL.format(kind="ode", eq="x" * 3000), ModelFileError, "3000 characters"),
    (MODEL.format(kind="ode", eq="der(y, 2) + omega*y"), ModelFileError,
     "the equation uses omega; .* give it a value in \\[parameters\\]"),
    (MODEL.format(kind="ode", eq="der(y, 2) - x*y") + "[horizon]\nposition = 0.0\n", ModelFileError,
     r"\[horizon\] applies to horizon models only"),
    (TANH_FLOW + "[horizon]\nwindow = [10, 0]\n", ModelFileError, "needs a < b"),
    (TANH_FLOW + "[horizon]\nwindow = 5\n", ModelFileError, "window must be a list of two numbers"),
    (TANH_FLOW + "[horizon]\nwindow = [-10, 0]\n", HorizonError, "no horizon in the window"),
    (TANH_FLOW.replace("[parameters]", "[parameters]\nv = 1"), ModelFileError,
     "'v' is both a parameter and a profile"),
    (MODEL.format(kind="dispersion", eq="omega - sqrt(k**2 + x)"), ModelFileError,
     "k appears inside 'sqrt\\(k\\*\\*2 \\+ x\\)'; a dispersion relation must be a polynomial in k and omega"),
    (MODEL.format(kind="ode", eq="der(y, 2) - tanh(y)"), ModelFileError,
     r"y\(x\) appears inside 'tanh\(y\(x\)\)'; the equation must be linear in y"),
    (MODEL.format(kind="dispersion", eq="(omega - v*k)**2 - k**2") + '[profiles]\nv = "-0.5 + 0.1*tanh(x)"\n',
     HorizonError, "no horizon in the window"),
    (MODEL.format(kind="ode", eq="der(y, 2) - tanh(exp(sin(x)))*y"), ModelFileError,
     "nests functions more than 2 deep"),
]


@pytest.mark.parametrize("text, error, message", BAD_FILES, ids=[m[:40] for _, _, m in BAD_FILES])
def test_malformed_files(tmp_path, text, error, message):
    # common practice: every malformed model file is refused with a message naming the problem
    with pytest.raises(error, match=message) as info:
        load_model(write(tmp_path, text))
    assert isinstance(info.value, ContourkitError)


def test_file_errors_name_the_path(tmp_path):
    # common practice: a missing file, a folder, non-UTF-8 bytes and oversized files are refused
    missing = tmp_path / "nope.toml"
    with pytest.raises(ModelFileError, match=f"no model file at {missing}"):
        load_model(missing)
    with pytest.raises(ModelFileError, match="is not a file"):
        load_model(tmp_path)
    bad = tmp_path / "latin1.toml"
    bad.write_bytes(b'[model]\nname = "caf\xe9"\n')
    with pytest.raises(ModelFileError, match="latin1.toml: the file is not UTF-8"):
        load_model(bad)
    big = write(tmp_path, "# " + "x" * 200_000 + "\n", name="big.toml")
    with pytest.raises(ModelFileError, match="more than the 100000"):
        load_model(big)
    with pytest.raises(InputError, match="path must be a string"):
        load_model(42)
    with pytest.raises(ModelFileError, match="the shipped examples are airy, quartic_superluminal"):
        example_path("bessel")


def test_payload_in_file_runs_no_code(tmp_path):
    # common practice: an injection payload inside a model file is refused without side effects
    target = tmp_path / "ck_pwned"
    p = write(tmp_path, MODEL.format(kind="ode", eq=f"__import__('os').system('touch {target}')"))
    with pytest.raises(ModelFileError, match="not allowed"):
        load_model(p)
    assert not target.exists()


hypothesis = pytest.importorskip("hypothesis")
from hypothesis import given, settings, strategies as st  # noqa: E402


@settings(max_examples=150, deadline=None, derandomize=True)
@given(st.text(max_size=200))
def test_random_files_only_contourkit_errors(tmp_path_factory, text):
    # common practice (fuzzing): junk files raise only contourkit errors, never a raw traceback
    p = tmp_path_factory.mktemp("fuzz") / "m.toml"
    p.write_text(text, encoding="utf-8", errors="surrogatepass")
    try:
        load_model(p)
    except ContourkitError:
        pass


@settings(max_examples=150, deadline=None, derandomize=True)
@given(st.sampled_from(["x", "der(y)", "der(y, 2)", "x*y", "y", "omega", "a", "k", "tanh(x)", "1/x"]),
       st.sampled_from(["+", "-", "*", "/", "**"]),
       st.sampled_from(["x", "der(y)", "y", "2", "a", "0", "omega", "x*der(y, 3)"]))
def test_random_ode_equations_only_contourkit_errors(tmp_path_factory, left, op, right):
    # common practice (fuzzing near the grammar): ode files either load or raise a contourkit error
    p = tmp_path_factory.mktemp("fuzz") / "m.toml"
    p.write_text(MODEL.format(kind="ode", eq=f"{left} {op} {right}") + "[parameters]\na = 0.5\nomega = 0.1\n")
    try:
        load_model(p)
    except ContourkitError:
        pass


def test_horizonless_file_loads(tmp_path):
    """[horizon] position = "none" (docs/tutorial.md): a horizonless flow, with its turning points."""
    import pathlib
    m = load_model(pathlib.Path(__file__).resolve().parents[2] / "worked_examples" / "models" / "counter_current.toml")
    assert m.horizon is None and m.kappa is None
    tps = m.turning_points(0.27)
    # by hand: D = (0.27 + 0.35 k)^2 - k^2 + k^4 and dD/dk both vanish at k = 0.6 (v = -0.35, inside the profile)
    assert len(tps) == 1 and abs(tps[0].k - 0.6) < 1e-9
