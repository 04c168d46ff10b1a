"""Shared test configuration: hypothesis profiles and the fuzz-case counter.

`make test` uses the "ci" profile; `make fuzz` sets HYPOTHESIS_PROFILE=fuzz (many more cases)
and prints how many cases each fuzzed function received.
"""

import collections
import os

from hypothesis import HealthCheck, settings

# CI draws the same examples on every run (derandomize), so a green main stays green;
# `make fuzz` explores new random examples every time.
settings.register_profile("ci", deadline=None, print_blob=True, derandomize=True,
                          suppress_health_check=[HealthCheck.too_slow])
settings.register_profile("fuzz", deadline=None, print_blob=True,
                          suppress_health_check=list(HealthCheck))
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "ci"))

#: Examples per fuzz test: a few hundred in CI, many thousands under `make fuzz`.
FUZZ_EXAMPLES = int(os.environ.get(
    "LOADLINE_FUZZ_EXAMPLES", 20_000 if os.environ.get("HYPOTHESIS_PROFILE") == "fuzz" else 300))

FUZZ_CASES: collections.Counter = collections.Counter()


def pytest_terminal_summary(terminalreporter):
    if FUZZ_CASES:
        terminalreporter.section("fuzz cases tried per function")
        for name, count in sorted(FUZZ_CASES.items()):
            terminalreporter.write_line(f"{count:>8}  {name}")
        terminalreporter.write_line(f"{sum(FUZZ_CASES.values()):>8}  in all")
