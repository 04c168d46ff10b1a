"""Fuzzing every public function of the model modules and every file reader.

Each call must either return values without NaN (inf only where a relation diverges, as
documented) and without a bare numpy warning, or raise a `LoadlineError` whose message names
what was wrong. `make fuzz` runs the same tests with many more cases and prints the count per
function (tests/conftest.py).
"""

from __future__ import annotations

import dataclasses
import inspect
import json
import math
import warnings

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import predictor as pr
from predictor import (
    composition,
    emulsion,
    interactions,
    liquids,
    packing,
    shear,
    sizes,
    stability,
    suspension,
    viscosity,
)
from predictor.errors import LoadlineError, ValidityWarning
from tests.conftest import FUZZ_CASES, FUZZ_EXAMPLES

MODULES = [suspension, emulsion, liquids, shear, stability, composition, viscosity, packing,
           interactions]
# Slow by design (seconds per call): fuzzed with few cases in their own tests.
SLOW = {"jamming_simulation", "simulation", "simulation_fit", "max_packing_simulation"}

wild = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True, width=64),
    st.floats(-1e3, 1e3),
    st.floats(0.0, 1.0),
    st.sampled_from([0.0, -0.0, 1.0, -1.0, 0.5, 0.64, 1e-300, 1e300, 1e-9, 1e9]),
)
wild_array = st.lists(wild, min_size=0, max_size=4).map(np.array)
wild_value = st.one_of(wild, wild, wild_array)


def _public_functions():
    for module in MODULES:
        for name, func in inspect.getmembers(module, inspect.isfunction):
            if name.startswith("_") or func.__module__ != module.__name__ or name in SLOW:
                continue
            yield f"{module.__name__.split('.')[-1]}.{name}", func


FUNCTIONS = dict(_public_functions())
NUMERIC_DEFAULT = (int, float)


def _numeric_leaves(value):
    if isinstance(value, dict):
        for v in value.values():
            yield from _numeric_leaves(v)
    elif isinstance(value, list | tuple):
        for v in value:
            yield from _numeric_leaves(v)
    elif dataclasses.is_dataclass(value) and not isinstance(value, type):
        for f in dataclasses.fields(value):
            yield from _numeric_leaves(getattr(value, f.name))
    elif isinstance(value, np.ndarray) and value.dtype.kind == "f":
        yield from value.ravel().tolist()
    elif isinstance(value, float | np.floating):
        yield float(value)


def check_outcome(label, call):
    """Run `call`; accept a NaN-free result or a LoadlineError that names something."""
    FUZZ_CASES[label] += 1
    with warnings.catch_warnings():
        warnings.simplefilter("error", RuntimeWarning)
        warnings.simplefilter("ignore", ValidityWarning)
        try:
            result = call()
        except LoadlineError as err:
            assert str(err).strip(), f"{label}: empty error message"
            return None
    leaves = list(_numeric_leaves(result))
    assert not any(math.isnan(x) for x in leaves), f"{label} returned NaN"
    return result


@pytest.mark.parametrize("label", sorted(FUNCTIONS))
def test_fuzz_public_function(label):
    func = FUNCTIONS[label]
    sig = inspect.signature(func)
    numeric = [p for p in sig.parameters.values()
               if p.kind in (p.POSITIONAL_OR_KEYWORD, p.KEYWORD_ONLY)
               and (p.default is inspect._empty or
                    (isinstance(p.default, NUMERIC_DEFAULT) and not isinstance(p.default, bool)))]
    required_other = [p for p in sig.parameters.values()
                      if p.default is inspect._empty and p not in numeric]
    if required_other or not numeric:
        pytest.skip("needs non-numeric arguments; fuzzed through its callers")

    @given(st.fixed_dictionaries({p.name: wild_value for p in numeric}))
    @settings(max_examples=FUZZ_EXAMPLES // 3)
    def run(kwargs):
        check_outcome(label, lambda: func(**kwargs))

    before = FUZZ_CASES[label]
    run()
    assert FUZZ_CASES[label] > before   # the examples really ran


@given(phi=wild_value, spec=st.sampled_from(pr.models("suspension") + pr.models("emulsion")),
       data=st.data())
@settings(max_examples=FUZZ_EXAMPLES)
def test_fuzz_relative_viscosity_dispatch(phi, spec, data):
    params = {p.name: data.draw(st.one_of(wild, st.floats(*p.bounds)), label=p.name)
              for p in spec.params if data.draw(st.booleans())}
    result = check_outcome("relative_viscosity",
                           lambda: pr.relative_viscosity(phi, model=spec.name, **params))
    if result is not None:
        # Every relation gives eta_r >= 1 for phi >= 0, except Frankel-Acrivos, asymptotic
        # near phi_max only (flagged as outside its validity below 0.8 phi_max).
        floor = 0.0 if spec.name == "frankel-acrivos" else 1.0
        assert np.all(np.asarray(result) >= floor)


@given(rate=wild_value, spec=st.sampled_from(pr.models("liquid")), data=st.data())
@settings(max_examples=FUZZ_EXAMPLES)
def test_fuzz_liquid_laws(rate, spec, data):
    params = {p.name: data.draw(st.one_of(wild, st.floats(*p.bounds)), label=p.name)
              for p in spec.params if data.draw(st.booleans())}
    result = check_outcome("liquid_viscosity",
                           lambda: liquids.liquid_viscosity(rate, spec.name, **params))
    if result is not None:
        assert np.all(np.asarray(result) >= 0)


@given(d=st.lists(wild, min_size=0, max_size=6), f=st.lists(wild, min_size=0, max_size=6),
       method=st.sampled_from([s.name for s in pr.models("packing") if "simulation" not in s.name]
                              + [None]))
@settings(max_examples=FUZZ_EXAMPLES)
def test_fuzz_max_packing(d, f, method):
    result = check_outcome("max_packing", lambda: pr.max_packing(np.array(d), np.array(f),
                                                                 method=method))
    if result is not None:
        assert 0.0 < result <= 1.0


@given(sizes_m=st.lists(wild, max_size=6), amounts=st.lists(wild, max_size=6),
       cumulative=st.booleans(), basis=st.sampled_from(["volume", "mass", "number", "area"]))
@settings(max_examples=FUZZ_EXAMPLES)
def test_fuzz_size_table(sizes_m, amounts, cumulative, basis):
    result = check_outcome("SizeDistribution.from_table", lambda: sizes.SizeDistribution.from_table(
        np.array(sizes_m), np.array(amounts), basis=basis, cumulative=cumulative))
    if result is not None:
        assert result.fractions.sum() == pytest.approx(1.0)
        assert result.d10_m <= result.d50_m <= result.d90_m


QUANTITY_TEXT = r"-?[0-9.e+]{1,8} ?[a-zA-Z%/*·µ^0-9]{0,8}"


@given(text=st.one_of(st.text(max_size=20), st.from_regex(QUANTITY_TEXT, fullmatch=True)),
       dimension=st.sampled_from(["viscosity", "length", "density", "shear_rate",
                                  "temperature", "interfacial_tension", "stress"]))
@settings(max_examples=FUZZ_EXAMPLES)
def test_fuzz_quantity_text(text, dimension):
    result = check_outcome("units.parse_quantity",
                           lambda: pr.units.parse_quantity(text, dimension, "field"))
    if result is not None:
        assert isinstance(result, float)


@given(text=st.one_of(st.text(max_size=16), st.from_regex(r"-?[0-9.]{1,6} ?(wt|vol|w/w|v/v)? ?%?",
                                                            fullmatch=True)))
@settings(max_examples=FUZZ_EXAMPLES)
def test_fuzz_loading_text(text):
    result = check_outcome("units.parse_loading", lambda: pr.units.parse_loading(text))
    if result is not None:
        assert 0.0 <= result[0] <= 1.0 and result[1] in ("mass", "volume")


DEMO_TEXT = open(pr.__file__.replace("predictor/__init__.py",
                                     "data_demo/mineral_coating.loadline.json")).read()
json_leaf = st.one_of(st.none(), st.booleans(), wild.filter(math.isfinite), st.text(max_size=8))


def _paths(doc, prefix=()):
    if isinstance(doc, dict):
        for k, v in doc.items():
            yield prefix + (k,)
            yield from _paths(v, prefix + (k,))
    elif isinstance(doc, list):
        for i, v in enumerate(doc):
            yield prefix + (i,)
            yield from _paths(v, prefix + (i,))


PATHS = list(_paths(json.loads(DEMO_TEXT)))


@given(st.lists(st.tuples(st.sampled_from(PATHS), json_leaf), min_size=1, max_size=3))
@settings(max_examples=FUZZ_EXAMPLES)
def test_fuzz_scenario_documents(mutations):
    doc = json.loads(DEMO_TEXT)
    for path, value in mutations:
        node = doc
        try:
            for key in path[:-1]:
                node = node[key]
            node[path[-1]] = value
        except (KeyError, IndexError, TypeError):
            continue
    formulation = check_outcome("scenario.loads", lambda: pr.scenario.loads(json.dumps(doc)))
    assert formulation is None or isinstance(formulation, pr.Formulation)
    if formulation is not None:
        check_outcome("formulation.predict",
                      lambda: pr.predict(formulation, [0.1, 100.0])["viscosity_Pa_s"].to_numpy())


@given(st.binary(max_size=200))
@settings(max_examples=FUZZ_EXAMPLES // 3)
def test_fuzz_scenario_bytes(raw):
    result = check_outcome("scenario.loads(bytes)",
                           lambda: pr.scenario.loads(raw.decode("utf-8", errors="replace")))
    assert result is None or isinstance(result, pr.Formulation)
