"""Words for people: parameter labels with their units, and words for values with no number.

The edges (app, CLI, report) show a relation's parameters and results to formulators, who
should read "zero-shear viscosity η₀ [Pa·s]", not ``zero_shear_viscosity_Pa_s`` with an empty
unit cell, and "no flow (jammed)", not a bare ``inf``. The registry's `Param` carries a
description and a unit; `param_label` turns them into one label, and `value_words` gives the
words for an infinite or missing value of a named quantity. No numpy or pandas here: the
CLI's start-up stays light.
"""

from __future__ import annotations

import math
import re

#: Unit spellings of the registry (pint) as people write them.
_UNIT_TEXT = {"-": "–", "": "–", "Pa*s": "Pa·s", "kg/m**3": "kg/m³", "N/m": "N/m",
              "1/s": "1/s", "m": "m", "s": "s", "Pa": "Pa", "K": "K", "J": "J"}
#: Symbols of the registry descriptions as they are printed.
_SYMBOLS = {"eta_0": "η₀", "eta_inf": "η∞", "tau_y": "τy", "mu_p": "μp", "mu_c": "μc",
            "lambda": "λ", "[eta]": "[η]", "k_H": "kH"}
#: The unit of a consistency K, whatever the registry spells (its description says so).
_CONSISTENCY_UNIT = "Pa·sⁿ"
#: SI suffixes of code names, longest first: (suffix, unit).
_SUFFIXES = (("_kg_per_m3", "kg/m**3"), ("_N_per_m", "N/m"), ("_1_per_s", "1/s"),
             ("_m3_per_s", "m³/s"), ("_Pa_s", "Pa*s"), ("_Pa", "Pa"), ("_K", "K"),
             ("_m", "m"), ("_s", "s"))


def unit_text(unit: str) -> str:
    """A registry unit as people write it: ``Pa*s`` -> ``Pa·s``, ``-`` -> ``–``.

    Examples
    --------
    >>> unit_text("Pa*s"), unit_text("-"), unit_text("1/s")
    ('Pa·s', '–', '1/s')
    """
    return _UNIT_TEXT.get(unit, unit.replace("**3", "³").replace("**2", "²").replace("*", "·"))


def param_words(param) -> str:
    """The words of a registry `Param`: its description up to the first colon or bracket.

    Examples
    --------
    >>> from predictor.registry import Param
    >>> param_words(Param("yield_stress_Pa", "Pa", (0, 1e6), "yield stress tau_y"))
    'yield stress τy'
    """
    words = re.split(r"\s*[:(]", param.description, maxsplit=1)[0].strip()
    words = " ".join(_SYMBOLS.get(w, w) for w in words.split())
    return words or param.name.replace("_", " ")


def param_unit(param) -> str:
    """The unit of a registry `Param` as printed (``Pa·sⁿ`` for a consistency K)."""
    if "Pa*s**n" in param.description:
        return _CONSISTENCY_UNIT
    return unit_text(param.unit)


def param_label(param) -> str:
    """One label for a registry `Param`: its words and its unit in brackets.

    Examples
    --------
    >>> import predictor as pr
    >>> spec = pr.get_model("carreau-yasuda")
    >>> [param_label(p) for p in spec.params][:3]
    ['zero-shear viscosity η₀ [Pa·s]', 'infinite-shear viscosity η∞ [Pa·s]', 'time constant λ [s]']
    >>> param_label(pr.get_model("herschel-bulkley").params[1])
    'consistency K [Pa·sⁿ]'
    """
    return f"{param_words(param)} [{param_unit(param)}]"


def find_param(name: str, kinds: tuple[str, ...] | None = None, model: str | None = None):
    """The registry `Param` called `name`: of relation `model` when it has one, else of the
    first relation (of `kinds`) that has it; None if no relation has it."""
    from .registry import models

    specs = models()
    for spec in sorted(specs, key=lambda s: s.name != model):
        if kinds and spec.kind not in kinds:
            continue
        for param in spec.params:
            if param.name == name:
                return param
    return None


def name_label(name: str, kinds: tuple[str, ...] | None = None,
               model: str | None = None) -> tuple[str, str]:
    """(words, unit) for a code name: from the registry when it is a parameter there, else
    from its SI suffix (``thickening_onset_stress_Pa`` -> ``thickening onset stress``, ``Pa``).

    Examples
    --------
    >>> name_label("zero_shear_viscosity_Pa_s", ("liquid",))
    ('zero-shear viscosity η₀', 'Pa·s')
    >>> name_label("phi_max", model="krieger-dougherty")
    ('maximum packing fraction', '–')
    >>> name_label("thickening_onset_stress_Pa")
    ('thickening onset stress', 'Pa')
    """
    param = find_param(name, kinds, model)
    if param is not None:
        return param_words(param), param_unit(param)
    for suffix, unit in _SUFFIXES:
        if name.endswith(suffix) and len(name) > len(suffix):
            return name[: -len(suffix)].replace("_", " "), unit_text(unit)
    return name.replace("_", " "), "–"


#: Words for an infinite value, by the quantity it stands for.
INFINITE_WORDS = {
    "viscosity": "no flow (jammed)",
    "relative viscosity": "no flow (jammed)",
    "shear stress": "no flow (jammed)",
    "breakup diameter": "no breakup in simple shear: viscosity ratio above 4",
    "critical capillary number": "no breakup in simple shear: viscosity ratio above 4",
    "settling time": "never (held by a yield stress, or no density difference)",
    "time to a clear layer": "never (held by a yield stress, or no density difference)",
    "onset": "none in this range",
    "aicc": "not defined (too few points)",
}
#: Words for a missing value (NaN), by quantity.
MISSING_WORDS = {"phi_max": "not computed", "onset": "none in this range",
                 "headroom": "no solids"}


def value_words(value, quantity: str = "") -> str | None:
    """Words for a value with no number (inf, -inf, NaN, None); None for an ordinary number.

    Examples
    --------
    >>> value_words(float("inf"), "viscosity")
    'no flow (jammed)'
    >>> value_words(float("nan"))
    'not available'
    >>> value_words(2.5, "viscosity") is None
    True
    """
    if value is None:
        return MISSING_WORDS.get(quantity, "not available")
    try:
        x = float(value)
    except (TypeError, ValueError):
        return None
    if math.isnan(x):
        return MISSING_WORDS.get(quantity, "not available")
    if math.isinf(x):
        if x < 0:
            return "unbounded below"
        return INFINITE_WORDS.get(quantity, "unbounded")
    return None


def quantity_of(column: str) -> str:
    """The quantity a table column stands for, for `value_words` (``viscosity [Pa*s]`` ->
    ``viscosity``; ``window 1 viscosity [mPa*s]`` -> ``viscosity``).

    Examples
    --------
    >>> quantity_of("relative viscosity [-]"), quantity_of("window 2 viscosity [Pa*s]")
    ('relative viscosity', 'viscosity')
    """
    text = re.sub(r"\s*\[.*\]\s*$", "", column).replace("_", " ").strip().lower()
    for quantity in sorted(INFINITE_WORDS, key=len, reverse=True):
        if text.endswith(quantity):
            return quantity
    return text
