"""Dip domains: known step changes, the independent ruptures library where
the formulations coincide, the dip-direction rule, input order."""

import numpy as np
import pytest

from sectionwright.algorithms.core import domains as D

TOLERANCE = 10.0


def one_section(values, tolerance=TOLERANCE, min_count=1, chainage=None):
    values = np.asarray(values, dtype=float)
    chainage = np.arange(len(values), dtype=float) if chainage is None else chainage
    return D.segment(np.zeros(len(values), int), chainage, values, tolerance, min_count)


def boundaries(domain):
    """Positions (in chainage order) where a new domain starts."""
    return (np.flatnonzero(np.diff(domain)) + 1).tolist()


def steps(rng, levels, lengths, noise):
    return np.concatenate([rng.normal(level, noise, n) for level, n in zip(levels, lengths)])


@pytest.mark.parametrize(
    "levels, lengths",
    [
        ([20.0, 40.0], [6, 5]),
        ([15.0, 35.0, 55.0, 30.0], [4, 7, 3, 5]),
        ([-30.0, -50.0, -20.0], [5, 2, 8]),
        ([5.0, 25.0], [1, 9]),
    ],
)
def test_known_step_changes_split_between_the_right_attitudes(levels, lengths):
    values = steps(np.random.default_rng(len(lengths)), levels, lengths, 1.0)
    expected = np.cumsum(lengths)[:-1].tolist()
    assert boundaries(one_section(values)) == expected


def test_a_constant_sequence_is_one_domain():
    assert set(one_section(np.full(50, 23.0)).tolist()) == {1}
    assert set(one_section(np.full(7, -61.5)).tolist()) == {1}


def test_small_scatter_within_the_tolerance_is_one_domain():
    values = np.random.default_rng(2).uniform(30.0, 34.0, 40)
    assert set(one_section(values).tolist()) == {1}


def test_two_lone_attitudes_split_when_they_differ_by_more_than_the_tolerance():
    assert boundaries(one_section([20.0, 30.5])) == [1]
    assert boundaries(one_section([20.0, 29.5])) == []


def test_a_change_of_dip_direction_always_splits():
    # The least-squares objective alone keeps these three together (one
    # domain costs 60.5, a boundary 50 + 15.1); the dip-direction rule splits.
    values = [-0.5, 5.0, 10.5]
    assert len(set(one_section(values).tolist())) == 2
    rng = np.random.default_rng(5)
    for _ in range(200):
        values = rng.uniform(-40, 40, rng.integers(2, 30))
        domain = one_section(values)
        for d in np.unique(domain):
            inside = values[domain == d]
            both_ways = inside.max() > 0 and inside.min() < 0
            assert not (both_ways and np.abs(inside).max() > TOLERANCE)


def test_gentle_dips_either_way_within_the_tolerance_may_share_a_domain():
    assert set(one_section([3.0, -2.0, 1.0, -4.0]).tolist()) == {1}


def test_domains_have_at_least_min_count_attitudes_where_possible():
    values = steps(np.random.default_rng(9), [20.0, 45.0, 20.0, 50.0], [5, 1, 6, 4], 0.5)
    assert 1 in np.bincount(one_section(values))[1:]
    domain = one_section(values, min_count=3)
    assert np.bincount(domain)[1:].min() >= 3
    # Where the dip-direction rule forces a lone attitude, it stays alone.
    forced = one_section([30.0, 31.0, 29.0, -30.0, 30.0, 32.0, 31.0], min_count=3)
    assert np.bincount(forced)[1:].tolist() == [3, 1, 3]


def test_input_order_does_not_matter():
    rng = np.random.default_rng(4)
    count = 300
    section = rng.integers(0, 12, count)
    chainage = rng.uniform(0, 5000, count).round(-1)  # ties in chainage too
    values = rng.choice([-40.0, -12.0, 8.0, 25.0, 60.0], count) + rng.normal(0, 2, count)
    ids = np.arange(count)
    domain = D.segment(section, chainage, values, TOLERANCE, 2, ids)
    for _ in range(5):
        shuffle = rng.permutation(count)
        again = D.segment(
            section[shuffle], chainage[shuffle], values[shuffle], TOLERANCE, 2, ids[shuffle]
        )
        assert (again == domain[shuffle]).all()


def test_many_sections_at_once_equal_each_alone():
    rng = np.random.default_rng(6)
    sizes = [1, 2, 3, 7, 8, 9, 40, 70, 130]
    values = [rng.choice([10.0, 30.0, -25.0], n) + rng.normal(0, 3, n) for n in sizes]
    section = np.concatenate([np.full(n, k) for k, n in enumerate(sizes)])
    chainage = np.concatenate([np.arange(n, dtype=float) for n in sizes])
    together = D.segment(section, chainage, np.concatenate(values), TOLERANCE)
    for k, v in enumerate(values):
        assert (together[section == k] == one_section(v)).all()


def test_unreadable_rows_get_no_domain():
    domain = D.segment(
        np.zeros(4, int), np.array([0.0, 1.0, np.nan, 3.0]), np.array([10.0, np.nan, 5.0, 11.0]), 10
    )
    assert domain.tolist() == [1, 0, 0, 1]


# ruptures 1.1.10 (C. Truong, L. Oudre, N. Vayatis, "Selective review of
# offline change point detection methods", Signal Processing 167, 2020):
# Pelt(model="l2", min_size=m, jump=1).fit(s).predict(pen=β) minimises
# Σ CostL2(segment) + β · (number of breakpoints), with CostL2 the
# within-segment sum of squared deviations from the mean — our objective,
# with pen = β = τ²/2, min_size = MIN_COUNT, jump = 1 (every position may
# be a boundary). Dynp(model="l2", min_size=m, jump=1).predict(n_bkps=k) is
# the best partition into k + 1 segments, which ours must equal at our k.
# The formulations coincide when the dip-direction rule does not bind:
# sequences dipping one way.
@pytest.mark.parametrize("min_count", [1, 2, 3])
@pytest.mark.parametrize("seed", range(6))
def test_agrees_with_ruptures_pelt_and_dynp_on_one_way_sequences(seed, min_count):
    rpt = pytest.importorskip("ruptures")  # not installed in the QGIS 3.40/3.44 roots
    rng = np.random.default_rng(seed)
    levels = rng.uniform(5, 80, 5)
    values = steps(rng, levels, rng.integers(1, 9, 5), rng.uniform(0.5, 6))
    penalty = D.boundary_penalty(TOLERANCE)
    ours = [b for b in boundaries(one_section(values, min_count=min_count))] + [len(values)]
    pelt = rpt.Pelt(model="l2", min_size=min_count, jump=1).fit(values).predict(pen=penalty)
    assert ours == pelt
    if len(ours) > 1 and len(values) >= min_count * len(ours):
        dynp = rpt.Dynp(model="l2", min_size=min_count, jump=1).fit(values)
        assert dynp.predict(n_bkps=len(ours) - 1) == ours


def test_representative_is_the_unflagged_attitude_nearest_and_most_certain():
    group = np.array([0, 0, 0, 0])
    travel = np.array([5.0, 40.0, 80.0, 200.0])
    dip_sd = np.array([2.0, 1.0, 2.0, 0.5])
    flags = np.array(["oblique", "", "", "unit_changed"], dtype=object)
    represent, why = D.representatives(group, travel, dip_sd, flags, np.array([7, 8, 9, 10]))
    assert represent.tolist() == [False, True, False, False]
    assert why.tolist() == [
        "oblique",
        "nearest the line, smallest uncertainty",
        "redundant with 8",
        "unit changed",
    ]


def test_representative_balances_distance_and_uncertainty():
    represent, why = D.representatives(
        np.zeros(3, int),
        np.array([10.0, 100.0, 12.0]),
        np.array([6.0, 1.0, 2.0]),
        np.array(["", "", ""], dtype=object),
        np.array([1, 2, 3]),
    )
    assert represent.tolist() == [False, False, True]
    assert why[2] == D.BALANCED


def test_when_every_attitude_is_flagged_the_least_flagged_stands():
    represent, why = D.representatives(
        np.zeros(2, int),
        np.array([10.0, 100.0]),
        np.array([1.0, 1.0]),
        np.array(["oblique,unit_changed", "oblique"], dtype=object),
        np.array([1, 2]),
    )
    assert represent.tolist() == [False, True]
    assert why.tolist() == [
        "oblique, unit changed",
        "nearest the line, smallest uncertainty; flagged: oblique",
    ]


def test_a_flag_every_attitude_shares_does_not_decide():
    represent, why = D.representatives(
        np.zeros(2, int),
        np.array([10.0, 100.0]),
        np.array([1.0, 1.0]),
        np.array(["no_elevation", "no_elevation"], dtype=object),
        np.array([1, 2]),
    )
    assert represent.tolist() == [True, False]
    assert why.tolist() == [
        "nearest the line, smallest uncertainty; flagged: no elevation",
        "redundant with 1",
    ]


def test_representative_ties_go_to_the_smallest_id_whatever_the_order():
    for ids in (np.array([3, 1, 2]), np.array([2, 3, 1])):
        represent, _ = D.representatives(
            np.zeros(3, int), np.full(3, 10.0), np.full(3, 1.0), np.full(3, "", object), ids
        )
        assert ids[represent].tolist() == [1]
