"""The README section "How close is it" is what the validation suite computes.
"""

from tests.validation import common


def test_readme_section_is_current():
    assert common.readme_text() == common.readme_section(), (
        "README section 'How close is it' out of date: run "
        "`.venv/bin/python -m tests.validation --readme`")
