"""The package's layers: imports run one way, bottom to top, and never in a circle.

Every import counts: at module level, inside functions and under TYPE_CHECKING.
"""

import ast
from pathlib import Path

PACKAGE = Path(__file__).resolve().parent.parent / "speccheck"

# bottom to top; a module may import from its own layer or any layer before it
LAYERS = ("_version", "physics", "records", "reading", "checking", "formats", "top")
MAX_LINES = 400
DATA_TABLES: set[str] = set()  # modules of pure data tables, which may be longer (none is, today)


def module_name(path: Path) -> str:
    parts = path.relative_to(PACKAGE.parent).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def layer_of(module: str) -> str:
    parts = module.split(".")
    if len(parts) >= 2 and parts[1] in LAYERS:
        return parts[1]
    return "top"


def imports_of(path: Path) -> set[str]:
    """Every speccheck module this file imports, wherever the import stands."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    me = module_name(path).split(".")
    package = me if path.name == "__init__.py" else me[:-1]
    found = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            found |= {a.name for a in node.names if a.name.split(".")[0] == "speccheck"}
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = ".".join(package[: len(package) - node.level + 1] + ([node.module] if node.module else []))
            else:
                base = node.module or ""
            if base.split(".")[0] != "speccheck":
                continue
            for alias in node.names:  # `from speccheck.physics import materials` imports a module
                sub = f"{base}.{alias.name}"
                found.add(sub if (PACKAGE.parent / (sub.replace(".", "/") + ".py")).exists()
                          or (PACKAGE.parent / sub.replace(".", "/")).is_dir() else base)
    return found


def string_imports_of(path: Path) -> set[str]:
    """Module names in strings (``importlib.import_module("speccheck.…")``, ``__import__``)."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    return {n.value for n in ast.walk(tree) if isinstance(n, ast.Constant) and isinstance(n.value, str)
            and n.value.startswith("speccheck.") and " " not in n.value
            and ((PACKAGE.parent / (n.value.replace(".", "/") + ".py")).exists()
                 or (PACKAGE.parent / n.value.replace(".", "/")).is_dir())}


def graph() -> dict[str, set[str]]:
    return {module_name(p): imports_of(p) | string_imports_of(p) for p in sorted(PACKAGE.rglob("*.py"))}


def test_no_import_runs_up_a_layer():
    upward = []
    for module, deps in graph().items():
        mine = LAYERS.index(layer_of(module))
        for dep in deps:
            if dep == "speccheck" and module != "speccheck":
                upward.append(f"{module} imports the top package (import speccheck._version instead)")
            elif LAYERS.index(layer_of(dep)) > mine:
                upward.append(f"{module} ({layer_of(module)}) imports {dep} ({layer_of(dep)})")
    assert not upward, "\n".join(upward)


def test_no_import_cycles():
    g = graph()
    state: dict[str, int] = {}
    cycles = []

    def visit(m: str, stack: list[str]) -> None:
        state[m] = 1
        for dep in sorted(g.get(m, ())):
            if dep not in g or dep == m:
                continue
            if state.get(dep) == 1:
                cycles.append(" -> ".join(stack[stack.index(dep):] + [dep]))
            elif dep not in state:
                visit(dep, stack + [dep])
        state[m] = 2

    for m in sorted(g):
        if m not in state:
            visit(m, [m])
    assert not cycles, "\n".join(cycles)


def test_the_walk_finds_imports_inside_functions_and_type_checking(tmp_path):
    # the checker of this test must see every kind of import, or it cannot fail
    probe = PACKAGE / "physics" / "_probe_for_test.py"
    probe.write_text("from typing import TYPE_CHECKING\nif TYPE_CHECKING:\n    from speccheck.checking import engine\n"
                     "def f():\n    from ..formats import human\n"
                     "def g():\n    import importlib\n    return importlib.import_module('speccheck.checking.walker')\n",
                     encoding="utf-8")
    try:
        assert imports_of(probe) >= {"speccheck.checking.engine", "speccheck.formats.human"}
        assert string_imports_of(probe) == {"speccheck.checking.walker"}
    finally:
        probe.unlink()


def test_every_layer_is_a_package_that_gets_installed():
    text = (PACKAGE.parent / "pyproject.toml").read_text(encoding="utf-8")
    for layer in LAYERS:
        if (PACKAGE / layer).is_dir():
            assert (PACKAGE / layer / "__init__.py").exists()
            assert f'"speccheck.{layer}"' in text


def test_no_module_is_over_400_lines_but_pure_data_tables():
    long = [f"{module_name(p)}: {n} lines" for p in sorted(PACKAGE.rglob("*.py"))
            if (n := len(p.read_text(encoding="utf-8").splitlines())) > MAX_LINES
            and module_name(p) not in DATA_TABLES]
    assert not long, "\n".join(long)


def test_the_walk_never_branches_on_a_stage_kind_name():
    # a kind's behaviour is declared in its row of STAGE_KINDS; the walk treats every kind alike
    from speccheck.physics.stages import STAGE_KINDS

    # stage_checks holds the kinds' own code, which may name their parameters; nothing else may
    for path in sorted((PACKAGE / "checking").glob("*.py")):
        if path.stem == "stage_checks":
            continue
        module = path.stem
        tree = ast.parse(path.read_text(encoding="utf-8"))
        docstrings = {id(n.body[0].value) for n in ast.walk(tree)
                      if isinstance(n, (ast.Module, ast.FunctionDef, ast.ClassDef)) and n.body
                      and isinstance(n.body[0], ast.Expr) and isinstance(n.body[0].value, ast.Constant)}
        params = {p.name for k in STAGE_KINDS.values() for p in k.params} - {"name"}
        names = [n.value for n in ast.walk(tree) if isinstance(n, ast.Constant) and id(n) not in docstrings
                 and isinstance(n.value, str) and n.value in STAGE_KINDS]
        assert not names, f"checking/{module}.py names stage kinds: {names}"
        if module in ("walker", "targets"):  # nor the parameters of one kind
            named = [n.value for n in ast.walk(tree) if isinstance(n, ast.Constant) and id(n) not in docstrings
                     and isinstance(n.value, str) and n.value in params]
            assert not named, f"checking/{module}.py names stage parameters: {named}"


def test_every_check_a_stage_kind_names_exists():
    from speccheck.checking.stage_checks import CHECKS
    from speccheck.physics.stages import STAGE_KINDS

    named = {c for kind in STAGE_KINDS.values() for c in kind.checks}
    assert named and named <= set(CHECKS)


def test_every_stage_check_declares_the_rules_it_reports():
    import inspect
    import re

    from speccheck.checking.stage_checks import CHECKS

    for check in CHECKS.values():
        reported = set(re.findall(r'report\.add\(\s*"([a-z0-9-]+)"', inspect.getsource(check.run)))
        reported |= set(re.findall(r'"([a-z0-9-]+)" if ', inspect.getsource(check.run)))
        assert reported and reported <= set(check.rules), (check.id, reported - set(check.rules))


def test_the_schema_names_every_stage_kind_and_parameter_and_nothing_else():
    import json

    from speccheck.checking.stage_checks import CHECKS
    from speccheck.physics.stages import STAGE_KINDS

    stage = json.loads((PACKAGE.parent / "schemas" / "spec-v1.schema.json").read_text("utf-8"))["$defs"]["stage"]
    assert set(stage["properties"]["kind"]["enum"]) == set(STAGE_KINDS)
    keys = {"name", "kind", "measured", "branches", "target"} | {p.name for k in STAGE_KINDS.values() for p in k.params} | {
        key for c in CHECKS.values() for key in c.keys}
    assert set(stage["properties"]) == keys


def test_the_schema_is_found_in_a_source_tree_that_is_not_installed(monkeypatch):
    from importlib import resources

    import pytest

    from speccheck.reading import schema

    if not (Path(schema.__file__).resolve().parents[2] / "schemas").is_dir():
        pytest.skip("speccheck is installed here, not run from its source tree")

    def missing(name):
        raise ModuleNotFoundError(name)

    monkeypatch.setattr(resources, "files", missing)
    assert '"$schema"' in schema.schema_text()
