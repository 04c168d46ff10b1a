"""The one registry of published relations.

A model module registers a relation by decorating its function with `@model(...)`. The app,
the CLI, the README table and the dispatchers (`relative_viscosity`, `max_packing`, ...) all
read this registry, so adding a relation is one function plus its decorator.
"""

from __future__ import annotations

import functools
import inspect
from collections.abc import Callable
from dataclasses import dataclass

from .errors import InputRangeError, UnknownModelError

KINDS = ("suspension", "emulsion", "packing", "liquid", "shear", "thixotropy", "process",
         "interaction")


@dataclass(frozen=True)
class Param:
    """One parameter of a relation: its unit (pint spelling), bounds and meaning."""

    name: str
    unit: str
    bounds: tuple[float, float]
    description: str


@dataclass(frozen=True)
class ModelSpec:
    """Frozen metadata of one registered relation.

    `phi_range` is the range of volume fraction the relation was derived or fitted for;
    with `phi_range_relative` it is a range of phi / phi_max instead.
    """

    name: str
    kind: str
    func: Callable
    params: tuple[Param, ...]
    validity: str
    source: str
    phi_range: tuple[float, float] = (0.0, 1.0)
    phi_range_relative: bool = False

    def defaults(self) -> dict[str, float]:
        """Default parameter values, read from the function signature (a fresh dict)."""
        return dict(_signature_defaults(self.func, self.param_names()))

    def param_names(self) -> tuple[str, ...]:
        return tuple(p.name for p in self.params)

    def check_params(self, params: dict) -> dict[str, float]:
        """Defaults overlaid with `params`; unknown names or values out of bounds raise."""
        import numpy as np  # here, not at the top: `loadline models` reads the registry module

        unknown = set(params) - set(self.param_names())
        if unknown:
            name = sorted(unknown)[0]
            raise InputRangeError(
                name, params[name], f"one of the parameters of {self.name}: "
                f"{', '.join(self.param_names()) or 'none'}"
            )
        values = {**self.defaults(), **params}
        for p in self.params:
            bad = self.out_of_bounds(p, values[p.name])
            if np.any(bad):
                raise self.param_error(p, np.asarray(values[p.name], dtype=float)[bad].flat[0])
        return values

    def out_of_bounds(self, param: Param, value):
        """Where `value` (scalar or array) lies outside `param`'s bounds; NaN fails.

        The one bounds test of `check_params`, which the batch applies to many rows at once.
        """
        import numpy as np

        value = np.asarray(value, dtype=float)
        low, high = param.bounds
        return ~((value >= low) & (value <= high))

    def param_error(self, param: Param, value) -> InputRangeError:
        """The error `check_params` raises for `param` = `value` outside its bounds."""
        low, high = param.bounds
        return InputRangeError(param.name, value,
                               f"{low:g} to {high:g} [{param.unit}] for {self.name}")

    def validity_message(self, phi, params: dict) -> str | None:
        """A plain sentence when some phi lies outside the relation's validity range."""
        import numpy as np

        phi = np.asarray(phi, dtype=float)
        if self.phi_range_relative:
            scale = np.asarray(params.get("phi_max", 1.0), dtype=float)
            x, what = phi / scale, "phi/phi_max"
        else:
            x, what = phi, "phi"
        low, high = self.phi_range
        outside = (x < low) | (x > high)
        if not np.any(outside):
            return None
        worst = float(np.max(x[outside])) if np.any(x > high) else float(np.min(x[outside]))
        return (
            f"{self.name} is used at {what} = {worst:.3g}, outside its validity range "
            f"{low:g} to {high:g} ({self.validity})."
        )


_MODELS: dict[str, ModelSpec] = {}
#: The modules that register relations; `models()` and `get_model()` import them on first use.
MODEL_MODULES = ("suspension", "emulsion", "packing", "liquids", "shear", "sizes", "stability",
                 "thixotropy", "process", "interactions")
_LOADED: list[bool] = []


def _load_relations() -> None:
    """Import every model module once, so that every relation is registered."""
    if _LOADED:
        return
    _LOADED.append(True)   # before importing: a module that reads the registry re-enters
    import importlib

    for name in MODEL_MODULES:
        importlib.import_module(f"predictor.{name}")


def model(kind: str, *params: Param, validity: str, source: str,
          phi_range=(0.0, 1.0), phi_range_relative=False):
    """Register the decorated function as a relation of `kind`; the function is unchanged."""
    if kind not in KINDS:
        raise ValueError(f"kind {kind!r} is not one of {KINDS}")

    def register(func):
        name = func.__name__.replace("_", "-")
        if name in _MODELS:
            raise RuntimeError(f"model {name!r} registered twice")
        _MODELS[name] = ModelSpec(name, kind, func, tuple(params), validity, source,
                                  tuple(phi_range), phi_range_relative)
        return func

    return register


def models(kind: str | None = None) -> list[ModelSpec]:
    """Every registered relation, or those of one kind: by kind (the order of `KINDS`),
    then in the order their module registers them (the same whichever module loaded first).
    """
    _load_relations()
    ordered = sorted(_MODELS.values(), key=lambda s: KINDS.index(s.kind))
    return [s for s in ordered if kind is None or s.kind == kind]


def get_model(name: str, kind: str | tuple[str, ...] | None = None) -> ModelSpec:
    """The spec registered under `name`; `UnknownModelError` lists the valid names."""
    _load_relations()
    kinds = (kind,) if isinstance(kind, str) else kind
    spec = _MODELS.get(str(name).strip().lower().replace("_", "-").replace(" ", "-"))
    if spec is None or (kinds is not None and spec.kind not in kinds):
        valid = [s.name for s in models() if kinds is None or s.kind in kinds]
        raise UnknownModelError("model", name, valid)
    return spec


def models_markdown(kind: str | None = None) -> str:
    """The registry as a Markdown table (the README's table is generated from this)."""
    lines = ["| relation | kind | parameters (default) | valid for | source |",
             "| --- | --- | --- | --- | --- |"]
    for spec in models(kind):
        defaults = spec.defaults()
        params = ", ".join(f"`{p.name}` ({_short(defaults.get(p.name))})" for p in spec.params)
        lines.append(f"| `{spec.name}` | {spec.kind} | {params or '-'} | {spec.validity} | "
                     f"{spec.source} |")
    return "\n".join(lines) + "\n"


def _short(value) -> str:
    return f"{value:g}" if isinstance(value, int | float) and not isinstance(value, bool) else "-"


def _write_readme_table(path) -> None:
    """Replace the table between the README's models markers with `models_markdown()`."""
    import pathlib

    # Run as a script this module is __main__: read the registry of the imported package.
    from predictor.files import atomic_write
    from predictor.registry import models_markdown as table

    path = pathlib.Path(path)
    text = path.read_text()
    start = text.index("<!-- models:start -->") + len("<!-- models:start -->\n")
    end = text.index("<!-- models:end -->")
    atomic_write(path, text[:start] + table() + text[end:])


#: The static snapshot of the registry that `loadline models` reads without numpy.
SNAPSHOT = "data/models.json"


def snapshot() -> list[dict]:
    """The registry as plain JSON-ready data: one dict per relation.

    Each parameter is an object ``{name, unit, default, bounds, description}``; ``default``
    is None where the function has no default and an infinite bound is None (JSON has no
    inf). `loadline models` prints this from `predictor/data/models.json`, so listing the
    relations imports no numeric library; tests/test_registry.py fails when it is stale.
    """
    import math

    def number(x):
        return float(x) if isinstance(x, int | float) and math.isfinite(x) else None

    out = []
    for spec in models():
        defaults = spec.defaults()
        out.append({
            "name": spec.name, "kind": spec.kind,
            "parameters": [{"name": p.name, "unit": p.unit,
                            "default": number(defaults.get(p.name)),
                            "bounds": [number(p.bounds[0]), number(p.bounds[1])],
                            "description": p.description} for p in spec.params],
            "validity": spec.validity, "source": spec.source,
            "phi_range": [number(x) for x in spec.phi_range],
            "phi_range_relative": spec.phi_range_relative,
        })
    return out


def snapshot_text() -> str:
    import json

    return json.dumps(snapshot(), indent=1, ensure_ascii=False) + "\n"


if __name__ == "__main__":
    import pathlib
    import sys

    if sys.argv[1:] == ["--readme"]:
        _write_readme_table(pathlib.Path(__file__).parents[1] / "README.md")
    elif sys.argv[1:] == ["--snapshot"]:
        # Run as a script this module is __main__: read the registry of the imported package.
        from predictor.registry import SNAPSHOT, snapshot_text

        (pathlib.Path(__file__).parent / SNAPSHOT).write_text(snapshot_text())
    else:
        raise SystemExit("usage: python -m predictor.registry --readme | --snapshot")


@functools.lru_cache(maxsize=1024)
def _signature_defaults(func, names: tuple[str, ...]) -> tuple[tuple[str, object], ...]:
    """(name, default) of `func`'s parameters in `names` (read once per function: the engine
    and the batch ask for them once per row)."""
    sig = inspect.signature(func)
    return tuple((p.name, p.default) for p in sig.parameters.values()
                 if p.default is not inspect.Parameter.empty and p.name in names)
