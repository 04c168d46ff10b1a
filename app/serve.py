"""Start the Loadline app with its heavy imports warmed once per server.

``python -m app.serve [streamlit options]`` is ``streamlit run app/main.py [options]`` plus
one background thread, started with the server, that imports what the opening page needs
(pandas, altair, pint's unit registry, the prediction modules). Streamlit runs a page
script only when a browser session opens, so without this the first visitor waits for
every import; with it the imports run while the server starts and the browser loads, once
per server process, and the sessions share them (`make run` starts the app this way).
"""

from __future__ import annotations

import pathlib
import sys
import threading

MAIN = pathlib.Path(__file__).resolve().parent / "main.py"


def warm() -> None:
    """Import the opening page's dependencies (a module imported twice is imported once)."""
    import importlib

    # scipy.optimize: the packing estimates of the opening page's sweep solve with brentq.
    for name in ("pandas", "altair", "scipy.optimize", "predictor.scenario",
                 "predictor.formulation", "predictor.design", "predictor.charts",
                 "app.compute", "app.widgets"):
        importlib.import_module(name)
    from predictor import registry, units

    units.registry()
    registry.models()


def main(argv: list[str] | None = None) -> int:
    from streamlit.web import cli

    threading.Thread(target=warm, name="loadline-warm", daemon=True).start()
    args = ["run", str(MAIN), *(sys.argv[1:] if argv is None else argv)]
    return cli.main(args=args, prog_name="streamlit")


if __name__ == "__main__":
    raise SystemExit(main())
