"""Tests of the whitelist expression parser (contourkit.symbolic.safeparse).

Every refusal test here is an input-validation check; their source is common
practice for parsers of untrusted text (whitelist the syntax, bound the sizes
before evaluating, never eval).  The values of accepted expressions are
checked against the same expressions built directly with sympy.
"""
import builtins
import sys

import pytest
import sympy as sp
import sympy.parsing.sympy_parser

from contourkit.errors import InputError, ModelFileError
from contourkit.symbolic.safeparse import MAX_LENGTH, parse_expression

x, k, w, n = sp.symbols("x k omega n")
y, v = sp.Function("y"), sp.Function("v")
SYMBOLS = {"x": x, "k": k, "omega": w, "n": n, "y": y(x), "v": v(x)}


def parse(text, **kw):
    return parse_expression(text, symbols=SYMBOLS, **kw)


# -- accepted expressions (checked against direct sympy construction) ------
@pytest.mark.parametrize("text, expected", [
    ("(omega - v*k)**2 - k**2 - k**4/n**2", (w - v(x) * k) ** 2 - k ** 2 - k ** 4 / n ** 2),
    ("-1 + 0.1*tanh(2*(x - 3))", -1 + sp.Rational(1, 10) * sp.tanh(2 * (x - 3))),
    ("der(y, 2) - x*y", y(x).diff(x, 2) - x * y(x)),
    ("der(v)*der(y) + der(y, 12)", v(x).diff(x) * y(x).diff(x) + y(x).diff(x, 12)),
    ("sech(x)**2", 1 / sp.cosh(x) ** 2),
    ("sqrt(x) + exp(-x) + log(2) + abs(x) + atan(x) + atanh(x) + asinh(x)",
     sp.sqrt(x) + sp.exp(-x) + sp.log(2) + sp.Abs(x) + sp.atan(x) + sp.atanh(x) + sp.asinh(x)),
    ("sin(x)*cos(x)/tan(x) - sinh(x) + cosh(x)", sp.sin(x) * sp.cos(x) / sp.tan(x) - sp.sinh(x) + sp.cosh(x)),
    ("E**(I*pi)", sp.Integer(-1)),
    ("x**(1/2) + x**-64 + x**(2**6)", sp.sqrt(x) + x ** -64 + x ** 64),
    ("x**n + (1 + x)**(n + 1)", x ** n + (1 + x) ** (n + 1)),
    ("+x - -x", 2 * x),
    ("sin(0) + cos(pi) + log(E)", sp.Integer(0)),
    ("1e-3*x + 1_000_000", x / 1000 + 10 ** 6),
])
def test_accepted_expressions(text, expected):
    # analytic: the same expression built with sympy; floats are read as the decimal typed
    assert sp.simplify(parse(text) - expected) == 0


def test_float_literals_are_exact_decimals():
    # common practice (and contourkit.symbolic._sym.exact): 0.1 means 1/10, not the binary double
    assert parse("0.1") == sp.Rational(1, 10)


def test_extra_functions_and_symbol_precedence():
    # common practice: the caller may widen the whitelist explicitly, never the text
    assert parse("erf(x)", functions={"erf": sp.erf}) == sp.erf(x)
    assert parse_expression("E", symbols={"E": x}) == x
    with pytest.raises(InputError, match="extra function names"):
        parse("x", functions={"sin": sp.sin})
    with pytest.raises(InputError, match="must be a sympy object"):
        parse_expression("x", symbols={"x": "x"})


# -- refusals: each names the offending piece -------------------------------
BAD = [
    ("os.system", "attribute access 'os.system' is not allowed"),
    ("().__class__", r"attribute access '\(\)\.__class__'"),
    ("x.real", "attribute access 'x.real'"),
    ("__import__('os')", "call of '__import__' is not allowed"),
    ("eval('1+1')", "call of 'eval' is not allowed"),
    ("open('/etc/passwd')", "call of 'open' is not allowed"),
    ("exec('x')", "call of 'exec'"),
    ("lambda: 1", "lambda 'lambda: 1' is not allowed"),
    ("x[0]", r"subscript \(indexing\) 'x\[0\]'"),
    ("[t for t in x]", "comprehension"),
    ("'abc'", "string literal"),
    ("True", "the constant 'True'"),
    ("2j*x", "complex literal '2j'.*2\\*I"),
    ("x^2", r"operator \^ .*\*\*"),
    ("x // 2", "operator //"),
    ("x == 1", "comparison.*lhs - \\(rhs\\)"),
    ("x = 1", "not valid syntax.*lhs - \\(rhs\\)"),
    ("x +", "not valid syntax"),
    ("foo*x", "unknown name 'foo'; the known names are k, n, omega, v, x, y, pi, E, I"),
    ("v(x)", "'v' is a name, not a function: write 'v'"),
    ("sin(x, 2)", r"sin\(\) takes exactly one argument"),
    ("sin(x=1)", "keyword argument 'x=1'"),
    ("der(x)", "der\\(\\) applies to the unknown or a profile"),
    ("der(y, 13)", "derivative order must be a whole number from 1 to 12"),
    ("der(y, n)", "derivative order must be a whole number"),
    ("der(der(y))", r"write der\(f\) or der\(f, n\)"),
    ("2**99999", r"the power '2\*\*99999' is too large \(exponent 99999\)"),
    ("x**(10**10)", r"too large \(exponent 10000000000\)"),
    ("x**(10**9)", "too large"),
    ("x**(n*100)", "too large"),
    ("x**65", "too large"),
    ("(x**64)**64", "could reach degree 4096"),
    ("(((2**64)**64)**64)**64", "could reach degree"),
    ("(x + k + omega + n)**64", "could give up to 47905 terms"),
    ("1e7*x", "larger than 1e\\+06 in magnitude"),
    ("x**(0**-1)", "division by zero"),
    ("1e400", "non-finite number"),
    ("sqrt(tanh(exp(x)))", "nests functions more than 2 deep"),
    ("1/0", "infinite or undefined"),
    ("log(0)", "infinite or undefined"),
    ("x" * (MAX_LENGTH + 1), f"{MAX_LENGTH + 1} characters, more than the {MAX_LENGTH} allowed"),
    ("(" * 120 + "x" + ")" * 120, "nests brackets 120 deep"),
    ("-" * 150 + "x", "nested more than 100 levels"),
    ("+".join(["x"] * 600), "nested more than 100 levels"),
    ("ω*x", "character 'ω' at position 1 is not allowed"),
    ("x\x00", "character"),
    ("   ", "the expression is empty"),
]


@pytest.mark.parametrize("text, message", BAD, ids=[b[0][:30] for b in BAD])
def test_refusals_name_the_problem(text, message):
    # common practice: whitelist syntax, bounded sizes, refusal names the piece and the fix
    with pytest.raises(ModelFileError, match=message):
        parse(text)


def test_refusal_says_what_is_allowed():
    # common practice: the message says how to fix it (the whitelist)
    with pytest.raises(ModelFileError, match=r"use only numbers, the names .*x.*\+ - \* / \*\* and the "
                                             r"functions abs, .*tanh, der"):
        parse("os.system")


def test_no_code_runs(tmp_path):
    # common practice: a classic injection payload is refused and has no side effect
    target = tmp_path / "ck_pwned"
    payloads = [f"__import__('os').system('touch {target}')",
                f"().__class__.__base__.__subclasses__()[0]('touch {target}')",
                f"open('{target}', 'w').write('x')"]
    for text in payloads:
        with pytest.raises(ModelFileError, match="not allowed"):
            parse(text)
    assert not target.exists()


def test_no_eval_exec_or_sympify_on_text(monkeypatch):
    # common practice: the parser must not hand text to eval/exec/sympify/parse_expr
    def forbidden(*args, **kwargs):
        raise AssertionError("forbidden call during parse_expression")

    sympify_module = sys.modules["sympy.core.sympify"]
    real_sympify = sympify_module.sympify

    def sympify_no_text(a, *args, **kwargs):   # sympy itself sympifies objects internally
        if isinstance(a, str):
            raise AssertionError("sympify called on a string")
        return real_sympify(a, *args, **kwargs)

    monkeypatch.setattr(builtins, "eval", forbidden)
    monkeypatch.setattr(builtins, "exec", forbidden)
    monkeypatch.setattr(sp, "sympify", forbidden)
    monkeypatch.setattr(sympify_module, "sympify", sympify_no_text)
    monkeypatch.setattr(sympy.parsing.sympy_parser, "parse_expr", forbidden)
    monkeypatch.setattr(sp, "parse_expr", forbidden, raising=False)
    e = parse("(omega - v*k)**2 - k**2 - 0.25*k**4 + der(y, 2) + sech(x)**2 + pi*I")
    assert e.has(k, w, x)


# -- property test: junk never raises anything but ModelFileError -------------
hypothesis = pytest.importorskip("hypothesis")
from hypothesis import given, settings, strategies as st  # noqa: E402

TOKENS = ["x", "k", "omega", "y", "v", "n", "pi", "I", "E", "1", "2", "0", "64", "0.5", "1e6", "(", ")",
          "+", "-", "*", "/", "**", ",", "der(", "sqrt(", "log(", "exp(", "tanh(", "sech(", "abs(",
          "atanh(", "tan(", ".", "[", "]", "'", "=", "lambda", ":", " "]


@settings(max_examples=300, deadline=None, derandomize=True)
@given(st.text(max_size=80))
def test_random_text_only_modelfileerror(text):
    # common practice (fuzzing): any input either parses or raises ModelFileError
    try:
        assert isinstance(parse(text), sp.Expr)
    except ModelFileError:
        pass


@settings(max_examples=500, deadline=None, derandomize=True)
@given(st.lists(st.sampled_from(TOKENS), max_size=30))
def test_random_token_soup_only_modelfileerror(tokens):
    # common practice (fuzzing near the grammar, where the interesting cases are)
    try:
        assert isinstance(parse("".join(tokens)), sp.Expr)
    except ModelFileError:
        pass
