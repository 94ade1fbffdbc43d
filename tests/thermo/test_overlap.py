"""Which of a source's temperatures the other sources reach (``audit.thermo.overlap``)."""

import numpy as np

from audit.thermo.overlap import JUDGEABLE_REACH, overlaps_others, within_span


def test_within_span_widens_the_others_span_by_the_judgeable_reach_on_each_side():
    others = np.array([300.0, 340.0])  # span 40 K: reach 10 K each side at a quarter
    assert JUDGEABLE_REACH == 0.25
    T = np.array([289.9, 290.0, 320.0, 350.0, 350.1])
    assert within_span(T, others).tolist() == [False, True, True, True, False]
    assert within_span(T, others, reach=0.0).tolist() == [False, False, True, False, False]
    assert not within_span(T, np.array([])).any()


def test_overlaps_others_needs_one_point_inside_the_others_span():
    T = np.array([300.0, 310.0, 320.0, 400.0, 410.0])
    assert not overlaps_others(T, T >= 400, T < 400)
    assert overlaps_others(T, T >= 310, T < 315)
