"""How far a channel's hum stands above hearing, as the advice judges a change
(groundcheck/advice/hearing.heard_level): the power sum of its lines' margins over the
threshold, worked by hand here."""

import math
from types import SimpleNamespace

import pytest

from groundcheck.advice.hearing import heard_level
from groundcheck.advice.report import _hum_change_words
from groundcheck.physics.hum_rows import SpectrumLine


def _result(*margins):
    # each line's SPL over a threshold of 0 dB is its margin (None: no listening verdict)
    rows = [
        SpectrumLine(50.0 * (i + 1), 1e-3, 1e-3, m, None if m is None else 0.0)
        for i, m in enumerate(margins)
    ]
    channel = SimpleNamespace(spectrum=rows)
    return SimpleNamespace(hum=SimpleNamespace(channels={"left": channel}))


def test_two_lines_10_db_over_hearing_stand_13_db_over_it_together():
    # 10·log10(10^1 + 10^1) = 10 + 10·log10(2) = 13.0103 dB; a line with no hum counts nothing
    assert heard_level(_result(10.0, 10.0, None), "left") == pytest.approx(10 + 10 * math.log10(2))


def test_a_line_far_below_hearing_barely_moves_the_level():
    # 10·log10(10^2 + 10^-4) = 20.0000043 dB
    assert heard_level(_result(20.0, -40.0), "left") == pytest.approx(20.0000043, abs=1e-6)


def test_without_a_listening_verdict_there_is_no_level():
    assert heard_level(_result(None, None), "left") is None
    assert heard_level(SimpleNamespace(hum=None), "left") is None


def test_the_suggestion_says_when_what_is_heard_changes_more_than_the_total():
    # an outside technician's reservoir-return fix: 0.7 dB off the total, 23 dB off what is heard
    words = _hum_change_words("left", -61.8, -62.5, -23.2)
    assert words == (
        "hum left: -61.8 dBV → -62.5 dBV (0.7 dB quieter) [23.2 dB less above hearing at the seat]"
    )
    assert "above hearing" not in _hum_change_words("left", -61.8, -62.5, -0.9)


def test_a_change_rejected_as_louder_says_what_got_louder():
    # judged where it is heard, the words say so and give the total's own change beside it (a
    # reviewer read '5.2 dB louder' for a change whose total got 0.2 dB quieter)
    from groundcheck.advice.evaluation import _louder_words

    said = _louder_words("left", 5.2, -0.2, True)
    assert said == (
        "it would make the left hum louder where it is heard: 5.2 dB more above hearing at the "
        "seat (its total 0.2 dB quieter)"
    )
    assert _louder_words("left", 0.7, 0.7, False) == "it would make the left hum 0.7 dB louder"
