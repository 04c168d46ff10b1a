"""`make bench`: every benchmark, each measured side by side with its baseline in one run.

Each module `bench_*.py` in this folder has `run() -> list[dict]` (rows made with
`common.row`). Prints one table; nothing here is a pass/fail test.
"""

from __future__ import annotations

import importlib
import pathlib
import sys

sys.path.insert(0, str(pathlib.Path(__file__).resolve().parents[2]))


def main(argv: list[str]) -> int:
    import pandas as pd

    folder = pathlib.Path(__file__).parent
    names = sorted(p.stem for p in folder.glob("bench_*.py"))
    markdown = None
    if "--markdown" in argv:
        k = argv.index("--markdown")
        markdown = pathlib.Path(argv[k + 1])
        argv = argv[:k] + argv[k + 2:]
    if argv:
        names = [n for n in names if any(a in n for a in argv)]
    rows = []
    for name in names:
        module = importlib.import_module(f"tests.benchmarks.{name}")
        print(f"running {name} ...", flush=True)
        rows.extend(module.run())
    table = pd.DataFrame(rows)
    with pd.option_context("display.max_colwidth", 60, "display.width", 200,
                           "display.float_format", "{:.3g}".format):
        print(table.to_string(index=False))
    if markdown is not None:
        markdown.parent.mkdir(parents=True, exist_ok=True)
        markdown.write_text(_markdown(table))
        print(f"table written to {markdown}")
    return 0


def _markdown(table) -> str:
    """The table as Markdown, numbers to 3 significant digits (for the README)."""
    def cell(value):
        if value is None or value != value:  # None or NaN
            return ""
        return f"{value:.3g}" if isinstance(value, float) else str(value).replace("|", "/")
    columns = list(table.columns)
    lines = ["| " + " | ".join(columns) + " |", "|" + "---|" * len(columns)]
    lines += ["| " + " | ".join(cell(v) for v in row) + " |"
              for row in table.itertuples(index=False)]
    return "\n".join(lines) + "\n"


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
