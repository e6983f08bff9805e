"""Whitelist parser for the expressions in model files: text to sympy, without eval.

The text is parsed with :mod:`ast` and every node is checked against a short
whitelist before any sympy object is built: numbers, known names, unary + and
-, the binary operators ``+ - * / **``, calls of a fixed set of elementary
functions, and ``der(f)`` / ``der(f, n)`` for the n-th x-derivative of an
unknown or profile function.  Sizes are bounded before anything is evaluated
(length, nesting depth, node count, literals, exponents, degree and the number
of terms an expansion could produce), so a hostile or mistyped expression is
refused quickly with a :class:`~contourkit.errors.ModelFileError` that names
the offending piece.  ``eval``, ``exec``, ``sympify`` and ``parse_expr`` are
never called on the text.
"""
import ast
import math
import types
from fractions import Fraction

import sympy as sp

from ..errors import InputError, ModelFileError

MAX_LENGTH = 2000        # characters of one expression
MAX_DEPTH = 100          # nesting depth of the syntax tree (and of brackets)
MAX_NODES = 1000         # syntax-tree nodes
MAX_LITERAL = 10 ** 6    # |number literal|
MAX_EXPONENT = 64        # |b| in a ** b
MAX_DEGREE = 128         # bound on polynomial degree / size growth of the result
MAX_TERMS = 10_000       # bound on the number of terms a full expansion could give
MAX_DERIVATIVE = 12      # n in der(f, n)
MAX_NESTING = 2          # functions inside functions (sympy's own simplification of deeper nests is slow)

FUNCTIONS = types.MappingProxyType({
    "sqrt": sp.sqrt, "exp": sp.exp, "log": sp.log, "sin": sp.sin, "cos": sp.cos,
    "tan": sp.tan, "sinh": sp.sinh, "cosh": sp.cosh, "tanh": sp.tanh, "atan": sp.atan,
    "atanh": sp.atanh, "asinh": sp.asinh, "abs": sp.Abs,
    "sech": lambda a, evaluate=True: 1 / sp.cosh(a, evaluate=evaluate),
})
CONSTANTS = types.MappingProxyType({"pi": sp.pi, "E": sp.E, "I": sp.I})

_OPERATORS = frozenset({ast.Add, ast.Sub, ast.Mult, ast.Div, ast.Pow})
_REFUSED = {  # node type -> how to call it in a message
    ast.Attribute: "attribute access", ast.Subscript: "subscript (indexing)",
    ast.Lambda: "lambda", ast.ListComp: "comprehension", ast.SetComp: "comprehension",
    ast.DictComp: "comprehension", ast.GeneratorExp: "generator expression",
    ast.Compare: "comparison", ast.BoolOp: "and/or", ast.IfExp: "conditional expression",
    ast.Tuple: "tuple", ast.List: "list", ast.Set: "set", ast.Dict: "dict",
    ast.NamedExpr: "assignment expression (:=)", ast.JoinedStr: "f-string",
    ast.Starred: "starred argument", ast.Await: "await", ast.Yield: "yield",
    ast.YieldFrom: "yield", ast.Slice: "slice",
}
_HINTS = {
    ast.Compare: "; write an equation 'lhs = rhs' as the single expression lhs - (rhs)",
    ast.BitXor: "; powers are written with **, as in k**4",
}


def _apply(op, a, b):
    if op is ast.Add:
        return a + b
    if op is ast.Sub:
        return a - b
    if op is ast.Mult:
        return a * b
    if op is ast.Div:
        return a / b
    return a ** b


class _Parser:
    """One parse: the text, the allowed names and functions, and the two passes."""

    def __init__(self, text, symbols, functions):
        self.text = text
        self.symbols = symbols
        self.functions = functions
        self.nesting = 0

    # -- messages -----------------------------------------------------
    def piece(self, node):
        seg = ast.get_source_segment(self.text, node) or type(node).__name__
        seg = " ".join(seg.split())
        return seg if len(seg) <= 60 else seg[:57] + "..."

    def allowed(self):
        names = ", ".join(sorted(self.symbols) + list(CONSTANTS))
        funcs = ", ".join(sorted(self.functions) + ["der"])
        return (f"use only numbers, the names {names}, + - * / ** and the functions {funcs}")

    def refuse(self, what, node, hint=""):
        raise ModelFileError(f"{what} '{self.piece(node)}' is not allowed in expressions{hint}; "
                             f"{self.allowed()}")

    # -- pass 1: checks, no sympy -------------------------------------
    def literal(self, node):
        v = node.value
        if isinstance(v, bool) or v is None or v is Ellipsis:
            self.refuse("the constant", node)
        if isinstance(v, (str, bytes)):
            self.refuse("string literal", node, "; write the expression without quotes")
        if isinstance(v, complex):
            self.refuse("complex literal", node, f"; write {v.imag:g}*I instead")
        if isinstance(v, float) and not math.isfinite(v):
            self.refuse("non-finite number", node)
        if not isinstance(v, (int, float)):  # pragma: no cover - Python has no other literals
            self.refuse("literal", node)
        if abs(v) > MAX_LITERAL:
            raise ModelFileError(f"the number {self.piece(node)} is larger than {MAX_LITERAL:.0e} in magnitude; "
                                 f"scale it into a parameter, e.g. write L*1e-3 with L in [parameters]")
        return Fraction(v) if isinstance(v, int) else Fraction(repr(v))

    def numeric(self, node):
        """Exact value of a literal-only exponent (numbers, + - * / **), or None."""
        if isinstance(node, ast.Constant):
            return self.literal(node)
        if isinstance(node, ast.UnaryOp) and isinstance(node.op, (ast.UAdd, ast.USub)):
            v = self.numeric(node.operand)
            return None if v is None else (-v if isinstance(node.op, ast.USub) else v)
        if isinstance(node, ast.BinOp) and type(node.op) in _OPERATORS:
            a, b = self.numeric(node.left), self.numeric(node.right)
            if a is None or b is None:
                return None
            op = type(node.op)
            if b == 0 and op is ast.Div or a == 0 and op is ast.Pow and b < 0:
                raise ModelFileError(f"division by zero in '{self.piece(node)}'")
            if op is ast.Pow and (b.denominator != 1 or abs(b) > MAX_EXPONENT):
                self.too_big(node, b)
            v = _apply(op, a, int(b) if op is ast.Pow else b)
            if max(v.numerator.bit_length(), v.denominator.bit_length()) > 4096:
                self.too_big(node, None)
            return v
        return None

    def too_big(self, node, b):
        size = "" if b is None else f" (exponent {b})"
        raise ModelFileError(f"the power '{self.piece(node)}' is too large{size}; exponents must be numbers "
                             f"with |b| <= {MAX_EXPONENT}, or expressions in parameters without further powers")

    def check(self, node):
        """Check `node` (depth already bounded); return (degree bound, term-count bound)."""
        if isinstance(node, ast.Constant):
            self.literal(node)
            return 1, 1
        if isinstance(node, ast.Name):
            if node.id not in self.symbols and node.id not in CONSTANTS:
                known = ", ".join(sorted(self.symbols) + list(CONSTANTS))
                raise ModelFileError(f"unknown name '{node.id}'; the known names are {known} "
                                     f"(parameters must be listed in [parameters], profiles in [profiles])")
            return 1, 1
        if isinstance(node, ast.UnaryOp):
            if not isinstance(node.op, (ast.UAdd, ast.USub)):
                self.refuse("the operator " + {ast.Not: "not", ast.Invert: "~"}[type(node.op)], node)
            return self.check(node.operand)
        if isinstance(node, ast.BinOp):
            return self.limit(node, self.binop(node))
        if isinstance(node, ast.Call):
            return self.limit(node, self.call(node))
        self.refuse(_REFUSED.get(type(node), f"the construct {type(node).__name__}"), node,
                    _HINTS.get(type(node), ""))

    def binop(self, node):
        op = type(node.op)
        if op not in _OPERATORS:
            self.refuse("the operator " + {ast.FloorDiv: "//", ast.Mod: "%", ast.MatMult: "@",
                                           ast.BitXor: "^", ast.BitAnd: "&", ast.BitOr: "|",
                                           ast.LShift: "<<", ast.RShift: ">>"}[op], node,
                        _HINTS.get(op, ""))
        ga, ta = self.check(node.left)
        if op is ast.Pow:
            n = self.exponent(node)
            return ga * n, (math.comb(n + ta - 1, n) if ta > 1 else 1)
        gb, tb = self.check(node.right)
        if op in (ast.Add, ast.Sub):
            return max(ga, gb), ta + tb
        return ga + gb, ta * tb

    def exponent(self, node):
        """Check the exponent of a power; return its size bound n >= 1."""
        b = self.numeric(node.right)
        if b is not None:
            if abs(b) > MAX_EXPONENT:
                self.too_big(node, b)
            return max(1, math.ceil(abs(b)))
        for sub in ast.walk(node.right):
            big = isinstance(sub, ast.Constant) and isinstance(sub.value, (int, float)) \
                and not isinstance(sub.value, bool) and abs(sub.value) > MAX_EXPONENT
            if (isinstance(sub, ast.BinOp) and isinstance(sub.op, ast.Pow)) or big:
                self.too_big(node, None)
        self.check(node.right)
        return MAX_EXPONENT

    def call(self, node):
        f = node.func
        if not isinstance(f, ast.Name):
            self.refuse("attribute access" if isinstance(f, ast.Attribute) else "call of", f)
        if node.keywords:
            self.refuse("keyword argument", node.keywords[0], " (only positional arguments)")
        for a in node.args:
            if isinstance(a, ast.Starred):
                self.refuse("starred argument", a)
        if f.id == "der":
            self.derivative(node)
            return 1, 1
        if f.id not in self.functions:
            if f.id in self.symbols:
                raise ModelFileError(f"'{f.id}' is a name, not a function: write '{f.id}' for {f.id}(x) "
                                     f"and der({f.id}) for its derivative, not '{self.piece(node)}'")
            self.refuse("call of", f, f" (the function '{f.id}' is not on the whitelist)")
        if not node.args or (f.id in FUNCTIONS and len(node.args) != 1):
            raise ModelFileError(f"'{self.piece(node)}': {f.id}() takes exactly one argument")
        self.nesting += 1
        if self.nesting > MAX_NESTING:
            raise ModelFileError(f"'{self.piece(node)}' nests functions more than {MAX_NESTING} deep; "
                                 f"write the inner part as a profile or simplify it")
        bounds = [self.check(a) for a in node.args]
        self.nesting -= 1
        return max(g for g, _ in bounds), 1

    def derivative(self, node):
        args = node.args
        if not 1 <= len(args) <= 2 or not isinstance(args[0], ast.Name):
            raise ModelFileError(f"'{self.piece(node)}': write der(f) or der(f, n) with f the name of the "
                                 f"unknown or of a profile and n a whole number from 1 to {MAX_DERIVATIVE}")
        target = self.symbols.get(args[0].id)
        if not (isinstance(target, sp.core.function.AppliedUndef) and len(target.args) == 1
                and isinstance(target.args[0], sp.Symbol)):
            raise ModelFileError(f"'{self.piece(node)}': der() applies to the unknown or a profile function "
                                 f"of x, and '{args[0].id}' is not one here")
        if len(args) == 2:
            n = args[1]
            ok = isinstance(n, ast.Constant) and type(n.value) is int and 1 <= n.value <= MAX_DERIVATIVE
            if not ok:
                raise ModelFileError(f"'{self.piece(node)}': the derivative order must be a whole number "
                                     f"from 1 to {MAX_DERIVATIVE}, written as a literal")

    def limit(self, node, bounds):
        g, t = bounds
        if g > MAX_DEGREE:
            raise ModelFileError(f"'{self.piece(node)}' could reach degree {g}, more than the {MAX_DEGREE} "
                                 f"allowed; use smaller exponents")
        if t > MAX_TERMS:
            raise ModelFileError(f"expanding '{self.piece(node)}' could give up to {t} terms, more than the "
                                 f"{MAX_TERMS} allowed; use fewer terms or smaller exponents")
        return bounds

    # -- pass 2: build sympy (only after pass 1 accepted everything) --
    def build(self, node):
        if isinstance(node, ast.Constant):
            v = self.literal(node)
            return sp.Rational(v.numerator, v.denominator)
        if isinstance(node, ast.Name):
            return self.symbols[node.id] if node.id in self.symbols else CONSTANTS[node.id]
        if isinstance(node, ast.UnaryOp):
            v = self.build(node.operand)
            return -v if isinstance(node.op, ast.USub) else v
        if isinstance(node, ast.BinOp):
            a = self.build(node.left)
            op = type(node.op)
            if op is ast.Pow:
                b = self.numeric(node.right)
                b = sp.Rational(b.numerator, b.denominator) if b is not None else self.build(node.right)
                return a ** b
            return _apply(op, a, self.build(node.right))
        name = node.func.id
        if name == "der":
            f = self.symbols[node.args[0].id]
            n = node.args[1].value if len(node.args) == 2 else 1
            return sp.Derivative(f, (f.args[0], n))
        args = [self.build(a) for a in node.args]
        if name in FUNCTIONS and not all(a.is_number for a in args):
            # sympy's automatic simplification of symbolic arguments has no cost bound; keep it for later
            return FUNCTIONS[name](*args, evaluate=False)
        return self.functions[name](*args)


def _check_tables(symbols, functions):
    for name, value in symbols.items():
        if not (isinstance(name, str) and name.isidentifier()) or name == "der":
            raise InputError(f"symbol names must be identifiers other than 'der', got {name!r}")
        if not isinstance(value, sp.Basic):
            raise InputError(f"symbols[{name!r}] must be a sympy object, got {type(value).__name__}")
    extra = dict(functions or {})
    for name, f in extra.items():
        if not (isinstance(name, str) and name.isidentifier()) or name == "der" or name in FUNCTIONS:
            raise InputError(f"extra function names must be new identifiers, got {name!r}")
        if not callable(f):
            raise InputError(f"functions[{name!r}] must be callable")
    return {**FUNCTIONS, **extra}


def _scan_text(text):
    if not isinstance(text, str):
        raise ModelFileError(f"an expression must be a string, got {type(text).__name__}")
    if not text.strip():
        raise ModelFileError("the expression is empty; write it as a quoted string, e.g. \"-1 + kappa*x\"")
    if len(text) > MAX_LENGTH:
        raise ModelFileError(f"the expression has {len(text)} characters, more than the {MAX_LENGTH} allowed; "
                             f"split it into profiles or parameters")
    for i, c in enumerate(text):
        if not (c.isascii() and (c.isprintable() or c in "\t\n\r")):
            raise ModelFileError(f"the character {c!r} at position {i + 1} is not allowed; expressions "
                                 f"use plain ASCII (write omega, not the Greek letter)")
    level = deepest = 0
    for c in text:
        level += (c in "([{") - (c in ")]}")
        deepest = max(deepest, level)
    if deepest > MAX_DEPTH:
        raise ModelFileError(f"the expression nests brackets {deepest} deep, more than the {MAX_DEPTH} allowed")


def _check_size(root):
    """Bound the node count and depth of the tree, without recursion."""
    count, stack = 0, [(root, 1)]
    while stack:
        node, depth = stack.pop()
        count += 1
        if count > MAX_NODES:
            raise ModelFileError(f"the expression has more than {MAX_NODES} elements; split it into profiles")
        if depth > MAX_DEPTH:
            raise ModelFileError(f"the expression is nested more than {MAX_DEPTH} levels deep; "
                                 f"simplify it or split it into profiles")
        stack.extend((c, depth + 1) for c in ast.iter_child_nodes(node) if isinstance(c, ast.expr))


def parse_expression(text, *, symbols, functions=None):
    """Parse an expression from a model file into sympy, by whitelist.

    Parameters
    ----------
    text : str
        The expression, e.g. ``"(omega - v*k)**2 - k**2"`` or ``"der(y, 2) - x*y"``.
    symbols : dict of str to sympy object
        The names the expression may use and what they stand for.  An entry
        that is an undefined function applied to one symbol, such as
        ``{"y": sympy.Function("y")(x)}``, may also be differentiated with
        ``der(y)`` or ``der(y, n)``, 1 <= n <= 12.  The constants ``pi``,
        ``E`` and ``I`` are always known (an entry in `symbols` wins).
    functions : dict of str to callable, optional
        Extra functions, added to the whitelist (sqrt, exp, log, sin, cos,
        tan, sinh, cosh, tanh, atan, atanh, asinh, abs, sech).

    Returns
    -------
    sympy.Expr

    Raises
    ------
    ModelFileError
        For anything outside the whitelist or the size limits; the message
        names the offending piece and says what is allowed.

    Examples
    --------
    >>> import sympy as sp
    >>> x = sp.Symbol("x")
    >>> parse_expression("-1 + 0.1*tanh(2*(x - 3))", symbols={"x": x})
    tanh(2*x - 6)/10 - 1
    >>> y = sp.Function("y")
    >>> parse_expression("der(y, 2) - x*y", symbols={"x": x, "y": y(x)})
    -x*y(x) + Derivative(y(x), (x, 2))
    >>> parse_expression("os.system('ls')", symbols={"x": x})
    Traceback (most recent call last):
    ...
    contourkit.errors.ModelFileError: attribute access 'os.system' is not allowed in expressions; ...
    """
    funcs = _check_tables(symbols, functions)
    _scan_text(text)
    try:
        tree = ast.parse(text.strip(), mode="eval")
    except SyntaxError as exc:
        where = f" at column {exc.offset}" if exc.offset else ""
        hint = (" (an equation 'lhs = rhs' is written as the expression lhs - (rhs))"
                if "=" in text else "")
        raise ModelFileError(f"the expression '{' '.join(text.split())[:60]}' is not valid syntax{where}: "
                             f"{exc.msg}{hint}") from None
    except (ValueError, RecursionError, MemoryError) as exc:
        raise ModelFileError(f"the expression cannot be parsed: {exc}") from None
    _check_size(tree.body)
    parser = _Parser(text.strip(), dict(symbols), funcs)
    parser.check(tree.body)
    try:
        expr = parser.build(tree.body)
    except ModelFileError:
        raise
    except Exception as exc:  # sympy failures become a refusal with context
        raise ModelFileError(f"the expression '{parser.piece(tree.body)}' could not be built "
                             f"({type(exc).__name__}: {exc})") from None
    if not isinstance(expr, sp.Expr) or expr.has(sp.zoo, sp.nan, sp.oo, -sp.oo):
        raise ModelFileError(f"the expression '{parser.piece(tree.body)}' is infinite or undefined "
                             f"(a division by zero, log(0), ...); check the constants")
    return expr


__all__ = ["parse_expression", "FUNCTIONS", "CONSTANTS"]
