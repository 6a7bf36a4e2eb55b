"""Documentation that states physics must match the code (issue 18 item 12)."""

import pathlib

DOCS = pathlib.Path(__file__).parent.parent / "docs"


def test_heat_balance_doc_describes_the_autocatalytic_rate_actually_used():
    # The vessel balance of an autocatalytic decomposition uses the rate at a* = m/(m+n)
    # (screen.analyses.vessels, screen.models.decomposition.conversion_of_maximum_rate_factor);
    # the doc used to describe the fresh-mass rate as the method for every model.
    text = (DOCS / "heat-balance.md").read_text(encoding="utf-8")
    assert "a* = m/(m+n)" in text
    assert "conversion_of_maximum_rate_factor" in text
    assert "for autocatalytic decompositions it is **not** conservative" not in text
