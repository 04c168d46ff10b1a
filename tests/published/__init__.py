"""Published values, one table, each row with its source.

`CASES` joins the rows kept per topic in this folder. A row calls a function of `predictor`
(dotted path below the package, e.g. "suspension.krieger_dougherty") with keyword
arguments and compares the result with the value as printed in the source; the tolerance
follows the printed digits (half a unit in the last place) unless `rel_tol` is given.
"""

from __future__ import annotations

from dataclasses import dataclass, field


@dataclass(frozen=True)
class Case:
    func: str                     # dotted path below `predictor`
    inputs: dict
    expected: str                 # as printed in the source (digits set the tolerance)
    source: str                   # authors, title/journal, year, table/equation
    note: str = ""                # "from memory", "hand calculation", "invented edge case"
    rel_tol: float | None = None  # overrides the printed-digits tolerance
    models: tuple[str, ...] = field(default=())   # registry names this row checks

    @property
    def id(self) -> str:
        args = ",".join(f"{k}={v}" for k, v in self.inputs.items())
        return f"{self.func}({args})"


def printed_tolerance(printed: str) -> float:
    """Half a unit in the last printed place of `printed` ("12.65" -> 0.005)."""
    text = printed.strip().lower()
    mantissa, _, exponent = text.partition("e")
    decimals = len(mantissa.split(".")[1]) if "." in mantissa else 0
    return 0.5 * 10.0 ** (-decimals) * 10.0 ** (int(exponent) if exponent else 0)


def assert_matches_published(value: float, printed: str, rel_tol: float | None = None):
    """Assert `value` equals the printed number to the precision it was printed with."""
    expected = float(printed)
    tol = abs(expected) * rel_tol if rel_tol is not None else printed_tolerance(printed)
    assert abs(value - expected) <= tol, f"{value!r} != {printed} (tolerance {tol:.3g})"


def _collect() -> list[Case]:
    import importlib
    import pkgutil

    cases: list[Case] = []
    for info in pkgutil.iter_modules(__path__):
        module = importlib.import_module(f"{__name__}.{info.name}")
        cases.extend(getattr(module, "CASES", []))
    return cases


CASES = _collect()
