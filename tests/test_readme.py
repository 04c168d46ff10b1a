"""The README's relation table is the registry's own."""

import pathlib

import predictor  # noqa: F401  (registers every relation)
from predictor.registry import models_markdown

README = pathlib.Path(__file__).parents[1] / "README.md"


def readme_table() -> str:
    text = README.read_text()
    start = text.index("<!-- models:start -->") + len("<!-- models:start -->\n")
    return text[start:text.index("<!-- models:end -->")]


def test_readme_table_matches_the_registry():
    assert readme_table() == models_markdown(), (
        "README table out of date: run `.venv/bin/python -m predictor.registry --readme`")


def test_readme_shows_the_two_set_up_commands_and_the_cautions():
    text = README.read_text()
    assert "make run" in text and "make test" in text
    assert "confirm them by measurement" in text.lower()
