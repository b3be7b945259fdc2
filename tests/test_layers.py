"""The package's layering: a module imports only from modules below it (DEVELOPERS.md, "Layers").

Every import statement in ``drift/`` is read with ``ast``, at module level and inside functions
alike, and resolved to a module of the package; each must point strictly down the order below.
A downward-only order admits no cycle.
"""

import ast
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "drift"

#: The layers from the bottom up; inside a layer, a module may import those listed before it.
LAYERS = {
    "base": ["constants", "errors", "files"],
    "data": ["scale", "materials", "climate", "valves", "instrument", "instrument_file", "ensemble"],
    "physics": ["gas_table", "air", "heat_transfer", "acoustics", "network"],
    "segments": ["segments"],
    "thermal": ["bore_state", "heat_balance", "thermal"],
    "pitch": ["resonance", "pitch"],
    "jobs": ["advice", "budget", "layout", "chart", "design", "warmup", "fit", "gig"],
    "edge": ["render", "render_fit", "render_design", "notation", "sheet", "plot", "options", "cli", "__main__", "__init__"],
}
ORDER = [m for modules in LAYERS.values() for m in modules]
LAYER_OF = {m: layer for layer, modules in LAYERS.items() for m in modules}
#: Longest module [lines] ("no module over about 600 lines").
LONGEST_MODULE = 650


def package_modules() -> list[str]:
    return sorted(p.stem for p in PACKAGE.glob("*.py"))


def imported_modules(name: str) -> list[tuple[int, str]]:
    """(line, module) of every import of a drift module in ``drift/<name>.py``.

    ``from drift import x`` counts as an import of ``drift.x`` when ``x`` is a module, else of the
    package itself (``__init__``).
    """
    tree = ast.parse((PACKAGE / f"{name}.py").read_text(encoding="utf-8"))
    modules = set(package_modules())
    out = []
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for alias in node.names:
                parts = alias.name.split(".")
                if parts[0] == "drift":
                    out.append((node.lineno, parts[1] if len(parts) > 1 else "__init__"))
        elif isinstance(node, ast.ImportFrom) and node.module and node.module.split(".")[0] == "drift":
            parts = node.module.split(".")
            if len(parts) > 1:
                out.append((node.lineno, parts[1]))
            else:
                for alias in node.names:
                    out.append((node.lineno, alias.name if alias.name in modules else "__init__"))
    return out


def test_every_module_has_a_layer():
    assert sorted(ORDER) == package_modules(), "add the new module to LAYERS (and to DEVELOPERS.md)"


@pytest.mark.parametrize("name", ORDER)
def test_imports_point_down(name):
    rank = ORDER.index(name)
    for line, target in imported_modules(name):
        if name == "cli" and target == "__init__":
            continue  # the command line reads the package's __version__, which imports nothing
        assert ORDER.index(target) < rank, (
            f"drift/{name}.py:{line} imports drift.{target} "
            f"({LAYER_OF[target]} layer), which is not below {name} ({LAYER_OF[name]} layer)")


def test_public_api_points_at_modules_that_define_it():
    import drift

    for public, module in drift._API.items():
        assert module in ORDER
        assert public not in ORDER, f"API name {public} equals a module name"
        source = (PACKAGE / f"{module}.py").read_text(encoding="utf-8")
        assert f"def {public}(" in source or f"class {public}" in source, (public, module)


@pytest.mark.parametrize("name", ORDER)
def test_modules_stay_short(name):
    lines = (PACKAGE / f"{name}.py").read_text(encoding="utf-8").count("\n")
    assert lines <= LONGEST_MODULE, f"drift/{name}.py has {lines} lines"
