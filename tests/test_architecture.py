"""The package layout: module size, no import cycles, data flowing one way (docs/architecture.md).

Common practice (layered architecture); the layer order is the one of DESIGN.md,
"Layers".  Every import statement counts, including imports inside functions.
"""
import ast
import pathlib

import pytest

import contourkit

ROOT = pathlib.Path(contourkit.__file__).parent

# lowest first; a module may import its own layer and the layers before it
LAYERS = [
    ["contourkit.errors", "contourkit._version"],
    ["contourkit.symbolic"],
    ["contourkit.geometry"],
    ["contourkit.evaluation"],
    ["contourkit.scattering"],
    ["contourkit.profiles"],
    ["contourkit.greybody"],
    ["contourkit.scans", "contourkit.catalogue"],
    ["contourkit.plotting"],
    ["contourkit.cli"],
    # the front door and the former module paths kept for users' imports
    ["contourkit.__init__", "contourkit.__main__", "contourkit.modes", "contourkit.fourier",
     "contourkit.asymptotics"],
]
TOP_LEVEL_LIMIT = 8
MAX_LINES = 600


def _modules():
    out = {}
    for path in sorted(ROOT.rglob("*.py")):
        rel = path.relative_to(ROOT.parent).with_suffix("")
        parts = list(rel.parts)
        name = ".".join(parts[:-1]) if parts[-1] == "__init__" else ".".join(parts)
        out[name] = path
    return out


MODULES = _modules()


def _is_package(name):
    return MODULES[name].name == "__init__.py"


def _imports(name):
    """Every contourkit module that `name` imports (top level and inside functions)."""
    tree = ast.parse(MODULES[name].read_text())
    package = name if _is_package(name) else name.rsplit(".", 1)[0]
    found = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for a in node.names:
                if a.name.split(".")[0] == "contourkit":
                    found.add(a.name)
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")
                base = base[: len(base) - node.level + 1]
                target = ".".join(base + ([node.module] if node.module else []))
            else:
                target = node.module or ""
            if target.split(".")[0] != "contourkit":
                continue
            for a in node.names:
                sub = f"{target}.{a.name}"
                found.add(sub if sub in MODULES else target)
    return {m for m in found if m in MODULES and m != name}


GRAPH = {name: _imports(name) for name in MODULES}


def _layer(name):
    key = "contourkit.__init__" if name == "contourkit" else name
    for i, group in enumerate(LAYERS):
        for prefix in group:
            if key == prefix or key.startswith(prefix + "."):
                return i
    raise AssertionError(f"module {name} is in no layer of the test's LAYERS list")


def test_every_module_has_a_layer():
    for name in MODULES:
        _layer(name)


def test_no_module_over_the_line_limit():
    long = {n: len(p.read_text().splitlines()) for n, p in MODULES.items()}
    assert {n: c for n, c in long.items() if c > MAX_LINES} == {}


def test_top_level_stays_small():
    top = [p for p in ROOT.glob("*.py")]
    assert len(top) <= TOP_LEVEL_LIMIT, sorted(p.name for p in top)


def test_no_lower_layer_imports_a_higher_one():
    bad = [(a, b) for a, deps in GRAPH.items() for b in deps if _layer(b) > _layer(a)]
    assert bad == []


def test_no_import_cycle():
    # Tarjan's strongly connected components over the import graph
    index, low, stack, on, comps = {}, {}, [], set(), []
    counter = [0]

    def visit(v):
        index[v] = low[v] = counter[0]
        counter[0] += 1
        stack.append(v)
        on.add(v)
        for w in GRAPH[v]:
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            comp = []
            while True:
                w = stack.pop()
                on.discard(w)
                comp.append(w)
                if w == v:
                    break
            if len(comp) > 1:
                comps.append(sorted(comp))

    for v in GRAPH:
        if v not in index:
            visit(v)
    assert comps == []


def test_the_graph_sees_lazy_imports():
    # the walker must find imports inside functions, or the two tests above prove nothing
    src = "def f():\n    from ..errors import InputError\n"
    tree = ast.parse(src)
    assert any(isinstance(n, ast.ImportFrom) for n in ast.walk(tree))
    assert "contourkit.errors" in GRAPH["contourkit.symbolic.horizon"]


@pytest.mark.parametrize("path", ["contourkit.scattering", "contourkit.modes", "contourkit.fourier",
                                  "contourkit.asymptotics", "contourkit.direct"])
def test_former_import_paths_still_work(path):
    import importlib
    mod = importlib.import_module(path)
    expected = {"contourkit.scattering": "scatter", "contourkit.modes": "catalogue",
                "contourkit.fourier": "KSpaceRepresentation", "contourkit.asymptotics": "saddle_coefficients",
                "contourkit.direct": "scatter"}[path]
    assert callable(getattr(mod, expected))
