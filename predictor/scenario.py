"""Scenario files (`*.loadline.json`): a Formulation written out with its units, and read back.

The format is our own: human-readable JSON with a `schema_version`; every dimensional value
is written as {"value": <SI float>, "unit": "<pint unit>"} and may be edited by hand to any
unit pint reads ("120 cP", or {"value": 120, "unit": "cP"}). Floats are written with
Python's shortest exact repr, so a round trip is exact. Writes are atomic (temporary file,
fsync, rename) and the previous good file is kept beside as `<name>.bak`.
"""

from __future__ import annotations

import json
import math
import pathlib
import warnings

from . import sizes
from .errors import LoadlineError, ScenarioError, UnitError
from .files import atomic_write, load_json, number
from .formulation import MAX_INGREDIENTS, Formulation, Ingredient, Liquid
from .registry import get_model
from .units import parse_quantity

SCHEMA_VERSION = 1
FORMAT = "loadline-scenario"
SUFFIX = ".loadline.json"
MAX_BYTES = 5_000_000

# JSON key -> (dataclass field, dimension, unit written)
_LIQUID_QUANTITIES = {
    "temperature": ("temperature_K", "temperature", "K"),
    "density": ("density_kg_per_m3", "density", "kg/m**3"),
    "reference_temperature": ("reference_temperature_K", "temperature", "K"),
    "activation_temperature": ("activation_temperature_K", "temperature", "K"),
    "ionic_strength": ("ionic_strength_mol_per_L", "concentration", "mol/L"),
}
_LIQUID_NUMBERS = ("relative_permittivity",)
_INGREDIENT_QUANTITIES = {
    "density": ("density_kg_per_m3", "density", "kg/m**3"),
    "diameter": ("diameter_m", "length", "m"),
    "layer_thickness": ("layer_thickness_m", "length", "m"),
    "droplet_viscosity": ("droplet_viscosity_Pa_s", "viscosity", "Pa*s"),
    "interfacial_tension": ("interfacial_tension_N_per_m", "interfacial_tension", "N/m"),
    "surface_potential": ("surface_potential_V", "potential", "V"),
    "hamaker_constant": ("hamaker_J", "energy", "J"),
}
_INGREDIENT_NUMBERS = ("aspect_ratio", "phi_max", "intrinsic_viscosity")
# Optional true/false fields, written only when true (older files stay as they were).
_INGREDIENT_FLAGS = ("flocculated",)

# Older schema versions -> function upgrading a document by one version.
_MIGRATIONS: dict[int, callable] = {}


def _quantity(value, unit: str) -> dict | None:
    return None if value is None else {"value": float(value), "unit": unit}


def _read_quantity(raw, dimension: str, field: str):
    if raw is None:
        return None
    if isinstance(raw, dict):
        if "value" not in raw:
            raise ScenarioError(f"{field}: expected {{'value': ..., 'unit': ...}}, got {raw!r}.")
        value = number(raw["value"], f"{field}.value")
        unit = str(raw.get("unit", "")).strip()
        result = parse_quantity(f"{value!r} {unit}" if unit else value, dimension, field)
    elif isinstance(raw, int | float) and not isinstance(raw, bool):
        result = float(raw)
    elif isinstance(raw, str):
        result = parse_quantity(raw, dimension, field)
    else:
        raise ScenarioError(f"{field}: {raw!r} is not a quantity.")
    if not math.isfinite(result):
        raise ScenarioError(f"{field} = {result!r} is not a finite number.")
    return result


def scenario_to_dict(formulation: Formulation) -> dict:
    """The JSON-ready document of `formulation` (schema version `SCHEMA_VERSION`)."""
    from .registry import get_model

    liq = formulation.liquid
    law_units = {}
    if liq.law:
        law_units = {p.name: p.unit for p in get_model(liq.law, kind="liquid").params}
    liquid = {
        "name": liq.name,
        "preset": liq.preset,
        "law": liq.law,
        "parameters": {k: {"value": float(v), "unit": law_units.get(k, "")}
                       for k, v in liq.params.items()},
        "glycerol_mass_fraction": float(liq.glycerol_mass_fraction),
    }
    for key, (attr, _, unit) in _LIQUID_QUANTITIES.items():
        liquid[key] = _quantity(getattr(liq, attr), unit)
    for key in _LIQUID_NUMBERS:
        value = getattr(liq, key)
        liquid[key] = None if value is None else float(value)
    ingredients = []
    for ing in formulation.ingredients:
        doc = {"name": ing.name, "kind": ing.kind,
               "loading": {"value": float(ing.loading), "basis": ing.basis}}
        for key, (attr, _, unit) in _INGREDIENT_QUANTITIES.items():
            doc[key] = _quantity(getattr(ing, attr), unit)
        for key in _INGREDIENT_NUMBERS:
            value = getattr(ing, key)
            doc[key] = None if value is None else float(value)
        for key in _INGREDIENT_FLAGS:
            if getattr(ing, key):
                doc[key] = True
        doc["size_distribution"] = None if ing.size is None else ing.size.to_dict()
        ingredients.append(doc)
    return {
        "format": FORMAT,
        "schema_version": SCHEMA_VERSION,
        "name": formulation.name,
        "description": formulation.description,
        "relations": {"solids": formulation.model, "droplets": formulation.droplet_model,
                      "parameters": {k: float(v) for k, v in formulation.model_params.items()},
                      "droplet_parameters": {k: float(v) for k, v in
                                             formulation.droplet_model_params.items()},
                      "thickening_onset_stress": _quantity(
                          formulation.thickening_onset_stress_Pa, "Pa"),
                      "phi_max_frictional": formulation.phi_max_frictional},
        "liquid": liquid,
        "ingredients": ingredients,
    }


_KNOWN_KEYS = {
    "": {"format", "schema_version", "name", "description", "relations", "liquid",
         "ingredients"},
    "liquid": {"name", "preset", "law", "parameters", "glycerol_mass_fraction",
               *_LIQUID_QUANTITIES, *_LIQUID_NUMBERS},
    "ingredient": {"name", "kind", "loading", "size_distribution", *_INGREDIENT_QUANTITIES,
                   *_INGREDIENT_NUMBERS, *_INGREDIENT_FLAGS},
    "relations": {"solids", "droplets", "parameters", "droplet_parameters",
                  "thickening_onset_stress", "phi_max_frictional"},
}


def unknown_keys(doc) -> list[str]:
    """Keys of a scenario document that Loadline does not read (typos, other tools' notes)."""
    if not isinstance(doc, dict):
        return []
    found = [k for k in doc if k not in _KNOWN_KEYS[""]]
    for part in ("liquid", "relations"):
        if isinstance(doc.get(part), dict):
            found += [f"{part}.{k}" for k in doc[part] if k not in _KNOWN_KEYS[part]]
    items = doc.get("ingredients")
    for i, item in enumerate(items if isinstance(items, list) else []):
        if isinstance(item, dict):
            found += [f"ingredients[{i}].{k}" for k in item
                      if k not in _KNOWN_KEYS["ingredient"]]
    return found


def scenario_from_dict(doc: dict, source: str = "the scenario") -> Formulation:
    """Build a Formulation from a scenario document, migrating older schema versions.

    Keys Loadline does not know are ignored, with one `UserWarning` that lists them (a typo
    such as ``densty`` would otherwise drop a value silently).
    """
    try:
        return _from_dict(doc, source)
    except LoadlineError:
        raise
    except (KeyError, TypeError, ValueError, AttributeError) as err:
        raise ScenarioError(f"the scenario is malformed: {type(err).__name__}: {err}") from None


def _from_dict(doc: dict, source: str) -> Formulation:
    if not isinstance(doc, dict) or doc.get("format") != FORMAT:
        raise ScenarioError(f"not a Loadline scenario: the field 'format' must be {FORMAT!r}.")
    version = doc.get("schema_version")
    if not isinstance(version, int) or isinstance(version, bool) or version < 1:
        raise ScenarioError(f"schema_version = {version!r}: expected a whole number from 1.")
    if version > SCHEMA_VERSION:
        raise ScenarioError(f"schema_version = {version} is newer than this Loadline reads "
                            f"(up to {SCHEMA_VERSION}); update Loadline to open it.")
    while version < SCHEMA_VERSION:
        doc = _MIGRATIONS[version](doc)
        version = doc["schema_version"]
    extra = unknown_keys(doc) + _unknown_parameters(doc)   # after migration: renamed keys
    if extra:                                                # are known again
        warnings.warn(f"{source}: ignored unknown keys {', '.join(extra)}", UserWarning,
                      stacklevel=4)
    raw = _object(doc.get("liquid"), "liquid")
    liquid_kwargs = {}
    for key, (attr, dimension, _) in _LIQUID_QUANTITIES.items():
        value = _read_quantity(raw.get(key), dimension, f"liquid.{key}")
        if value is not None:
            liquid_kwargs[attr] = value
    for key in _LIQUID_NUMBERS:
        if raw.get(key) is not None:
            liquid_kwargs[key] = number(raw[key], f"liquid.{key}")
    law = str(raw.get("law", "newtonian"))
    law_units = _law_units(law)
    params = {}
    for name, q in _object(raw.get("parameters") or {}, "liquid.parameters").items():
        if law_units is not None and name not in law_units:
            continue   # named in the warning above
        unit = q.get("unit", "") if isinstance(q, dict) else ""
        value = q.get("value") if isinstance(q, dict) else q
        params[name] = _si_from_unit(value, str(unit), f"liquid.parameters.{name}",
                                     (law_units or {}).get(name))
    glycerol = raw.get("glycerol_mass_fraction", 0.0)
    liquid = Liquid(name=str(raw.get("name", "")), preset=str(raw.get("preset", "")),
                    law=law, params=params,
                    glycerol_mass_fraction=number(glycerol, "liquid.glycerol_mass_fraction"),
                    **liquid_kwargs)
    items = doc.get("ingredients", [])
    if not isinstance(items, list):
        raise ScenarioError(f"ingredients: expected a list, got {type(items).__name__}.")
    if len(items) > MAX_INGREDIENTS:
        raise ScenarioError(f"ingredients: {len(items)} given, at most {MAX_INGREDIENTS} are "
                            "read (a formulation has a handful of dispersed ingredients; the "
                            "limit bounds the work of every prediction).")
    ingredients = []
    for k, item in enumerate(items):
        where = f"ingredients[{k}]"
        item = _object(item, where)
        kwargs = {}
        for key, (attr, dimension, _) in _INGREDIENT_QUANTITIES.items():
            value = _read_quantity(item.get(key), dimension, f"{where}.{key}")
            if value is not None:
                kwargs[attr] = value
        for key in _INGREDIENT_NUMBERS:
            if item.get(key) is not None:
                kwargs[key] = number(item[key], f"{where}.{key}")
        for key in _INGREDIENT_FLAGS:
            if item.get(key) is not None:
                if not isinstance(item[key], bool):
                    raise ScenarioError(f"{where}.{key} = {item[key]!r}: expected true or false.")
                kwargs[key] = item[key]
        loading = _object(item.get("loading"), f"{where}.loading")
        dist = item.get("size_distribution")
        ingredients.append(Ingredient(
            name=str(item.get("name", f"ingredient {k + 1}")), kind=str(item.get("kind", "solid")),
            loading=number(loading.get("value"), f"{where}.loading.value"),
            basis=str(loading.get("basis", "mass")),
            size=_read_distribution(dist, f"{where}.size_distribution"), **kwargs))
    relations = _object(doc.get("relations", {}), "relations")
    model_params = _object(relations.get("parameters", {}), "relations.parameters")
    known = _relation_parameters(relations)
    frictional = relations.get("phi_max_frictional")
    return Formulation(
        liquid=liquid, ingredients=tuple(ingredients), name=str(doc.get("name", "")),
        description=str(doc.get("description", "")),
        model=str(relations.get("solids", "krieger-dougherty")),
        droplet_model=str(relations.get("droplets", "phan-thien-pham")),
        model_params={k: number(v, f"relations.parameters.{k}") for k, v in model_params.items()
                      if known is None or k in known},
        droplet_model_params=_droplet_parameters(relations),
        thickening_onset_stress_Pa=_read_quantity(relations.get("thickening_onset_stress"),
                                                  "stress", "relations.thickening_onset_stress"),
        phi_max_frictional=(None if frictional is None
                            else number(frictional, "relations.phi_max_frictional")))


def _object(raw, field: str) -> dict:
    if not isinstance(raw, dict):
        raise ScenarioError(f"{field}: expected an object {{...}}, got {raw!r:.60}.")
    return raw


def _law_units(law: str) -> dict | None:
    """Parameter name -> registry unit of a liquid law (None when the law is unknown: the
    Liquid itself then names the law as unknown)."""
    from .errors import UnknownModelError
    from .registry import get_model

    try:
        return {p.name: p.unit for p in get_model(law, kind="liquid").params}
    except UnknownModelError:
        return None


def _relation_parameters(relations: dict) -> set | None:
    """Names `relations.parameters` may hold: those of the solid and droplet relations, and
    the phi_max and intrinsic viscosity a calibration overrides (None: a relation unknown)."""
    from .errors import UnknownModelError
    from .registry import get_model

    names = {"phi_max", "intrinsic_viscosity"}
    for key, default in (("solids", "krieger-dougherty"), ("droplets", "phan-thien-pham")):
        try:
            names |= set(get_model(str(relations.get(key, default))).param_names())
        except UnknownModelError:
            return None
    return names


def _unknown_parameters(doc: dict) -> list[str]:
    """Relation and liquid-law parameters the named relations do not take."""
    found = []
    relations = doc.get("relations")
    if isinstance(relations, dict) and isinstance(relations.get("parameters"), dict):
        known = _relation_parameters(relations)
        if known is not None:
            found += [f"relations.parameters.{k}" for k in relations["parameters"]
                      if k not in known]
    if isinstance(relations, dict) and isinstance(relations.get("droplet_parameters"), dict):
        from .errors import UnknownModelError
        from .registry import get_model

        try:
            known = set(get_model(str(relations.get("droplets", "phan-thien-pham")),
                                  kind="emulsion").param_names())
        except UnknownModelError:
            known = None
        if known is not None:
            found += [f"relations.droplet_parameters.{k}"
                      for k in relations["droplet_parameters"] if k not in known]
    liquid = doc.get("liquid")
    if isinstance(liquid, dict) and isinstance(liquid.get("parameters"), dict):
        units = _law_units(str(liquid.get("law", "newtonian")))
        if units is not None:
            found += [f"liquid.parameters.{k}" for k in liquid["parameters"] if k not in units]
    return found


def _droplet_parameters(relations: dict) -> dict:
    """The droplets' relation parameters; files before they had their own space kept one
    space for both relations, so the shared parameters that the droplet relation takes are
    read as its own (what those files meant)."""
    if "droplet_parameters" in relations:
        given = _object(relations["droplet_parameters"] or {}, "relations.droplet_parameters")
        return {k: number(v, f"relations.droplet_parameters.{k}") for k, v in given.items()}
    try:
        names = get_model(str(relations.get("droplets", "phan-thien-pham")),
                          kind="emulsion").param_names()
    except LoadlineError:
        return {}
    shared = _object(relations.get("parameters", {}), "relations.parameters")
    return {k: number(v, f"relations.parameters.{k}") for k, v in shared.items() if k in names}


def _read_distribution(raw, field: str):
    """A SizeDistribution from its table form, or from a generator written by hand.

    Generators: {"type": "lognormal", "median": "5 um", "geometric_std": 1.8,
    "basis": "volume"}, {"type": "rosin-rammler", "characteristic": "20 um",
    "uniformity": 1.2}, {"type": "single", "diameter": "2 um"}. They are written back as
    the table they generate, so a round trip of the Formulation stays exact.
    """
    if raw is None:
        return None
    if not isinstance(raw, dict):
        raise ScenarioError(f"{field}: expected an object, got {raw!r}.")
    kind = raw.get("type", "table")
    dist = sizes.SizeDistribution
    if kind == "table":
        for key in ("diameters_m", "fractions"):
            values = raw.get(key)
            if isinstance(values, list):
                for i, value in enumerate(values):
                    number(value, f"{field}.{key}[{i}]")
        return dist.from_dict(raw).limit_classes(field=field)
    if kind == "lognormal":
        return dist.lognormal(_read_quantity(raw.get("median"), "length", f"{field}.median"),
                              number(raw.get("geometric_std", 1.0), f"{field}.geometric_std"),
                              basis=str(raw.get("basis", "volume")))
    if kind == "rosin-rammler":
        return dist.rosin_rammler(
            _read_quantity(raw.get("characteristic"), "length", f"{field}.characteristic"),
            number(raw.get("uniformity", 1.0), f"{field}.uniformity"))
    if kind == "single":
        return dist.single(_read_quantity(raw.get("diameter"), "length", f"{field}.diameter"))
    raise ScenarioError(f"{field}.type = {kind!r}: expected 'table', 'lognormal', "
                        "'rosin-rammler' or 'single'.")


def _si_from_unit(value, unit: str, field: str, expected: str | None = None) -> float:
    """SI value of a law parameter, checked against the unit its relation declares.

    `expected` is the registry unit ("Pa*s", "s", "-" ...); a power-law consistency
    (``consistency_*``) may carry any Pa*s**n (mass / length / time**k).
    """
    value = number(value, f"{field}.value")
    if unit.strip() in ("", "-"):
        return value    # a bare number is in SI units, as everywhere in a scenario
    from .units import Q_, check_dimension

    try:
        q = Q_(value, unit)
    except Exception as err:  # pint raises many kinds; report them as one
        raise UnitError(f"{field}: unit {unit!r} is not understood ({type(err).__name__})."
                        ) from None
    if expected is not None:
        check_dimension(q, expected, field, power_law=field.split(".")[-1].startswith(
            "consistency"))
    return float(q.to_base_units().magnitude)


def dumps(formulation: Formulation) -> str:
    """The scenario document as JSON text."""
    return json.dumps(scenario_to_dict(formulation), indent=2, ensure_ascii=False) + "\n"


def loads(text: str, source: str = "the scenario") -> Formulation:
    """A Formulation from JSON text; `ScenarioError` with the reason if it is not one."""
    if not text.strip():
        raise ScenarioError("the scenario is empty; expected a JSON object.")
    if "\x00" in text:
        raise ScenarioError("the scenario holds NUL characters: a binary file, not JSON.")
    try:
        doc = load_json(text, "the scenario")
    except json.JSONDecodeError as err:
        ends_early = err.pos >= len(text.rstrip()) or err.msg.startswith("Unterminated")
        cut = " (the file ends early: truncated?)" if ends_early else ""
        raise ScenarioError(f"the scenario is not valid JSON (line {err.lineno}, "
                            f"column {err.colno}: {err.msg}){cut}.") from None
    return scenario_from_dict(doc, source)


def read_scenario(path) -> Formulation:
    """Read a `*.loadline.json` file.

    Raises
    ------
    ScenarioError
        Missing, too large, empty, binary, not UTF-8 (Latin-1 is refused, not guessed), not
        JSON, malformed, or newer than this version; the message names the last good copy
        (`.bak`) when one exists.
    """
    path = pathlib.Path(path)
    try:
        if path.stat().st_size > MAX_BYTES:
            raise ScenarioError(f"{path.name} is larger than {MAX_BYTES // 1_000_000} MB; "
                                "a scenario is a few kB.")
        data = path.read_bytes()
        text = data.decode("utf-8-sig")
    except OSError as err:
        raise ScenarioError(f"cannot read {path}: {err.strerror or err}.") from None
    except UnicodeDecodeError as err:
        line = data[:err.start].count(b"\n") + 1
        raise ScenarioError(f"{path.name} is not UTF-8 text (line {line}: byte "
                            f"0x{data[err.start]:02x}); a scenario is UTF-8 JSON, Latin-1 is "
                            "not guessed.") from None
    try:
        return loads(text, path.name)
    except ScenarioError as err:
        backup = path.with_name(path.name + ".bak")
        hint = f" The last good copy is kept in {backup.name}." if backup.exists() else ""
        raise ScenarioError(f"{path.name}: {err}{hint}") from None


def write_scenario(formulation: Formulation, path, inputs=()) -> pathlib.Path:
    """Write `formulation` to `path` atomically; keep the previous good file as `.bak`.

    Goes through `files.atomic_write`: `path` is refused when it is one of `inputs`, an
    existing file keeps its permission bits, and no temporary file is left behind.
    """
    path = pathlib.Path(path)
    text = dumps(formulation)
    loads(text)  # never write what cannot be read back
    path.parent.mkdir(parents=True, exist_ok=True)
    if path.exists():
        try:
            old = path.read_bytes()
            loads(old.decode("utf-8-sig"))
            atomic_write(path.with_name(path.name + ".bak"), old, inputs)
        except (LoadlineError, OSError, UnicodeDecodeError):
            pass  # the old file is not a good copy: keep the .bak we have
    return atomic_write(path, text, inputs)
