"""Meta-tests that keep the registry honest and the layers apart."""

import ast
import inspect
import pathlib
import re

import pytest

import predictor as pr
from predictor.registry import get_model
from predictor.units import ureg
from tests.published import CASES

SPECS = pr.models()
IDS = [s.name for s in SPECS]
ROOT = pathlib.Path(pr.__file__).parent
# Orchestration and edge modules may use pandas/pint; model modules may not.
EDGE_MODULES = {"__init__", "formulation", "design", "scenario", "cli", "units", "batch",
                "report", "labdata", "phase_ratio", "charts", "candidates"}
FORBIDDEN = {"streamlit", "altair", "pint", "pandas"}


def _imports(path):
    names = set()
    for node in ast.walk(ast.parse(path.read_text())):
        if isinstance(node, ast.Import):
            names.update(a.name.split(".")[0] for a in node.names)
        elif isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
            names.add(node.module.split(".")[0])
    return names


@pytest.mark.parametrize("path", sorted(ROOT.glob("*.py")), ids=lambda p: p.stem)
def test_model_modules_stay_numpy_only(path):
    if path.stem in EDGE_MODULES:
        pytest.skip("edge or orchestration module")
    assert not (_imports(path) & FORBIDDEN), f"{path.name} imports {_imports(path) & FORBIDDEN}"


def test_no_module_imports_the_app():
    for path in ROOT.glob("*.py"):
        assert "app" not in _imports(path), path.name


def test_the_check_itself_can_fail(tmp_path):
    bad = tmp_path / "bad.py"
    bad.write_text("import pandas as pd\nfrom pint import UnitRegistry\n")
    assert _imports(bad) & FORBIDDEN == {"pandas", "pint"}


@pytest.mark.parametrize("spec", SPECS, ids=IDS)
def test_params_match_signature(spec):
    sig = inspect.signature(spec.func)
    with_default = {n for n, p in sig.parameters.items() if p.default is not inspect._empty}
    assert set(spec.param_names()) <= set(sig.parameters), "a Param names no argument"
    assert with_default == set(spec.param_names()), "an argument with a default has no Param"


@pytest.mark.parametrize("spec", SPECS, ids=IDS)
def test_defaults_within_bounds(spec):
    for p in spec.params:
        low, high = p.bounds
        assert low <= spec.defaults()[p.name] <= high, p.name


def _unit(text):
    """pint quantity of a unit spelling; "-" means dimensionless."""
    return ureg("dimensionless") if text.strip() in ("-", "") else ureg(text)


@pytest.mark.parametrize("spec", SPECS, ids=IDS)
def test_docstring_sections_and_units(spec):
    doc = inspect.getdoc(spec.func)
    assert "References\n----------" in doc and "Examples\n--------" in doc
    for p in spec.params:
        _unit(p.unit)  # parses
        match = re.search(rf"^{p.name} : .*?\n(.*?)(?=^\S|\Z)", doc, re.M | re.S)
        assert match, f"{p.name} not documented"
        units = re.findall(r"\[([^\[\]]+)\]\s*$", match.group(1).strip(), re.M)
        assert units, f"{p.name}: no [unit] at the end of its description"
        assert _unit(units[-1]) == _unit(p.unit), f"{p.name}: [{units[-1]}] != {p.unit}"


@pytest.mark.parametrize("spec", SPECS, ids=IDS)
def test_every_model_has_a_published_check(spec):
    covered = {m for c in CASES for m in c.models}
    covered |= {c.func.rpartition(".")[2].replace("_", "-") for c in CASES}
    assert spec.name in covered, f"{spec.name} has no row in tests/published/"


def test_registry_names_are_function_names():
    for spec in SPECS:
        assert spec.name == spec.func.__name__.replace("_", "-")


def test_unknown_model_lists_valid_names():
    with pytest.raises(pr.UnknownModelError, match="krieger-dougherty"):
        get_model("krieger-doughnut")


def test_design_model_names_are_registered():
    # Names of the stable public API.
    for name in ["einstein", "batchelor", "krieger-dougherty", "quemada", "maron-pierce",
                 "eilers", "mooney", "chong", "thomas", "frankel-acrivos"]:
        assert get_model(name).kind == "suspension"


MODEL_MODULES = ["suspension", "emulsion", "liquids", "shear", "stability", "composition",
                 "viscosity", "packing", "blend", "sizes", "thixotropy", "process",
                 "interactions"]
# Long-running simulations check their own inputs and run numba kernels in worker threads,
# where numpy's error state does not reach.
UNGUARDED = {"simulate_jamming", "simulation"}


@pytest.mark.parametrize("name", MODEL_MODULES)
def test_public_model_functions_are_guarded(name):
    import importlib

    module = importlib.import_module(f"predictor.{name}")
    missing = [f for f, obj in inspect.getmembers(module, inspect.isfunction)
               if not f.startswith("_") and obj.__module__ == module.__name__
               and f not in UNGUARDED and not getattr(obj, "__loadline_guarded__", False)]
    assert not missing, f"public functions without @guarded in {name}: {missing}"


def test_models_snapshot_is_current():
    # `loadline models` reads predictor/data/models.json so that it starts without numpy;
    # regenerate with `python -m predictor.registry --snapshot` after changing a relation.
    from predictor.registry import SNAPSHOT, snapshot_text

    assert (ROOT / SNAPSHOT).read_text(encoding="utf-8") == snapshot_text(), (
        "predictor/data/models.json is stale: run `python -m predictor.registry --snapshot`")
