"""Units at the edges: the one pint registry of Loadline and the parsers that use it.

The app, the CLI and the scenario reader turn user text such as "120 cP", "2.5 um",
"25 degC" or "35 wt%" into SI floats here; the model modules never see pint.
"""

from __future__ import annotations

import functools
import re

import numpy as np

from .errors import InputRangeError, UnitError


@functools.cache
def registry():
    """The one pint `UnitRegistry` of Loadline, built on first use.

    Building it reads pint's definitions file (about 0.2 s here); pint's own disk cache
    (``cache_folder=":auto:"``, the per-user cache folder) cuts that to about 0.05 s from
    the second process on. A cache folder that cannot be written or read is skipped.
    """
    import pint

    try:
        ureg = pint.UnitRegistry(cache_folder=":auto:")
    except Exception:  # noqa: BLE001  read-only home, a half-written cache file, ...
        ureg = pint.UnitRegistry()
    # "cm3" and "m2" are common in data sheets; pint wants "cm**3".
    ureg.preprocessors.append(lambda s: re.sub(r"(?<=[a-zA-Zµ])([23])\b", r"**\1", s))
    return ureg


def __getattr__(name: str):
    # `units.ureg` and `units.Q_` stay available, built only when first asked for.
    if name == "ureg":
        return registry()
    if name == "Q_":
        return registry().Quantity
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")

#: Dimension names accepted by `parse_quantity`, with the SI unit each is converted to.
SI_UNITS = {
    "viscosity": "Pa*s",
    "length": "m",
    "density": "kg/m**3",
    "shear_rate": "1/s",
    "stress": "Pa",
    "temperature": "K",
    "interfacial_tension": "N/m",
    "time": "s",
    "dimensionless": "",
    "consistency": "Pa*s",   # power-law consistency K: Pa*s^n, checked loosely (n varies)
    "flow_rate": "m**3/s",
    "pressure": "Pa",
    "potential": "V",
    "energy": "J",
    "concentration": "mol/L",
}

_NUMBER = r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?"
_SPLIT = re.compile(rf"^\s*({_NUMBER})\s*(.*?)\s*$")
_LOADING = re.compile(
    rf"^\s*({_NUMBER})\s*(wt\s*%|w/?w\s*%?|%\s*w/?w|mass\s*%|vol\s*%|v/?v\s*%?|%\s*v/?v|"
    rf"volume\s*%|%)?\s*$",
    re.IGNORECASE,
)


def parse_quantity(text, dimension: str, field: str) -> float:
    """SI float of a quantity given as text ("120 cP") or a number already in SI.

    Parameters
    ----------
    text : str or float
        The user's entry. A bare number is taken as already in the SI unit.
    dimension : str
        One of the keys of `SI_UNITS`.
    field : str
        The name shown in an error message.

    Raises
    ------
    UnitError
        The text cannot be read or has the wrong dimension.

    Examples
    --------
    >>> parse_quantity("120 cP", "viscosity", "liquid viscosity")
    0.12
    >>> parse_quantity("25 degC", "temperature", "temperature")
    298.15
    """
    if dimension not in SI_UNITS:
        raise ValueError(f"unknown dimension {dimension!r}")
    target = SI_UNITS[dimension]
    if isinstance(text, int | float | np.floating | np.integer):
        return float(text)
    raw = str(text).strip().replace("·", "*").replace("μ", "µ")
    match = _SPLIT.match(raw)
    if not match:
        raise UnitError(f"{field} = {text!r} could not be read; write a number and a unit, "
                        f"e.g. '1.5 {target or '-'}'.")
    number, unit = float(match.group(1)), match.group(2)
    if re.fullmatch(r"[mµu]?Pas", unit):
        raise UnitError(f"{field} = {text!r}: write '{unit[:-1]}*s' or 'cP' for a viscosity "
                        f"('{unit}' reads as pascals).")
    if not unit:
        return number
    try:
        scale, offset = _affine(unit, target)
    except Exception as err:  # noqa: BLE001  pint's parser raises many kinds on odd text
        raise UnitError(f"{field} = {text!r} could not be converted to {target or 'a pure number'}"
                        f" ({type(err).__name__}).") from None
    if scale is None:       # not an affine unit: let pint convert this very number
        ureg = registry()
        q = ureg.Quantity(number, ureg.parse_units(unit))
        return float(q.m_as(target)) if target else float(q.to("dimensionless").magnitude)
    return number * scale + offset


@functools.lru_cache(maxsize=512)
def _affine(unit: str, target: str) -> tuple[float | None, float]:
    """(scale, offset) with value_in_target = value * scale + offset, found once per unit.

    pint parses a unit in about a tenth of a millisecond; the app converts dozens of values
    per interaction, so each unit pair is resolved once. Every unit pint knows for our
    dimensions is affine (degC, degF included); the map is checked at a third point and
    ``(None, 0)`` sends a non-affine unit back to pint for every value.
    """
    def convert(x: float) -> float:
        ureg = registry()
        q = ureg.Quantity(x, ureg.parse_units(unit))
        return float(q.m_as(target)) if target else float(q.to("dimensionless").magnitude)

    offset = convert(0.0)
    scale = convert(1.0) - offset
    probe = convert(1000.0)
    if not np.isclose(probe, 1000.0 * scale + offset, rtol=1e-12, atol=1e-300):
        return None, 0.0
    return scale, offset


def to_si(value: float, unit: str, dimension: str, field: str = "value") -> float:
    """Convert `value` given in `unit` to the SI unit of `dimension`.

    Examples
    --------
    >>> to_si(120, "cP", "viscosity")
    0.12
    """
    return parse_quantity(f"{value!r} {unit}", dimension, field) if unit else float(value)


def from_si(value, unit: str, dimension: str):
    """Convert an SI value (float or array) to `unit`; the inverse of `to_si`.

    Examples
    --------
    >>> from_si(0.12, "mPa*s", "viscosity")
    120.0
    """
    target = SI_UNITS[dimension]
    scale, offset = _affine(target, unit) if unit else (1.0, 0.0)
    if scale is None:
        magnitude = registry().Quantity(np.asarray(value, dtype=float), target).m_as(unit)
    else:
        magnitude = np.asarray(value, dtype=float) * scale + offset
    return float(magnitude) if np.ndim(magnitude) == 0 else magnitude


def check_dimension(quantity, expected: str, field: str, power_law: bool = False) -> None:
    """Refuse a pint quantity whose unit is not of the dimension of `expected`.

    `expected` is a unit ("Pa*s", "s", "-" or "" for a pure number). With `power_law`, any
    Pa*s**n is accepted (mass / length / time**k: a power-law consistency).

    Raises
    ------
    UnitError
        Naming the field, the unit given and the unit expected.

    Examples
    --------
    >>> Q_ = registry().Quantity
    >>> check_dimension(Q_(800, "mPa*s"), "Pa*s", "zero_shear_viscosity_Pa_s")
    >>> check_dimension(Q_(800, "mm"), "Pa*s", "eta_0")  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    predictor.errors.UnitError: eta_0: unit 'mm' has the dimension [length]; expected a ...
    """
    target = registry().parse_units("" if expected.strip() in ("", "-") else expected)
    dims = dict(quantity.dimensionality)
    if power_law:
        ok = dims.get("[mass]") == 1 and dims.get("[length]") == -1 and set(dims) <= {
            "[mass]", "[length]", "[time]"}
    else:
        ok = quantity.dimensionality == target.dimensionality
    if not ok:
        kinds = {"[mass] / [length] / [time]": "viscosity",
                 "[mass] / [length] / [time] ** 2": "stress", "[time]": "time",
                 "dimensionless": "pure number"}
        want = kinds.get(str(target.dimensionality), str(target.dimensionality))
        shown = f"{quantity.units:~}" or "-"
        raise UnitError(f"{field}: unit {shown!r} has the dimension "
                        f"{quantity.dimensionality}; expected a {want} unit like "
                        f"{expected.strip() or '-'!r}.")


def parse_loading(text, field: str = "loading", default_basis: str = "volume"):
    """Fraction in [0, 1] and its basis ("mass" or "volume") from text like "35 wt%".

    A bare number <= 1 is a fraction on `default_basis`; "%" alone takes `default_basis`.

    Examples
    --------
    >>> parse_loading("35 wt%")
    (0.35, 'mass')
    >>> parse_loading("12 vol%")
    (0.12, 'volume')
    """
    if isinstance(text, int | float | np.floating | np.integer):
        value, unit = float(text), ""
    else:
        match = _LOADING.match(str(text))
        if not match:
            raise UnitError(f"{field} = {text!r} could not be read; write e.g. '35 wt%', "
                            f"'12 vol%' or a fraction such as 0.12.")
        value, unit = float(match.group(1)), (match.group(2) or "").lower().replace(" ", "")
    if unit:
        value /= 100.0
        basis = ("mass" if re.search(r"w|mass", unit)
                 else "volume" if re.search(r"v", unit) else default_basis)
    else:
        basis = default_basis
    if not 0.0 <= value <= 1.0 or not np.isfinite(value):
        raise InputRangeError(field, text, "a loading from 0 to 100 % (a fraction 0 to 1)")
    return value, basis
