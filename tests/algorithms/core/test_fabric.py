"""Fabric of bedding poles against independent libraries and the demo
world's known fold."""

import demo_world as W
import numpy as np
import pytest
from angles import axial_angle

from sectionwright.algorithms.core import fabric as F


def noisy_planes(rng, dip_direction, dip, scatter):
    """Planes whose poles are scattered by about ``scatter`` degrees."""
    poles = F.poles(dip_direction, dip)
    poles += rng.normal(scale=np.radians(scatter) / np.sqrt(2), size=poles.shape)
    poles /= np.linalg.norm(poles, axis=1)[:, None]
    trend, plunge = F.trend_plunge(poles)
    return (trend + 180.0) % 360.0, 90.0 - plunge


def folded_limbs(rng, count=40):
    """Bedding on both limbs of a fold plunging 12° toward 060, scattered 4°."""
    axis = F.poles(np.array([240.0]), np.array([78.0]))[0]  # a line 060/12 as a vector
    axis = -axis if axis[2] > 0 else axis
    # Poles on the great circle normal to the axis, from one limb to the other.
    ref = np.cross(axis, [0.0, 0.0, 1.0])
    ref /= np.linalg.norm(ref)
    other = np.cross(axis, ref)
    angle = np.radians(rng.uniform(-55, 55, count))
    poles = np.cos(angle)[:, None] * other + np.sin(angle)[:, None] * ref
    trend, plunge = F.trend_plunge(poles)
    return noisy_planes(rng, (trend + 180.0) % 360.0, 90.0 - plunge, 4.0)


def one_group(dip_direction, dip):
    return F.fabric(dip_direction, dip, np.zeros(len(dip), int), 1)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_eigenvalues_eigenvectors_and_fold_axis_agree_with_apsg(seed):
    # Oracle: apsg 1.1.5, ortensor.from_features(folset.from_array(dd, dip)):
    # eigenvalues() (normalised, descending), eigenlins (the eigenvectors as
    # lines, trend/plunge), the third of which is the fold axis.
    apsg = pytest.importorskip("apsg")  # not installed in the QGIS 3.40/3.44 roots
    dip_direction, dip = folded_limbs(np.random.default_rng(seed))
    ours = one_group(dip_direction, dip)
    tensor = apsg.ortensor.from_features(apsg.folset.from_array(dip_direction, dip))
    values = np.array([ours["e1"][0], ours["e2"][0], ours["e3"][0]])
    np.testing.assert_allclose(values, tensor.eigenvalues(), atol=1e-12)
    _, vectors = F.eigen(
        F.orientation_tensors(F.poles(dip_direction, dip), np.zeros(len(dip), int), 1)
    )
    trends, plunges = F.trend_plunge(vectors[0].T)
    for k, line in enumerate(tensor.eigenlins):
        azimuth, inclination = line.geo
        assert axial_angle(trends[k], plunges[k], azimuth, inclination) < 1e-6
    azimuth, inclination = tensor.eigenlins[2].geo
    assert axial_angle(ours["axis_tr"][0], ours["axis_pl"][0], azimuth, inclination) < 1e-6


@pytest.mark.parametrize("seed", [4, 5])
def test_eigen_fold_axis_and_mean_plane_agree_with_mplstereonet(seed):
    # Oracle: mplstereonet 0.6.3. eigenvectors(strike, dip) returns plunges,
    # bearings and eigenvalues of np.cov over the poles and their antipodes
    # (2n vectors, mean 0, divisor 2n − 1): its values are 2n/(2n − 1) times
    # the orientation tensor's. fit_girdle(strike, dip) returns the plane
    # whose pole is the fold axis; fit_pole(strike, dip) the mean plane
    # (strikes by the right-hand rule).
    mpl = pytest.importorskip("mplstereonet")  # not installed in the QGIS 3.40/3.44 roots
    dip_direction, dip = folded_limbs(np.random.default_rng(seed))
    strike = (dip_direction - 90.0) % 360.0
    n = len(dip)
    ours = one_group(dip_direction, dip)
    plunges, bearings, values = mpl.eigenvectors(strike, dip)
    np.testing.assert_allclose(
        np.asarray(values) * (2 * n - 1) / (2 * n),
        [ours["e1"][0], ours["e2"][0], ours["e3"][0]],
        atol=1e-12,
    )
    assert axial_angle(ours["axis_tr"][0], ours["axis_pl"][0], bearings[2], plunges[2]) < 1e-6
    girdle_strike, girdle_dip = mpl.fit_girdle(strike, dip)
    axis_plunge, axis_bearing = mpl.pole2plunge_bearing(girdle_strike, girdle_dip)
    angle = axial_angle(ours["axis_tr"][0], ours["axis_pl"][0], axis_bearing[0], axis_plunge[0])
    assert angle < 1e-6
    mean_strike, mean_dip = mpl.fit_pole(strike, dip)
    pole_plunge, pole_bearing = mpl.pole2plunge_bearing(mean_strike, mean_dip)
    ours_pole = ((ours["mean_dd"][0] + 180.0) % 360.0, 90.0 - ours["mean_dip"][0])
    assert axial_angle(*ours_pole, pole_bearing[0], pole_plunge[0]) < 1e-6


def demo_attitudes(rng, count=80):
    u = rng.uniform(300, W.SIZE[0] - 300, count)
    v = rng.uniform(300, W.SIZE[1] - 300, count)
    return W.bedding_attitude(W.ORIGIN[0] + u, W.ORIGIN[1] + v)


def test_demo_world_fold_axis_is_recovered_within_two_degrees():
    # Ground truth: test_data/demo_world.py, a cylindrical anticline whose
    # axis trends FOLD_TREND and plunges FOLD_PLUNGE. Attitudes as a field
    # notebook has them: rounded to whole degrees.
    dip_direction, dip = demo_attitudes(np.random.default_rng(11))
    exact = one_group(dip_direction, dip)
    assert axial_angle(exact["axis_tr"][0], exact["axis_pl"][0], W.FOLD_TREND, W.FOLD_PLUNGE) < 1e-6
    rounded = one_group(np.round(dip_direction) % 360.0, np.round(dip))
    angle = axial_angle(rounded["axis_tr"][0], rounded["axis_pl"][0], W.FOLD_TREND, W.FOLD_PLUNGE)
    assert angle < 2.0
    assert rounded["pattern"][0] == F.GIRDLE
    # Across the axis: 035 + 90.
    assert abs(rounded["best_az"][0] - 125.0) < 2.0


def test_homocline_recommends_its_dip_direction():
    dip_direction, dip = noisy_planes(
        np.random.default_rng(3), np.full(30, 120.0), np.full(30, 30.0), 5.0
    )
    result = one_group(dip_direction, dip)
    assert result["pattern"][0] == F.CLUSTER
    assert abs(result["best_az"][0] - 120.0) < 3.0
    assert result["shape"][0] > 1.0


@pytest.mark.parametrize("n", [5, 10, 30, 100, 1000])
def test_random_poles_are_scattered(n):
    # Uniform directions on the sphere: normalised Gaussian vectors (common practice).
    rng = np.random.default_rng(n)
    trials = 200
    vectors = rng.normal(size=(n * trials, 3))
    vectors /= np.linalg.norm(vectors, axis=1)[:, None]
    trend, plunge = F.trend_plunge(vectors)
    result = F.fabric(
        (trend + 180.0) % 360.0, 90.0 - plunge, np.repeat(np.arange(trials), n), trials
    )
    assert np.mean(result["pattern"] == F.SCATTERED) >= 0.98
    assert np.isnan(result["best_az"][result["pattern"] == F.SCATTERED]).all()


def test_groups_are_independent_and_input_order_does_not_matter():
    rng = np.random.default_rng(8)
    fold_dd, fold_dip = folded_limbs(rng)
    flat_dd, flat_dip = noisy_planes(rng, np.full(25, 200.0), np.full(25, 15.0), 4.0)
    dip_direction = np.r_[fold_dd, flat_dd]
    dip = np.r_[fold_dip, flat_dip]
    group = np.r_[np.zeros(len(fold_dd), int), np.ones(len(flat_dd), int)]
    together = F.fabric(dip_direction, dip, group, 2)
    shuffle = rng.permutation(len(dip))
    shuffled = F.fabric(dip_direction[shuffle], dip[shuffle], group[shuffle], 2)
    alone = one_group(flat_dd, flat_dip)
    for key in ("n", "e1", "e2", "e3", "mean_dd", "mean_dip", "best_az"):
        np.testing.assert_allclose(together[key], shuffled[key], atol=1e-9)
        np.testing.assert_allclose(together[key][1], alone[key][0], atol=1e-9)
    assert together["pattern"].tolist() == [F.GIRDLE, F.CLUSTER]


def test_too_few_or_unreadable_planes_give_nan_not_errors():
    result = F.fabric(
        np.array([120.0, np.nan, 30.0]), np.array([30.0, 40.0, np.nan]), np.array([0, 0, 1]), 3
    )
    assert result["n"].tolist() == [1, 0, 0]
    assert result["pattern"].tolist() == ["", "", ""]
    assert np.isnan(result["best_az"]).all() and np.isnan(result["axis_tr"]).all()
