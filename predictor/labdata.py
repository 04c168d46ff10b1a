"""Lab data import: a CSV with units in the headers -> SI arrays ready for `fitting`.

An edge reader (it may use pandas and `predictor.units`). Headers name the quantity and its
unit, e.g. ``phi [-]``, ``wt% solids``, ``solids [vol%]``, ``viscosity [mPa*s]``,
``relative viscosity [-]``, ``shear rate [1/s]``, ``shear stress [Pa]``,
``temperature [degC]``. Lines starting with ``#`` are comments; the delimiter is ``,``,
``;`` or a tab, and in a ``;`` or tab file a decimal comma (``0,25``) is read as a decimal
point. The file must be UTF-8 (a BOM is allowed) and at most `MAX_BYTES`; Latin-1 or
Windows-1252 text is refused with the line of the first bad byte, not guessed, since a wrong
guess would silently misread units such as ``µm`` or ``°C``. Mass fractions are converted
to volume fractions with the densities of the formulation (solids in the liquid; ideal
mixing). Every error names the file line and the column.
"""

from __future__ import annotations

import csv
import io
import pathlib
import re
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from . import composition
from .errors import FitError, ScenarioError, UnitError
from .units import to_si

_BRACKET = re.compile(r"^(.*?)\s*[\[(]\s*([^\])]*?)\s*[\])]\s*$")
_NUMBER_UNIT = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
_MASS = re.compile(r"wt\s*%|w/w|mass\s*%|mass\s*fraction|weight\s*fraction", re.I)
_VOLUME = re.compile(r"vol\s*%|v/v|volume\s*fraction|\bphi\b", re.I)

#: role -> (dimension for units.to_si, SI column name)
ROLES = {
    "loading_volume": ("dimensionless", "phi"),
    "loading_mass": ("dimensionless", "mass_fraction"),
    "shear_rate": ("shear_rate", "shear_rate_1_per_s"),
    "viscosity": ("viscosity", "viscosity_Pa_s"),
    "relative_viscosity": ("dimensionless", "relative_viscosity"),
    "shear_stress": ("stress", "shear_stress_Pa"),
    "temperature": ("temperature", "temperature_K"),
}

MAX_BYTES = 5_000_000
_DECIMAL_COMMA = re.compile(r"^\s*[-+]?\d*,\d+(?:[eE][-+]?\d+)?(?=\s|$)")
_PLAIN_NUMBER = re.compile(r"^\s*[-+]?(?:\d+[.,]?\d*|[.,]\d+)(?:[eE][-+]?\d+)?\s*$")


@dataclass(frozen=True, eq=False)
class LabData:
    """Measurements in SI: a DataFrame with unit-named columns, and where each came from.

    `table` columns (those the file allows): phi, mass_fraction, shear_rate_1_per_s,
    viscosity_Pa_s, relative_viscosity, shear_stress_Pa, temperature_K, line (the file
    line of each row). `headers` maps each role to the file's header.
    """

    table: pd.DataFrame
    headers: dict
    source: str
    liquid_viscosity_Pa_s: float | None = None
    notes: tuple = field(default=())

    def _need(self, column: str, what: str) -> np.ndarray:
        if column not in self.table or self.table[column].isna().any():
            raise FitError(f"{self.source}: no {column} for every row; {what}")
        return self.table[column].to_numpy(dtype=float)

    def at_shear_rate(self, shear_rate_1_per_s: float, rel_tol: float = 1e-6) -> LabData:
        """The rows measured at one shear rate."""
        rates = self._need("shear_rate_1_per_s", "the file has no shear-rate column")
        keep = np.isclose(rates, shear_rate_1_per_s, rtol=rel_tol, atol=0)
        if not keep.any():
            raise FitError(f"{self.source}: no row at shear rate {shear_rate_1_per_s:g} 1/s; "
                           f"rates in the file: {', '.join(f'{r:g}' for r in np.unique(rates))}")
        return LabData(self.table[keep].reset_index(drop=True), self.headers, self.source,
                       self.liquid_viscosity_Pa_s, self.notes)

    def fit(self, model: str = "krieger-dougherty", **options):
        """`fitting.fit` on the loading series (relative viscosity against phi)."""
        from . import fitting

        if "shear_rate_1_per_s" in self.table and \
                self.table["shear_rate_1_per_s"].nunique() > 1:
            raise FitError(f"{self.source}: rows at several shear rates "
                           f"({self.table['shear_rate_1_per_s'].nunique()}); choose one with "
                           "at_shear_rate(...)")
        phi = self._need("phi", "give 'phi [-]' or 'vol%', or 'wt%' with the densities")
        eta_r = self._need("relative_viscosity", "give 'relative viscosity [-]', or an "
                           "absolute viscosity with the liquid's viscosity")
        return fitting.fit(phi, eta_r, model, **options)

    def fit_flow_curve(self, model: str, **options):
        """`fitting.fit_flow_curve` on viscosity against shear rate."""
        from . import fitting

        if "phi" in self.table and self.table["phi"].nunique() > 1:
            raise FitError(f"{self.source}: rows at several loadings; a flow curve needs one")
        rate = self._need("shear_rate_1_per_s", "give 'shear rate [1/s]'")
        eta = self._need("viscosity_Pa_s", "give 'viscosity [mPa*s]' or 'shear stress [Pa]'")
        return fitting.fit_flow_curve(rate, eta, model, **options)


def classify_header(header: str) -> tuple[str | None, str | None]:
    """Role and unit of a column header; (None, None) for a column Loadline does not use.

    Examples
    --------
    >>> classify_header("viscosity [mPa*s]")
    ('viscosity', 'mPa*s')
    >>> classify_header("wt% solids")
    ('loading_mass', '%')
    >>> classify_header("phi [-]")
    ('loading_volume', '')
    """
    text = header.strip()
    match = _BRACKET.match(text)
    name, unit = (match.group(1), match.group(2)) if match else (text, None)
    low = name.lower().replace("_", " ")
    unit_l = (unit or "").strip().lower()
    if unit is not None and unit_l in ("-", "1", "", "fraction"):
        unit = ""
    if _MASS.search(low) or _MASS.search(unit_l):
        pct = "%" in low or "%" in unit_l
        return "loading_mass", "%" if pct else ""
    if _VOLUME.search(low) or _VOLUME.search(unit_l) or low in ("solids", "loading"):
        if low in ("solids", "loading") and unit_l == "%":
            return "ambiguous_loading", unit
        pct = "%" in low or "%" in unit_l
        return "loading_volume", "%" if pct else ""
    if "shear rate" in low or low in ("gamma dot", "gammadot", "rate"):
        return "shear_rate", unit
    if "relative viscosity" in low or low in ("eta r", "eta rel") or (
            ("viscosity" in low or low == "eta") and unit == ""):
        return "relative_viscosity", ""
    if "viscosity" in low or low == "eta":
        return "viscosity", unit
    if "stress" in low:
        return "shear_stress", unit
    if "temperature" in low or low == "t":
        return "temperature", unit
    return None, None


def read_bytes(path, name: str, what: str, max_bytes: int = MAX_BYTES) -> bytes:
    """The bytes of a file, refusing a missing file or one over `max_bytes` (names the limit)."""
    path = pathlib.Path(path)
    try:
        if not path.is_file():
            raise ScenarioError(f"{name}: no such file")
        size = path.stat().st_size
        if size > max_bytes:
            raise ScenarioError(f"{name} is {size / 1e6:.1f} MB, over the {max_bytes / 1e6:g} MB "
                                f"limit for {what}; is it the right file?")
        return path.read_bytes()
    except OSError as err:
        raise ScenarioError(f"cannot read {name}: {err.strerror or err}") from None


def decode_text(data: bytes, name: str, what: str) -> str:
    """UTF-8 text of a file's bytes (BOM removed); a clear `ScenarioError` for empty, binary
    or non-UTF-8 content, naming the line of the first bad byte."""
    if isinstance(data, str):
        text = data.removeprefix("\ufeff")
    else:
        if data.startswith(b"\x89PNG") or b"\x00" in data:
            offset = 0 if data.startswith(b"\x89PNG") else data.index(b"\x00")
            raise ScenarioError(f"{name} looks like a binary file (byte {offset} is not text); "
                                f"expected {what} as UTF-8 text")
        try:
            text = data.decode("utf-8-sig")
        except UnicodeDecodeError as err:
            line = data[:err.start].count(b"\n") + 1
            column = err.start - (data.rfind(b"\n", 0, err.start) + 1) + 1
            raise ScenarioError(f"{name}, line {line}, column {column}: byte "
                                f"0x{data[err.start]:02x} is not UTF-8; save the file as UTF-8 "
                                "(Latin-1 / Windows text is not guessed)") from None
    if "\x00" in text:
        raise ScenarioError(f"{name} looks like a binary file (it holds NUL characters); "
                            f"expected {what} as text")
    if not text.strip():
        raise ScenarioError(f"{name} is empty; expected {what}")
    return text


def looks_like_data(cells) -> bool:
    """True when a would-be header line holds a plain number (the header line is missing)."""
    return any(_PLAIN_NUMBER.match(str(c)) for c in cells)


def decimal_point(cell: str) -> str:
    """'0,25' -> '0.25' (for files delimited by ';' or a tab); other text unchanged."""
    match = _DECIMAL_COMMA.match(cell)
    return cell.replace(",", ".", 1) if match else cell


def _rows(text: str, source: str):
    lines = [(i + 1, ln) for i, ln in enumerate(text.splitlines())
             if ln.strip() and not ln.lstrip().startswith("#")]
    if len(lines) < 2:
        raise ScenarioError(f"{source}: needs a header line and at least one data row")
    head = lines[0][1]
    delimiter = max(",;\t", key=head.count)
    # Parse line by line, so that an unclosed quote is reported at its own line instead of
    # silently swallowing the lines after it.
    parsed = []
    for number, line in lines:
        try:
            rows = list(csv.reader([line], delimiter=delimiter, strict=True))
        except csv.Error:
            rows = []
        if len(rows) != 1 or line.count('"') % 2:
            raise ScenarioError(f"{source}, line {number}: unbalanced quotes in {line[:60]!r}")
        cells = rows[0] if delimiter == "," else [decimal_point(c) for c in rows[0]]
        parsed.append((number, cells))
    if looks_like_data(parsed[0][1]):
        raise ScenarioError(f"{source}, line {parsed[0][0]}: {head[:60]!r} looks like data, "
                            "not a header; the first line must name the columns with their "
                            "units, e.g. 'phi [-],shear rate [1/s],viscosity [mPa*s]'")
    return parsed[0][1], parsed[1:]


def _convert_column(values, lines, header, role, unit, source) -> np.ndarray:
    dimension, _ = ROLES[role]
    out = np.empty(len(values))
    for k, (cell, line) in enumerate(zip(values, lines, strict=True)):
        where = f"{source}, line {line}, column '{header}'"
        text = (cell or "").strip()
        if not text:
            raise ScenarioError(f"{where}: empty cell; every row needs a value")
        match = _NUMBER_UNIT.match(text)
        if not match:
            raise ScenarioError(f"{where}: {text!r} is not a number")
        number, cell_unit = float(match.group(1)), match.group(2)
        if cell_unit and cell_unit.replace(" ", "") != (unit or "").replace(" ", ""):
            raise UnitError(f"{where}: {text!r} carries the unit {cell_unit!r} but the header "
                            f"says {unit or 'no unit'!r}: mixed units; convert the column to one "
                            "unit")
        if not np.isfinite(number):
            raise ScenarioError(f"{where}: {text!r} is not a finite number")
        out[k] = number
    if role.startswith("loading"):
        out = out / 100.0 if unit == "%" else out
        bad = (out < 0) | (out > 1)
        if bad.any():
            k = int(np.argmax(bad))
            raise ScenarioError(f"{source}, line {lines[k]}, column '{header}': "
                                f"{values[k]!r} is not a loading from 0 to "
                                f"{'100 %' if unit == '%' else '1'}")
        return out
    if role == "relative_viscosity":
        return out
    if unit is None:
        raise UnitError(f"{source}, column '{header}': no unit; write it in brackets, e.g. "
                        f"'{header} [{'mPa*s' if role == 'viscosity' else '1/s'}]'")
    zero = to_si(0.0, unit, dimension, header)
    one = to_si(1.0, unit, dimension, header)
    return zero + (one - zero) * out      # affine: covers degC as well as mPa*s


def read_lab_csv(source, *, formulation=None, particle_density_kg_per_m3=None,
                 liquid_density_kg_per_m3=None, liquid_viscosity_Pa_s=None) -> LabData:
    """Read measured viscosities from a CSV with units in the headers.

    Parameters
    ----------
    source : str, pathlib.Path or file-like
        The CSV file (or its text in a file-like object).
    formulation : Formulation, optional
        Gives the densities (its solids, or its droplets if it has no solids, in its
        liquid) and the liquid's viscosity.
    particle_density_kg_per_m3, liquid_density_kg_per_m3 : float, optional
        Densities for wt% -> vol% when no formulation is given (they override it).
    liquid_viscosity_Pa_s : float, optional
        Makes absolute viscosities relative (overrides the formulation's liquid).

    Returns
    -------
    LabData

    Raises
    ------
    ScenarioError
        Missing, empty or non-numeric cells, loadings outside 0-100 %, duplicated roles;
        the message names the line and the column. Also an empty, binary or non-UTF-8 file,
        one over `MAX_BYTES`, or a first line that is data instead of a header.
    UnitError
        Unknown units, a header without a unit, or cells in another unit than the header
        (mixed units).
    """
    name = str(getattr(source, "name", source))
    what = "a lab-data CSV with a header line and data rows"
    if hasattr(source, "read"):
        text = decode_text(source.read(), name, what)
    else:
        text = decode_text(read_bytes(source, name, "a lab-data CSV"), name, what)
    header, rows = _rows(text, name)
    lines = [n for n, _ in rows]
    for n, row in rows:
        if len(row) != len(header):
            raise ScenarioError(f"{name}, line {n}: {len(row)} cells, the header has "
                                f"{len(header)}")
    roles: dict[str, tuple[int, str, str | None]] = {}
    for j, h in enumerate(header):
        role, unit = classify_header(h)
        if role == "ambiguous_loading":
            raise UnitError(f"{name}, column '{h}': '%' alone is ambiguous; write 'wt%' or "
                            "'vol%'")
        if role is None:
            continue
        if role in roles:
            raise ScenarioError(f"{name}: two columns for {role.replace('_', ' ')} "
                                f"('{roles[role][1]}' and '{h}'); keep one")
        roles[role] = (j, h, unit)
    if not roles:
        raise ScenarioError(f"{name}: no column Loadline reads in the header {header!r}; name "
                            "them with units, e.g. 'phi [-]', 'viscosity [mPa*s]'")
    loading_roles = [r for r in ("loading_volume", "loading_mass") if r in roles]
    if len(loading_roles) == 2:
        raise ScenarioError(f"{name}: both a volume and a mass loading column "
                            f"('{roles['loading_volume'][1]}', '{roles['loading_mass'][1]}'); "
                            "keep one")
    if "viscosity" in roles and "relative_viscosity" in roles:
        raise UnitError(f"{name}: both an absolute ('{roles['viscosity'][1]}') and a relative "
                        f"('{roles['relative_viscosity'][1]}') viscosity column: mixed units; "
                        "keep one")
    data = {}
    for role, (j, h, unit) in roles.items():
        data[ROLES[role][1]] = _convert_column([r[j] for _, r in rows], lines, h, role, unit,
                                               name)
    table = pd.DataFrame(data)
    rho_p, rho_l, eta_l = _formulation_values(formulation, particle_density_kg_per_m3,
                                              liquid_density_kg_per_m3, liquid_viscosity_Pa_s)
    notes = []
    if "mass_fraction" in table and "phi" not in table:
        if rho_p is None or rho_l is None:
            raise ScenarioError(f"{name}: column '{roles['loading_mass'][1]}' is a mass "
                                "loading; give a formulation or both densities to convert it "
                                "to volume fractions")
        table["phi"] = composition.volume_fractions(
            table["mass_fraction"].to_numpy()[:, None], [True], [rho_p], rho_l)[:, 0]
        notes.append(f"wt% -> vol% with particle {rho_p:g} and liquid {rho_l:g} kg/m3")
    elif "phi" in table and rho_p is not None and rho_l is not None:
        table["mass_fraction"] = composition.mass_fractions(
            table["phi"].to_numpy()[:, None], [rho_p], rho_l)[:, 0]
    if "viscosity_Pa_s" not in table and "shear_stress_Pa" in table \
            and "shear_rate_1_per_s" in table:
        table["viscosity_Pa_s"] = table["shear_stress_Pa"] / table["shear_rate_1_per_s"]
        notes.append("viscosity = shear stress / shear rate")
    if "viscosity_Pa_s" in table and "relative_viscosity" not in table and eta_l is not None:
        table["relative_viscosity"] = table["viscosity_Pa_s"] / eta_l
        notes.append(f"relative viscosity with the liquid at {eta_l:.4g} Pa*s")
    for column in ("viscosity_Pa_s", "relative_viscosity", "shear_rate_1_per_s"):
        if column in table and (table[column] <= 0).any():
            k = int(np.argmax(table[column].to_numpy() <= 0))
            raise ScenarioError(f"{name}, line {lines[k]}: {column} = {table[column][k]:g} "
                                "must be positive")
    table["line"] = lines
    headers = {ROLES[r][1]: h for r, (_, h, _) in roles.items()}
    return LabData(table, headers, name, eta_l, tuple(notes))


def _formulation_values(formulation, rho_p, rho_l, eta_l):
    if formulation is not None:
        from . import formulation as fm

        mix = fm.mixture(formulation)
        pick = mix.is_solid if mix.is_solid.any() else ~mix.is_solid
        if pick.any() and rho_p is None:
            dens = np.array([i.density_kg_per_m3 for i in formulation.ingredients])[pick]
            w = mix.mass_fraction[pick]
            w = w / w.sum() if w.sum() > 0 else np.full(w.size, 1.0 / w.size)
            rho_p = float(1.0 / np.sum(w / dens))       # mass-weighted harmonic mean
        rho_l = formulation.liquid.density_kg_per_m3 if rho_l is None else rho_l
        eta_l = mix.liquid_viscosity_Pa_s if eta_l is None else eta_l
    return (None if rho_p is None else float(rho_p), None if rho_l is None else float(rho_l),
            None if eta_l is None else float(eta_l))


def read_lab_text(text: str, **options) -> LabData:
    """`read_lab_csv` on CSV text (for the app's upload widget and the tests)."""
    buffer = io.StringIO(text)
    buffer.name = "uploaded CSV"
    return read_lab_csv(buffer, **options)
