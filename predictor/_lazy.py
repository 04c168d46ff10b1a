"""A module stand-in that imports the real module on first attribute access.

The `loadline` command uses it for numpy and pandas, so `loadline --help` and
`loadline models` start without the numeric stack (about 0.5 s on the project's machine).
"""

from __future__ import annotations

import importlib


class LazyModule:
    """``np = LazyModule("numpy")``: ``np.asarray`` imports numpy when first used."""

    def __init__(self, name: str, on_import=None):
        self._name = name
        self._on_import = on_import   # called once with the module when it is first used

    def __getattr__(self, attribute: str):
        module = importlib.import_module(self._name)
        if self._on_import is not None:
            hook, self._on_import = self._on_import, None
            hook(module)
        return getattr(module, attribute)

    def __repr__(self) -> str:
        return f"<lazily imported module {self._name!r}>"
