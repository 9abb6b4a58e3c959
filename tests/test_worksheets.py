"""Every demo worksheet in worksheets/ replays to the results it records, and exports cleanly.

The demo worksheets are scenarios of our own (invented states); what they
record was computed by ketsplit itself, so this test guards against a change
in any command silently changing a published result.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from ketsplit.sheets.export import export
from ketsplit.sheets.format import read_sheet
from ketsplit.sheets.runner import differences, replay
from wellformed import assert_balanced_latex, markdown_displays, without_comments

SHEETS = sorted((Path(__file__).resolve().parents[1] / "worksheets").glob("*.kss"))


def test_there_are_at_least_four_demo_worksheets_including_the_readme_one():
    names = {path.name for path in SHEETS}
    assert len(names) >= 4 and "photon-pair.kss" in names


@pytest.mark.parametrize("path", SHEETS, ids=lambda p: p.name)
def test_a_demo_worksheet_verifies_and_exports(path):
    sheet = read_sheet(path)
    assert sheet.problems == () and sheet.format is not None
    session, outcomes = replay(sheet)
    assert [o.error for o in outcomes if o.error] == []
    found = differences(outcomes, session)
    assert found == [], "\n".join(d.describe() for d in found)
    kinds = {r.kind for o in outcomes for r in o.results}
    assert len(kinds - {"real", "positive", "complex", "integer", "space", "assign", "digits"}) >= 2
    assert_balanced_latex(without_comments(export(outcomes, "tex", path.name)))
    for body in markdown_displays(export(outcomes, "md", path.name)):
        assert_balanced_latex(body)
