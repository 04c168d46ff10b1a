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
    files,
    interactions,
    liquids,
    packing,
    process,
    shear,
    sizes,
    stability,
    suspension,
    thixotropy,
    viscosity,
)
from predictor.errors import LoadlineError, ValidityWarning
from tests.conftest import FUZZ_CASES, FUZZ_EXAMPLES

MODULES = [suspension, emulsion, liquids, shear, stability, composition, viscosity, packing,
           thixotropy, process, interactions]
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


# -- issue 20: hostile JSON shapes and units ---------------------------------------------------
# Each strategy below found a fault before issue 20 was fixed: deep nesting raised a
# RecursionError, true was read as 1.0, a repeated key kept its last value silently, and a
# unit of the wrong dimension was converted to base units without a check.

DEMO_DOC = json.loads(DEMO_TEXT)


def _get(doc, path):
    for key in path:
        doc = doc[key]
    return doc


NUMBER_PATHS = [p for p in PATHS if isinstance(_get(DEMO_DOC, p), int | float)
                and not isinstance(_get(DEMO_DOC, p), bool) and p[-1] != "schema_version"]
OBJECT_PATHS = [()] + [p for p in PATHS if isinstance(_get(DEMO_DOC, p), dict)
                       and _get(DEMO_DOC, p)]
UNIT_PATHS = [p for p in PATHS if isinstance(_get(DEMO_DOC, p), dict)
              and "unit" in _get(DEMO_DOC, p) and _get(DEMO_DOC, p)["unit"] not in ("", "-")]
# Units of many dimensions, each a valid pint unit (common practice, no source).
OTHER_UNITS = ["mm", "um", "s", "min", "kg", "g/cm**3", "Pa", "kPa", "K", "degC", "furlong",
               "m**3", "J", "N/m", "1/s", "Pa*s", "cP", "mPa*s", "W", "mol"]


@given(depth=st.one_of(st.integers(1, 100), st.integers(100, 200_000)),
       shape=st.sampled_from(["[", '{"a":']), inside=st.booleans())
@settings(max_examples=FUZZ_EXAMPLES // 3)
def test_fuzz_json_nesting(depth, shape, inside):
    closing = "]" if shape == "[" else "}"
    nested = shape * depth + "1" + closing * depth
    if inside:      # deep nesting inside a real scenario, in a key Loadline ignores
        text = DEMO_TEXT.rstrip()[:-1].rstrip() + ', "notes": ' + nested + "}"
    else:
        text = nested
    result = check_outcome("json nesting", lambda: pr.scenario.loads(text, "deep.json"))
    if depth + inside > files.MAX_JSON_DEPTH:
        assert result is None   # refused, with a message (checked by check_outcome)
        with pytest.raises(pr.ScenarioError, match="levels deep"):
            pr.scenario.loads(text)


@given(path=st.sampled_from(NUMBER_PATHS), value=st.booleans())
@settings(max_examples=FUZZ_EXAMPLES // 3)
def test_fuzz_booleans_for_numbers(path, value):
    doc = json.loads(DEMO_TEXT)
    _get(doc, path[:-1])[path[-1]] = value
    FUZZ_CASES["booleans for numbers"] += 1
    with pytest.raises(pr.LoadlineError) as err:
        pr.scenario.loads(json.dumps(doc))
    name = path[-1] if path[-1] != "value" else path[-2]
    assert str(name) in str(err.value) and str(value).lower() in str(err.value)


def _dump_with_duplicate(node, target, key, here=()):
    """JSON text of `node` with `key` written twice in the object at path `target`."""
    if isinstance(node, dict):
        items = [f"{json.dumps(k)}: {_dump_with_duplicate(v, target, key, here + (k,))}"
                 for k, v in node.items()]
        if here == target:
            items.append(f"{json.dumps(key)}: {json.dumps(node[key])}")
        return "{" + ", ".join(items) + "}"
    if isinstance(node, list):
        return "[" + ", ".join(_dump_with_duplicate(v, target, key, here + (i,))
                               for i, v in enumerate(node)) + "]"
    return json.dumps(node)


@given(target=st.sampled_from(OBJECT_PATHS), data=st.data())
@settings(max_examples=FUZZ_EXAMPLES // 3)
def test_fuzz_duplicate_keys(target, data):
    key = data.draw(st.sampled_from(sorted(_get(DEMO_DOC, target))), label="key")
    text = _dump_with_duplicate(DEMO_DOC, target, key)
    FUZZ_CASES["duplicate keys"] += 1
    with pytest.raises(pr.ScenarioError, match=f"{key!r} appears twice"):
        pr.scenario.loads(text)


@given(path=st.sampled_from(UNIT_PATHS), unit=st.sampled_from(OTHER_UNITS))
@settings(max_examples=FUZZ_EXAMPLES // 3)
def test_fuzz_units_of_the_wrong_dimension(path, unit):
    doc = json.loads(DEMO_TEXT)
    node = _get(doc, path)
    old = pr.units.ureg.parse_units(node["unit"]).dimensionality
    node["unit"] = unit
    result = check_outcome("scenario units", lambda: pr.scenario.loads(json.dumps(doc)))
    if pr.units.ureg.parse_units(unit).dimensionality != old:
        assert result is None, f"{unit} accepted at {'.'.join(map(str, path))}"
        with pytest.raises(pr.UnitError) as err:
            pr.scenario.loads(json.dumps(doc))
        assert str(path[-1]) in str(err.value)


@given(kind=st.sampled_from(["passing", "amount", "retained"]),
       unit=st.sampled_from(OTHER_UNITS + ["vol%", "wt%", "num%", "%", "-", "g", "mL"]))
@settings(max_examples=FUZZ_EXAMPLES // 3)
def test_fuzz_size_table_amount_units(kind, unit, tmp_path_factory):
    from predictor import batch

    path = tmp_path_factory.mktemp("sizes") / "sizes.csv"
    total = "0,50,100" if kind == "passing" else "50,50,0"
    amounts = total.split(",")
    path.write_text(f"size [um],{kind} [{unit}]\n" + "".join(
        f"{d},{a}\n" for d, a in zip((1, 2, 4), amounts, strict=True)), encoding="utf-8")
    result = check_outcome("size table units", lambda: batch.read_size_table(path))
    share = unit in ("vol%", "wt%", "num%", "%", "-")
    amount_of_matter = kind == "retained" and unit in ("kg", "g", "mL", "m**3")
    assert (result is not None) == (share or amount_of_matter), unit
