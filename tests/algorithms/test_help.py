"""Help texts as the 3.22 help panel shows them: it makes a paragraph of
every line, so a line holds a whole block; choices are named by their
labels; the symbols used are defined."""

import re

import pytest

from sectionwright.algorithms import all_algorithms

BLOCK_END = re.compile(r"(</p>|</dd>|</h3>|<dl>|</dl>)$")
NUMBERED_CHOICE = re.compile(
    r"(^|[;>(]\s*)[0-9] (dip|strike|perpendicular|along|grid|true|magnetic|one text|the same)"
)


@pytest.fixture(scope="module")
def algorithms(provider):
    return {a.name(): a for a in all_algorithms()}


@pytest.mark.parametrize("name", [algorithm.name() for algorithm in all_algorithms()])
def test_help_is_whole_blocks_with_choices_by_label(algorithms, name):
    text = algorithms[name].shortHelpString()
    for line in text.splitlines():
        assert BLOCK_END.search(line.strip()), line[:80]
    assert not NUMBERED_CHOICE.search(text), NUMBERED_CHOICE.search(text).group(0)
    assert "qualified geologist" in text


def test_attitude_help_defines_its_symbols_and_names_the_choices(algorithms):
    from sectionwright.algorithms.inputs.attitudes import CONVENTIONS
    from sectionwright.algorithms.projectattitudes import PROJECTIONS

    text = algorithms["projectattitudes"].shortHelpString()
    assert "true dip δ" in text and "angle β" in text and "apparent dip α" in text
    for label in CONVENTIONS + PROJECTIONS:
        assert label in text, label
