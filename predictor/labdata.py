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
from ._checks import fraction, in_range, positive
from .errors import FitError, InputRangeError, ScenarioError, UnitError
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


# --- rheometer exports: several flow curves in one file --------------------------------------

#: Header names (lower case, spaces for underscores) of a column naming the sample or series.
SERIES_HEADERS = ("sample", "sample id", "sample name", "series", "curve", "name", "id",
                  "specimen", "test", "measurement")
_PHI_LABEL = re.compile(r"(?:phi|vol\s*%?|volume\s*fraction)\s*[_=:]?\s*([0-9]*\.?[0-9]+)", re.I)
_UNIT_SUFFIX = re.compile(r"_per_", re.I)
_TITLE = re.compile(r"^\s*(?:sample|series|curve|specimen|test|name)\s*[:=]\s*(.+?)\s*$", re.I)
FLOW_ROLES = ("shear_rate", "shear_stress", "viscosity", "loading_volume", "temperature",
              "time", "gap", "preshear_rate")
#: Extra columns of an export: role -> (dimension for units.to_si, SI column name).
_EXTRA_ROLES = {"time": ("time", "time_s"), "gap": ("length", "gap_m"),
                "preshear_rate": ("shear_rate", "preshear_rate_1_per_s")}


def classify_export_header(header: str) -> tuple[str | None, str | None]:
    """Role and unit of a rheometer-export header, also with the unit after an underscore.

    Accepts what `classify_header` accepts, plus ``shear_rate_1/s``, ``stress_Pa``,
    ``viscosity_mPa_s``, ``shear_rate_1_per_s``, ``time [s]`` and series columns (role
    ``"series"``).

    Examples
    --------
    >>> classify_export_header("shear_rate_1/s")
    ('shear_rate', '1/s')
    >>> classify_export_header("stress_Pa")
    ('shear_stress', 'Pa')
    >>> classify_export_header("sample_id")
    ('series', None)
    """
    text = header.strip()
    low = text.lower().replace("_", " ").strip()
    if low in SERIES_HEADERS:
        return "series", None
    name = _BRACKET.match(text)
    base = (name.group(1) if name else text).lower().replace("_", " ").strip()
    unit = name.group(2) if name else None
    if base in ("time", "elapsed time", "step time", "time since step"):
        return "time", unit
    if base in ("gap", "plate gap", "measuring gap"):
        return "gap", unit
    if base.replace("-", "").replace(" ", "") in ("preshearrate", "rapidshearrate",
                                                  "ratebefore", "ratebeforestep"):
        return "preshear_rate", unit
    role, unit = classify_header(text)
    if role is not None and (unit is not None or role.startswith("loading")
                             or role == "relative_viscosity" and "_" not in text):
        return role, unit
    parts = text.split("_")
    for k in range(1, len(parts)):
        unit_text = _UNIT_SUFFIX.sub("/", "_".join(parts[k:])).replace("_", "*")
        guess, _ = classify_header(f"{' '.join(parts[:k])} [{unit_text}]")
        if guess in ("shear_rate", "shear_stress", "viscosity", "temperature"):
            try:
                to_si(1.0, unit_text, ROLES[guess][0], header)
            except (UnitError, ValueError):
                continue
            return guess, unit_text
    return role, unit


@dataclass(frozen=True, eq=False)
class FlowCurves:
    """Flow curves read from a rheometer export, one row per point, in SI units.

    `table` columns: series (name), phi (NaN where unknown), branch ("up" or "down": the
    direction of the controlled variable), shear_rate_1_per_s, shear_stress_Pa,
    viscosity_Pa_s, and where the file has them (else NaN) time_s, gap_m (plate gap) and
    preshear_rate_1_per_s (step tests), then line (the file line). `controlled` is
    "shear_rate" or "shear_stress": the first of the two columns in the file.
    """

    table: pd.DataFrame
    source: str
    controlled: str
    notes: tuple = ()

    def series(self) -> list[str]:
        """Series names in file order."""
        return list(dict.fromkeys(self.table["series"]))

    def by_gap(self, branch: str = "up") -> dict:
        """``{gap_m: (apparent_shear_rate_1_per_s, shear_stress_Pa)}`` for `slip_correction`."""
        rows = self.table[self.table["branch"] == branch]
        if rows["gap_m"].isna().any():
            raise ScenarioError(f"{self.source}: no gap for every row; add a 'gap [mm]' column")
        return {float(g): (part["shear_rate_1_per_s"].to_numpy(),
                           part["shear_stress_Pa"].to_numpy())
                for g, part in rows.groupby("gap_m", sort=True)}

    def thixotropy_tests(self) -> tuple[list, list]:
        """(step tests, loops) for `thixotropy.fit_moore`, one per series.

        A series with a pre-shear rate is a step test ``(time_s, shear_rate_1_per_s,
        shear_stress_Pa, rate_before)``; one without (empty pre-shear cells, or no such
        column) is a rate history such as a hysteresis loop from a rested sample
        ``(time_s, shear_rate_1_per_s, shear_stress_Pa, 1.0)``. Every series needs times.
        """
        steps, loops = [], []
        for name in self.series():
            rows = self.table[self.table["series"] == name]
            if rows["time_s"].isna().any():
                raise ScenarioError(f"{self.source}: series {name!r} has no time for every "
                                    "row; add a 'time [s]' column")
            data = (rows["time_s"].to_numpy(), rows["shear_rate_1_per_s"].to_numpy(),
                    rows["shear_stress_Pa"].to_numpy())
            before = rows["preshear_rate_1_per_s"]
            if before.notna().all():
                steps.append((*data, float(before.iloc[0])))
            elif before.isna().all():
                loops.append((*data, 1.0))
            else:
                k = int(np.argmax(before.isna().to_numpy()))
                raise ScenarioError(f"{self.source}, line {int(rows['line'].iloc[k])}: series "
                                    f"{name!r} has a pre-shear rate on some rows only")
        return steps, loops

    def step_tests(self) -> list:
        """The step tests of `thixotropy_tests` (refused if a series has no pre-shear rate)."""
        steps, loops = self.thixotropy_tests()
        if loops:
            raise ScenarioError(f"{self.source}: {len(loops)} series without a pre-shear rate; "
                                "add a 'pre-shear rate [1/s]' column")
        return steps

    def curve(self, name: str, branch: str | None = "up") -> pd.DataFrame:
        """The points of one series (one branch, or both with ``branch=None``)."""
        rows = self.table[self.table["series"] == name]
        if rows.empty:
            raise ScenarioError(f"{self.source}: no series {name!r}; series: "
                                f"{', '.join(self.series())}")
        if branch is not None:
            rows = rows[rows["branch"] == branch]
        return rows.reset_index(drop=True)


_UNIT_CELL = re.compile(r"^\s*[\[(][^\])]*[\])]\s*$")


def _export_blocks(text: str, name: str):
    """Split an export into blocks: (title, header cells, header line, [(line, cells)]).

    Also returns notes. Lines that look like data before the first header (instrument
    metadata such as 'Temperature;25') are skipped with a note; a row of bracketed units
    right under a header ('[1/s];[Pa]') is joined to it.
    """
    lines = [(i + 1, ln) for i, ln in enumerate(text.splitlines())
             if ln.strip() and not ln.lstrip().startswith("#")]
    if len(lines) < 2:
        raise ScenarioError(f"{name}: needs a header line and at least one data row")
    delimiter = max(",;\t", key=lambda d: sum(ln.count(d) for _, ln in lines[:50]))
    blocks, title, current, preamble, notes = [], None, None, [], []
    for number, line in lines:
        try:
            rows = list(csv.reader([line], delimiter=delimiter, strict=True))
        except csv.Error:
            rows = []
        if len(rows) != 1 or line.count('"') % 2:
            raise ScenarioError(f"{name}, line {number}: unbalanced quotes in {line[:60]!r}")
        cells = rows[0] if delimiter == "," else [decimal_point(c) for c in rows[0]]
        filled = [c.strip() for c in cells if c.strip()]
        if looks_like_data(cells):
            if current is None:
                preamble.append((number, line))
            else:
                current[3].append((number, cells))
            continue
        if current is not None and not current[3] and filled and all(
                _UNIT_CELL.match(c) for c in filled):
            units = list(cells) + [""] * (len(current[1]) - len(cells))
            current[1] = [f"{h.strip()} {u.strip()}".strip() if u.strip() else h
                          for h, u in zip(current[1], units, strict=False)]
            continue
        roles = [classify_export_header(c)[0] for c in filled]
        if len(filled) >= 2 and sum(r is not None for r in roles) >= 2:
            current = [title, cells, number, []]
            blocks.append(current)
            title = None
        else:
            match = _TITLE.match(line.replace(delimiter, " "))
            title = (match.group(1) if match else " ".join(filled)).strip()
    if preamble and not blocks:
        number, line = preamble[0]
        raise ScenarioError(f"{name}, line {number}: {line[:60]!r} looks like data, but no "
                            "header line came before it; the header names the columns with "
                            "their units, e.g. 'shear rate [1/s],shear stress [Pa]'")
    if preamble:
        notes.append(f"{len(preamble)} line(s) before the first header skipped as instrument "
                     f"notes (line {preamble[0][0]}"
                     f"{'' if len(preamble) == 1 else f' to {preamble[-1][0]}'})")
    blocks = [b for b in blocks if b[3]]
    if not blocks:
        raise ScenarioError(f"{name}: no data rows under a header line")
    return blocks, notes


def _branches(x: np.ndarray) -> np.ndarray:
    """'up'/'down' per point: split once at the extreme the sweep turns at (if it turns)."""
    n = x.size
    labels = np.full(n, "up", dtype=object)
    if n < 4:
        if n >= 2 and x[-1] < x[0]:
            labels[:] = "down"
        return labels
    for turn, first, second in ((int(np.argmax(x)), "up", "down"),
                                (int(np.argmin(x)), "down", "up")):
        if 2 <= turn <= n - 3:
            before, after = np.diff(x[:turn + 1]), np.diff(x[turn:])
            if np.mean(before > 0 if first == "up" else before < 0) >= 0.6 and \
                    np.mean(after < 0 if first == "up" else after > 0) >= 0.6:
                labels[:turn + 1] = first
                labels[turn + 1:] = second
                return labels
    if x[-1] < x[0]:
        labels[:] = "down"
    return labels


def read_flow_curves(source, *, name: str | None = None) -> FlowCurves:
    """Read a rheometer export holding one or several flow curves.

    Several curves come either as a series column (``sample``, ``sample_id``, ``series``,
    ...; a loading column such as ``phi`` also separates series), or as blocks one after
    another, each with its own header line and optionally a title line above it
    (``Sample: cream A``). Units are in the headers, in brackets (``shear rate [1/s]``),
    after an underscore (``shear_rate_1/s``, ``stress_Pa``) or in a row of bracketed units
    under the header (``[1/s];[Pa]``); instrument notes with numbers before the first header
    are skipped with a note. Each block needs two of shear
    rate, shear stress and viscosity; the third is computed. The first of rate and stress
    in the file is taken as the controlled variable; each series is split into an
    ascending ("up") and a descending ("down") branch where the controlled variable turns.
    A series label such as ``phi_0.8`` gives its volume fraction. Optional columns: ``time
    [s]``, ``gap [mm]`` (each gap its own series, for `slip_correction` through
    `FlowCurves.by_gap`) and ``pre-shear rate [1/s]`` (step tests, for
    `thixotropy.fit_moore` through `FlowCurves.thixotropy_tests`).

    Parameters
    ----------
    source : str, pathlib.Path or file-like
        The export (CSV, ``;`` or tab delimited; a decimal comma in ``;`` and tab files).
    name : str, optional
        Name used in messages (default the file name).

    Returns
    -------
    FlowCurves

    Raises
    ------
    ScenarioError
        The message names the file, the line, the column and the reason (empty or non-number
        cell, a block with fewer than two flow quantities, non-positive values); nothing is
        returned for a file with any bad row.
    UnitError
        A missing or unknown unit, or cells in another unit than their header.
    """
    name = name or str(getattr(source, "name", source))
    what = "a rheometer export (CSV) with header lines and data rows"
    if hasattr(source, "read"):
        text = decode_text(source.read(), name, what)
    else:
        text = decode_text(read_bytes(source, name, "a rheometer export"), name, what)
    frames, controlled = [], None
    blocks, notes = _export_blocks(text, name)
    for b, (title, header, header_line, rows) in enumerate(blocks):
        roles: dict[str, tuple[int, str, str | None]] = {}
        for j, h in enumerate(header):
            if not h.strip():
                continue
            role, unit = classify_export_header(h)
            if role == "loading_mass":
                raise UnitError(f"{name}, line {header_line}, column '{h}': a mass loading; "
                                "flow-curve exports need the volume fraction ('phi [-]' or "
                                "'vol%')")
            if role not in FLOW_ROLES + ("series",):
                continue
            if role in roles:
                raise ScenarioError(f"{name}, line {header_line}: two columns for "
                                    f"{role.replace('_', ' ')} ('{roles[role][1]}' and '{h}')")
            roles[role] = (j, h, unit)
        flow = [r for r in ("shear_rate", "shear_stress", "viscosity") if r in roles]
        if len(flow) < 2:
            raise ScenarioError(f"{name}, line {header_line}: the header names "
                                f"{' and '.join(flow) or 'none'} of shear rate, shear stress "
                                "and viscosity; a flow curve needs two of them, with units")
        for number, cells in rows:
            if len(cells) != len(header):
                raise ScenarioError(f"{name}, line {number}: {len(cells)} cells, the header "
                                    f"on line {header_line} has {len(header)}")
        lines = [n for n, _ in rows]
        data = {}
        for role, (j, h, unit) in roles.items():
            if role == "series":
                data["series"] = [str(r[j]).strip() for _, r in rows]
                bad = [k for k, v in enumerate(data["series"]) if not v]
                if bad:
                    raise ScenarioError(f"{name}, line {lines[bad[0]]}, column '{h}': empty "
                                        "cell; every row needs its series name")
                continue
            if role in _EXTRA_ROLES:
                dimension, column = _EXTRA_ROLES[role]
                data[column] = _convert_extra([r[j] for _, r in rows], lines, h, unit, name,
                                              dimension)
                continue
            data[ROLES[role][1]] = _convert_column([r[j] for _, r in rows], lines, h, role,
                                                   unit, name)
        block = pd.DataFrame(data)
        for column in ("shear_rate_1_per_s", "shear_stress_Pa", "viscosity_Pa_s"):
            if column in block and (block[column] <= 0).any():
                k = int(np.argmax(block[column].to_numpy() <= 0))
                header_name = next(h for r, (_, h, _) in roles.items()
                                   if ROLES.get(r, (None, None))[1] == column)
                raise ScenarioError(f"{name}, line {lines[k]}, column '{header_name}': "
                                    f"{block[column][k]:g} must be positive")
        if "viscosity_Pa_s" not in block:
            block["viscosity_Pa_s"] = block["shear_stress_Pa"] / block["shear_rate_1_per_s"]
        elif "shear_stress_Pa" not in block:
            block["shear_stress_Pa"] = block["viscosity_Pa_s"] * block["shear_rate_1_per_s"]
        elif "shear_rate_1_per_s" not in block:
            block["shear_rate_1_per_s"] = block["shear_stress_Pa"] / block["viscosity_Pa_s"]
        order = sorted((roles[r][0], r) for r in ("shear_rate", "shear_stress") if r in roles)
        mode = order[0][1] if order else "shear_rate"
        if controlled is None:
            controlled = mode
        elif mode != controlled:
            notes.append(f"block at line {header_line} is {mode.replace('_', '-')}-controlled")
        phi = block["phi"].to_numpy() if "phi" in block else np.full(len(block), np.nan)
        if "series" not in block and "gap_m" in block:
            block["series"] = [f"{title + ', ' if title else ''}gap {1e3 * g:g} mm"
                               for g in block["gap_m"]]
        elif "series" not in block:
            label = title or (f"block {b + 1}" if "phi" not in block else None)
            block["series"] = [label or f"phi {p:g}" for p in phi]
        elif title:
            block["series"] = [f"{title} / {s}" for s in block["series"]]
        if "phi" in block and "series" in data:
            block["series"] = [f"{s} (phi {p:g})" if _PHI_LABEL.search(s) is None else s
                               for s, p in zip(block["series"], phi, strict=True)]
        labelled = np.array([_phi_from_label(s) for s in block["series"]])
        block["phi"] = np.where(np.isnan(phi), labelled, phi)
        for column in ("time_s", "gap_m", "preshear_rate_1_per_s"):
            if column not in block:
                block[column] = np.nan
        block["line"] = lines
        frames.append(block)
    table = pd.concat(frames, ignore_index=True)
    x_column = "shear_rate_1_per_s" if controlled == "shear_rate" else "shear_stress_Pa"
    table["branch"] = "up"
    for _, index in table.groupby("series", sort=False).groups.items():
        table.loc[index, "branch"] = _branches(table.loc[index, x_column].to_numpy())
    columns = ["series", "phi", "branch", "shear_rate_1_per_s", "shear_stress_Pa",
               "viscosity_Pa_s", "time_s", "gap_m", "preshear_rate_1_per_s", "line"]
    n_series = table["series"].nunique()
    notes.insert(0, f"{n_series} series, {len(table)} points, {controlled.replace('_', ' ')} "
                 "controlled")
    return FlowCurves(table[columns], name, controlled, tuple(notes))


def read_flow_curves_text(text: str, name: str = "uploaded CSV") -> FlowCurves:
    """`read_flow_curves` on text (for the app's upload widget and the tests)."""
    return read_flow_curves(io.StringIO(text), name=name)


def _phi_from_label(label: str) -> float:
    match = _PHI_LABEL.search(label)
    if not match:
        return float("nan")
    value = float(match.group(1))
    value = value / 100.0 if "%" in match.group(0) or value > 1 else value
    return value if 0 < value < 1 else float("nan")


def _convert_extra(values, lines, header, unit, source, dimension) -> np.ndarray:
    out = np.empty(len(values))
    for k, (cell, line) in enumerate(zip(values, lines, strict=True)):
        text = (cell or "").strip()
        if not text:                       # optional per row (e.g. no pre-shear in a loop)
            out[k] = np.nan
            continue
        try:
            out[k] = float(text)
        except ValueError:
            raise ScenarioError(f"{source}, line {line}, column '{header}': {text!r} is not a "
                                "number") from None
    if unit is None:
        example = {"time": "s", "length": "mm", "shear_rate": "1/s"}[dimension]
        raise UnitError(f"{source}, column '{header}': no unit; write it in brackets, e.g. "
                        f"'{header} [{example}]'")
    if np.any(np.isinf(out)) or np.any(out < 0):
        k = int(np.argmax(np.isinf(out) | (out < 0)))
        raise ScenarioError(f"{source}, line {lines[k]}, column '{header}': {values[k]!r} "
                            "must be a finite number >= 0")
    return out * to_si(1.0, unit, dimension, header)


# --- fitting every series at once ----------------------------------------------------------


@dataclass(frozen=True, eq=False)
class SeriesFits:
    """One flow-curve law fitted to every series: a row per series, and the failures."""

    model: str
    branch: str
    fits: dict            # series -> FitResult
    failed: dict          # series -> reason
    warnings: dict        # series -> slip warning text
    phi: dict             # series -> phi (NaN where unknown)

    def table(self) -> pd.DataFrame:
        """series, phi, points, each parameter with its interval, rms error (ln)."""
        rows = []
        for series, fit in self.fits.items():
            row = {"series": series, "phi": self.phi[series], "points": fit.n_points}
            for k, v in fit.params.items():
                row[k] = v
                row[f"{k} low"], row[f"{k} high"] = fit.intervals[k]
            row["rmse_ln"] = fit.rmse
            row["note"] = " ".join(list(fit.notes) + ([self.warnings[series]]
                                                      if series in self.warnings else []))
            rows.append(row)
        for series, reason in self.failed.items():
            rows.append({"series": series, "phi": self.phi[series],
                         "note": f"not fitted: {reason}"})
        return pd.DataFrame(rows)

    def parameter(self, name: str) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """(phi, value, standard error) of one parameter over the fitted series with a phi."""
        keep = [s for s, f in self.fits.items() if np.isfinite(self.phi[s])]
        phi = np.array([self.phi[s] for s in keep])
        value = np.array([self.fits[s].params.get(name, np.nan) for s in keep])
        se = np.array([self.fits[s].standard_errors.get(name, np.nan) for s in keep])
        order = np.argsort(phi)
        return phi[order], value[order], se[order]


def fit_flow_curves(curves: FlowCurves, model: str = "herschel-bulkley", *,
                    branch: str = "up", **options) -> SeriesFits:
    """Fit one flow-curve law (`fitting.fit_flow_curve`) to every series of an export.

    Parameters
    ----------
    curves : FlowCurves
        From `read_flow_curves`.
    model : str, optional
        Registry name of a liquid law (e.g. "herschel-bulkley", "power-law", "bingham").
    branch : {"up", "down"}, optional
        Which branch of each series to fit.
    **options
        Passed to `fitting.fit_flow_curve` (``fixed``, ``bounds``, ``interval``...).

    Returns
    -------
    SeriesFits
        A series that cannot be fitted is listed in `failed` with the reason; a series whose
        low-shear branch shows the usual wall-slip signature gets a note in `warnings`.
    """
    from . import fitting

    if branch not in ("up", "down"):
        raise ScenarioError(f"branch {branch!r}: choose 'up' or 'down'")
    fits, failed, warned, phis = {}, {}, {}, {}
    for series in curves.series():
        rows = curves.curve(series, branch)
        phis[series] = float(curves.table.loc[curves.table["series"] == series, "phi"].iloc[0])
        if rows.empty:
            failed[series] = f"no {branch} branch"
            continue
        message = slip_warning(rows["shear_rate_1_per_s"], rows["shear_stress_Pa"])
        if message:
            warned[series] = message
        try:
            fits[series] = fitting.fit_flow_curve(rows["shear_rate_1_per_s"].to_numpy(),
                                                  rows["viscosity_Pa_s"].to_numpy(), model,
                                                  **options)
        except FitError as err:
            failed[series] = str(err)
    return SeriesFits(model, branch, fits, failed, warned, phis)


# --- the trend of the yield stress against loading -----------------------------------------

#: Jammed-emulsion yield-stress relations fitted against phi: name -> free constants.
YIELD_TRENDS = {"mason": ("laplace_pressure_Pa", "phi_c"),
                "princen-kiss": ("laplace_pressure_Pa",)}


@dataclass(frozen=True, eq=False)
class TrendFit:
    """A jammed-emulsion yield-stress relation fitted to yield stresses against phi."""

    relation: str
    params: dict
    intervals: dict
    phi: np.ndarray
    yield_stress_Pa: np.ndarray
    fitted_Pa: np.ndarray
    rmse_sqrt: float       # rms error in sqrt(yield stress / Pa)
    aic: float
    confidence: float

    def predict(self, phi) -> np.ndarray:
        return _trend_model(self.relation, np.asarray(phi, float), **self.params)


def _trend_model(relation, phi, laplace_pressure_Pa, phi_c=None):
    import warnings as _w

    from . import emulsion
    from .errors import ValidityWarning

    with _w.catch_warnings():
        _w.simplefilter("ignore", ValidityWarning)
        if relation == "mason":
            # Gamma/R = laplace_pressure: a diameter of 2 m makes R = 1 m.
            return np.asarray(emulsion.yield_stress_mason(phi, laplace_pressure_Pa, 2.0, phi_c))
        return np.asarray(emulsion.yield_stress_princen_kiss(np.minimum(phi, 0.999),
                                                             laplace_pressure_Pa, 2.0))


def fit_yield_stress_trend(phi, yield_stress_Pa, relation: str = "mason",
                           confidence: float = 0.95) -> TrendFit:
    r"""Fit a jammed-emulsion yield-stress relation to yield stresses against phi.

    The relations are Loadline's own (`emulsion.yield_stress_mason`,
    `emulsion.yield_stress_princen_kiss`), with the Laplace pressure Gamma/R free (and, for
    Mason et al., the critical fraction phi_c, where the yield stress vanishes). Series
    below phi_c enter with their (near-zero) yield stress.

    Parameters
    ----------
    phi : array_like
        Volume fraction of each series. [-]
    yield_stress_Pa : array_like
        Fitted yield stress of each series (zero allowed). [Pa]
    relation : {"mason", "princen-kiss"}, optional
        The relation to fit.
    confidence : float, optional
        Level of the intervals.

    Returns
    -------
    TrendFit

    Raises
    ------
    FitError
        Fewer points than constants plus one, or no positive yield stress.

    Notes
    -----
    Least squares in sqrt(tau_y), where Mason's relation tau_y = 0.51 (Gamma/R)(phi -
    phi_c)^2 is a straight line above phi_c, which also steadies the variance of yield
    stresses spread over decades; Jacobian intervals with Student t (as in
    `fitting.fit`).
    """
    from scipy import optimize, stats

    if relation not in YIELD_TRENDS:
        raise ScenarioError(f"relation {relation!r}: choose one of {', '.join(YIELD_TRENDS)}")
    phi = fraction(np.asarray(phi, float), "phi")
    tau = np.asarray(yield_stress_Pa, float)
    if phi.shape != tau.shape or phi.ndim != 1:
        raise FitError("give one yield stress per phi")
    keep = np.isfinite(tau) & np.isfinite(phi)
    phi, tau = phi[keep], np.clip(tau[keep], 0.0, None)
    names = YIELD_TRENDS[relation]
    n, p = phi.size, len(names)
    if n < p + 1 or not np.any(tau > 0):
        raise FitError(f"{n} yield stresses ({int(np.sum(tau > 0))} above zero) cannot fit the "
                       f"{p} constant(s) of {relation}; need at least {p + 1}")
    if relation == "princen-kiss":
        zero = 1.0 - 10.0 ** (-0.080 / 0.114)     # where Princen & Kiss's Y(phi) is 0
        if np.sum(phi > zero + 1e-3) < 2:
            raise FitError(f"Princen & Kiss's yield stress is zero below phi = {zero:.3f}; "
                           f"only {int(np.sum(phi > zero + 1e-3))} series lie above it, too "
                           "few to fit its Laplace pressure")
    y = np.sqrt(tau)

    def residuals(u):
        kw = {"laplace_pressure_Pa": np.exp(u[0])}
        if p == 2:
            kw["phi_c"] = u[1]
        return y - np.sqrt(_trend_model(relation, phi, **kw))

    starts = []
    for phi_c in (np.linspace(0.5, min(0.9, float(phi.max())) - 1e-3, 9) if p == 2
                  else [None]):
        ref = _trend_model(relation, phi, 1.0, phi_c)
        scale = np.sum(tau * ref) / max(np.sum(ref**2), 1e-300)
        starts.append([np.log(max(scale, 1e-6))] + ([phi_c] if p == 2 else []))
    bounds = ([-20.0] + ([0.5] if p == 2 else []), [40.0] + ([0.9] if p == 2 else []))
    best = None
    for u0 in starts:
        res = optimize.least_squares(residuals, u0, bounds=bounds, xtol=1e-12, ftol=1e-12)
        if best is None or res.cost < best.cost:
            best = res
    u, r = best.x, residuals(best.x)
    dof = max(n - p, 1)
    s2 = float(np.sum(r**2)) / dof
    jac = best.jac
    try:
        cov = s2 * np.linalg.inv(jac.T @ jac)
    except np.linalg.LinAlgError:
        raise FitError(f"the yield stresses do not determine the constants of {relation}") \
            from None
    se = np.sqrt(np.clip(np.diag(cov), 0.0, None))
    tq = float(stats.t.ppf(0.5 * (1 + confidence), dof))
    params = {"laplace_pressure_Pa": float(np.exp(u[0]))}
    intervals = {"laplace_pressure_Pa": (float(np.exp(u[0] - tq * se[0])),
                                         float(np.exp(u[0] + tq * se[0])))}
    if p == 2:
        params["phi_c"] = float(u[1])
        intervals["phi_c"] = (float(u[1] - tq * se[1]), float(u[1] + tq * se[1]))
    rss = max(float(np.sum(r**2)), 1e-300)
    aic = float(n * np.log(rss / n) + 2 * (p + 1))
    return TrendFit(relation, params, intervals, phi, tau,
                    _trend_model(relation, phi, **params), float(np.sqrt(np.mean(r**2))), aic,
                    confidence)


# --- wall slip ---------------------------------------------------------------------------


def slip_correction(curves: dict, shear_stress_Pa=None) -> pd.DataFrame:
    r"""Slip-corrected flow curve from parallel-plate curves measured at two or more gaps.

    The method of Yoshimura & Prud'homme [1]_: at the same rim stress, the apparent rim
    shear rate measured at gap h is the true rate plus the slip at both plates,

    .. math:: \dot\gamma_a(\tau, h) = \dot\gamma(\tau) + \frac{2\,v_s(\tau)}{h}

    so a straight line of the apparent rates against 1/h at each stress gives the true rate
    (intercept) and the slip velocity (half the slope). Each curve is interpolated in
    log-log (monotone cubic) at the chosen stresses; with more than two gaps the line is a
    least-squares fit.

    Parameters
    ----------
    curves : dict
        ``{gap_m: (apparent_shear_rate_1_per_s, shear_stress_Pa)}``, two or more gaps. [m,
        1/s, Pa]
    shear_stress_Pa : array_like, optional
        Stresses at which to correct; default every measured stress inside the range common
        to all gaps. [Pa]

    Returns
    -------
    pandas.DataFrame
        Columns ``shear_stress_Pa``, ``shear_rate_1_per_s`` (slip-corrected),
        ``slip_velocity_m_per_s`` with its 95 % interval (``slip_velocity_low_m_per_s``,
        ``slip_velocity_high_m_per_s``; NaN with two gaps, where no scatter is left to
        estimate it), and ``slip_only`` (True where the corrected rate is not
        above zero, or with three or more gaps where its 95 % interval reaches zero, and at
        every lower stress: the sample moves as a plug on its slip layers; the rate is then
        0).

    Raises
    ------
    InputRangeError
        Fewer than two distinct positive gaps, arrays of different lengths, non-positive
        rates or stresses, or stress ranges that do not overlap.

    Notes
    -----
    The stresses are the rim stresses the instrument reports; the correction of the rim
    stress for a non-Newtonian curve (the Weissenberg-Rabinowitsch step of parallel plates)
    is a separate step, not applied here. The method assumes the slip velocity depends on
    the stress only, not on the gap (from memory of [1]_, not checked against the source).

    References
    ----------
    .. [1] A. Yoshimura and R. K. Prud'homme, "Wall slip corrections for Couette and
       parallel disk viscometers," J. Rheol., vol. 32, no. 1, pp. 53-67, 1988.

    Examples
    --------
    Illustrative call: a Newtonian liquid of 1 Pa*s slipping at 1 um/s per Pa.

    >>> tau = np.array([1.0, 10.0, 100.0])
    >>> curves = {h: (tau / 1.0 + 2 * 1e-6 * tau / h, tau) for h in (0.5e-3, 1e-3)}
    >>> out = slip_correction(curves)
    >>> [round(float(x), 6) for x in out["shear_rate_1_per_s"]]
    [1.0, 10.0, 100.0]
    """
    if not isinstance(curves, dict) or len(curves) < 2:
        raise InputRangeError("curves", len(curves) if hasattr(curves, "__len__") else curves,
                              "a dict of two or more gaps {gap_m: (rate, stress)}")
    gaps, data = [], []
    for gap, pair in curves.items():
        h = float(in_range(gap, "gap_m", 0.0, 1.0, low_open=True))
        try:
            rate, stress = pair
        except (TypeError, ValueError):
            raise InputRangeError(f"curves[{h:g}]", pair, "(apparent_shear_rate_1_per_s, "
                                  "shear_stress_Pa)") from None
        rate = np.atleast_1d(positive(rate, "apparent_shear_rate_1_per_s")).astype(float)
        stress = np.atleast_1d(positive(stress, "shear_stress_Pa")).astype(float)
        if rate.shape != stress.shape or rate.ndim != 1 or rate.size < 2:
            raise InputRangeError(f"curves[{h:g}]", rate.size,
                                  "two or more points, one stress per rate")
        order = np.argsort(stress)
        stress, rate = stress[order], rate[order]
        if np.any(np.diff(stress) <= 0):
            raise InputRangeError(f"curves[{h:g}] shear_stress_Pa", "repeated stress",
                                  "distinct stresses (one branch of the flow curve)")
        gaps.append(h)
        data.append((np.log(stress), np.log(rate)))
    gaps = np.array(gaps)
    if np.unique(gaps).size != gaps.size:
        raise InputRangeError("gap_m", gaps.tolist(), "distinct gaps")
    low = max(float(np.exp(s[0])) for s, _ in data)
    high = min(float(np.exp(s[-1])) for s, _ in data)
    if not low < high:
        raise InputRangeError("shear_stress_Pa", f"{low:g} to {high:g}",
                              "stress ranges that overlap between the gaps")
    if shear_stress_Pa is None:
        tau = np.unique(np.concatenate([np.exp(s) for s, _ in data]))
        tau = tau[(tau >= low * (1 - 1e-12)) & (tau <= high * (1 + 1e-12))]
    else:
        tau = np.atleast_1d(in_range(shear_stress_Pa, "shear_stress_Pa", low, high))
    from scipy.interpolate import PchipInterpolator

    # Monotone cubic (PCHIP) in log-log: no overshoot, and far closer than straight lines
    # where the curve bends sharply near a yield stress.
    rates = np.stack([np.exp(PchipInterpolator(s, r)(np.log(tau))) if s.size > 2
                      else np.exp(np.interp(np.log(tau), s, r)) for s, r in data])
    x = 1.0 / gaps
    xm = x.mean()
    slope = np.sum((x - xm)[:, None] * (rates - rates.mean(axis=0)), axis=0) / np.sum(
        (x - xm) ** 2)
    intercept = rates.mean(axis=0) - slope * xm
    slip_only = intercept <= 1e-9 * rates.max(axis=0)     # zero within rounding
    if x.size >= 3:
        # With three or more gaps the scatter about the line gives the intercept's 95 %
        # interval: a true rate whose interval reaches zero is not told apart from slip.
        from scipy import stats

        resid = rates - (intercept + slope * x[:, None])
        s2 = np.sum(resid**2, axis=0) / (x.size - 2)
        se = np.sqrt(s2 * (1.0 / x.size + xm**2 / np.sum((x - xm) ** 2)))
        t95 = stats.t.ppf(0.975, x.size - 2)
        slip_only |= intercept - t95 * se <= 0
        half = t95 * np.sqrt(s2 / np.sum((x - xm) ** 2)) / 2.0      # of v_s = slope / 2
    else:
        half = np.full(tau.size, np.nan)
    # The true rate rises with the stress: below a stress that is slip only, all is slip only.
    order = np.argsort(tau)
    slip_only[order] = np.logical_or.accumulate(slip_only[order][::-1])[::-1]
    return pd.DataFrame({"shear_stress_Pa": tau,
                         "shear_rate_1_per_s": np.where(slip_only, 0.0, intercept),
                         "slip_velocity_m_per_s": slope / 2.0,
                         "slip_velocity_low_m_per_s": slope / 2.0 - half,
                         "slip_velocity_high_m_per_s": slope / 2.0 + half,
                         "slip_only": slip_only})


#: Local slope d ln(stress)/d ln(rate) counted as a plateau, and as a slip-like rise below it
#: (our own thresholds).
SLIP_PLATEAU_SLOPE = 0.15
SLIP_RISE_SLOPE = 0.4


def slip_warning(shear_rate_1_per_s, shear_stress_Pa) -> str | None:
    """A warning when a single-gap flow curve shows the usual wall-slip signature, else None.

    The signature: at the lowest rates the stress rises steeply with the rate (local slope
    d ln tau / d ln gammadot above 0.4), then flattens into a plateau or kink (slope below
    0.15) at a higher stress, before rising again: the low-shear points sit below the
    apparent yield stress, where a slipping sample slides on its wall layers instead of
    flowing (Yoshimura & Prud'homme, J. Rheol. 32, 53, 1988, describe slip in such terms;
    the thresholds are our own). Measure at two or more gaps (`slip_correction`) or with
    roughened plates to check.

    Examples
    --------
    >>> rate = np.logspace(-3, 2, 16)
    >>> slip_warning(rate, 10 + 2 * rate**0.5) is None
    True
    """
    rate = np.asarray(shear_rate_1_per_s, float)
    tau = np.asarray(shear_stress_Pa, float)
    keep = (rate > 0) & (tau > 0) & np.isfinite(rate) & np.isfinite(tau)
    rate, tau = rate[keep], tau[keep]
    if rate.size < 6:
        return None
    order = np.argsort(rate)
    lr, lt = np.log(rate[order]), np.log(tau[order])
    # slopes over pairs two points apart: steadier than neighbours on digitised data
    slope = (lt[2:] - lt[:-2]) / np.where(lr[2:] > lr[:-2], lr[2:] - lr[:-2], np.nan)
    if not np.any(np.isfinite(slope)):
        return None
    k_flat = int(np.nanargmin(slope))
    if slope[k_flat] >= SLIP_PLATEAU_SLOPE or k_flat == 0:
        return None
    below = slope[:k_flat]
    if not np.any(below > SLIP_RISE_SLOPE):
        return None
    plateau = float(np.exp(lt[k_flat + 1]))
    low_tau = float(np.exp(lt[0]))
    if low_tau >= 0.8 * plateau:
        return None
    return (f"possible wall slip: below about {plateau:.3g} Pa the stress rises steeply "
            f"with the rate (down to {low_tau:.3g} Pa at {float(np.exp(lr[0])):.3g} 1/s) "
            "under a plateau, the usual signature of a sample slipping at smooth walls; the "
            "low-shear viscosity and the fitted yield stress may read too low. Measure at two "
            "gaps (slip correction) or with roughened plates.")
