"""Imports run one way (properties <- physics <- units <- flowsheets <- studies <- views <- CLI),
and no module imports another's private helper (house style, "Layers")."""

import ast
import pathlib

import pytest

ROOT = pathlib.Path(__file__).resolve().parents[1]

# Rank of each module: a module may import only modules of its own rank or lower.
RANK = {
    "cycle": 0, "properties": 0, "cycle.errors": 0, "cycle.units": 0, "cycle.safety": 0,
    "cycle.scenario": 1, "cycle.conversion": 1, "cycle.processes": 1, "cycle.orifice": 1, "cycle.heat_transfer": 1,
    "cycle.results": 2, "cycle.tube_exchanger": 2, "cycle.equipment": 2,
    "cycle.flowsheet": 3, "cycle.layouts": 3,
    "cycle.sweep": 4, "cycle.studies": 4, "cycle.uncertainty": 4,
    "cycle.plots": 5, "cycle.report": 5, "cycle.report_html": 5, "cycle.api": 5,
    "cycle.cli": 6,
}


def _rank(module):
    while module and module != "cycle":
        if module in RANK:
            return RANK[module]
        module = module.rpartition(".")[0]
    return RANK.get(module)


def _modules():
    for path in sorted((ROOT / "cycle").glob("*.py")) + sorted((ROOT / "properties").glob("*.py")):
        name = ".".join(path.relative_to(ROOT).with_suffix("").parts)
        yield name.removesuffix(".__init__"), path


def _imports(path):
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
            names = [a.name for a in node.names]
            if node.module in ("cycle", "properties"):  # from cycle import processes
                for n in names:
                    yield (f"{node.module}.{n}", [], node.lineno) if n[0] != "_" else (node.module, [n], node.lineno)
            else:
                yield node.module, names, node.lineno
        elif isinstance(node, ast.Import):
            for alias in node.names:
                yield alias.name, [], node.lineno


@pytest.mark.parametrize("name,path", list(_modules()), ids=lambda v: str(v))
def test_no_module_reaches_up_or_into_private_names(name, path):
    own = _rank(name)
    assert own is not None, f"{name} has no rank in tests/test_layers.py: give it one"
    for module, names, line in _imports(path):
        if module.split(".")[0] not in ("cycle", "properties"):
            continue
        target = _rank(module)
        assert target is not None and target <= own, f"{path.name}:{line} imports {module} from a higher layer"
        private = [n for n in names if n.startswith("_") and not n.endswith("__")]
        if module != name:
            assert not private, f"{path.name}:{line} imports the private {private} from {module}"


def test_every_module_is_ranked():
    """A new module must be placed in a layer before it can pass the test above."""
    names = {name for name, _ in _modules()}
    assert {n for n in names if _rank(n) is None} == set()
