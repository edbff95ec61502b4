"""Kink and arc constructions against analytic folds, and the true thickness
against the textbook formula.

Sources: kink (dip-domain) folds — J. Suppe, *Principles of Structural
Geology*, 1985 (from memory); R. H. Groshong, *3-D Structural Geology*, 2nd
ed., 2006, ch. 6 (confirmed in part). Concentric folds — H. G. Busk, *Earth
Flexures*, 1929; Groshong 2006, fig. 6.29 (confirmed). True thickness —
R. C. Rowland, E. M. Duebendorfer, I. M. Schiefelbein, *Structural Analysis
and Synthesis*, 3rd ed., 2007 (equations from memory); D. M. Ragan,
*Structural Geology*, 2009, ch. 3 (from memory).
"""

import numpy as np
import pytest
import shapely

from sectionwright.algorithms.core.bedding import below_ground
from sectionwright.algorithms.core.busk import arc_section
from sectionwright.algorithms.core.formlines import ARC, KINK, construct
from sectionwright.algorithms.core.kink import kink_section
from sectionwright.algorithms.core.thickness import (
    bed_normals,
    thickness_changes,
    thickness_sd,
    true_thickness,
    unit_thickness,
)

# A box anticline of parallel (constant-thickness) beds: a flat crest of
# half-width A on the reference bed (z = 0), limbs dipping LIMB outward.
# The bed a normal distance h below the reference is the lower envelope of
# the reference's three lines each moved h along its normal (the parallel
# offset of a convex polyline):
#     z_h(x) = min(−h, −(|x| − A)·tan LIMB − h / cos LIMB).
# Its crest shrinks with depth and vanishes at h* = A tan LIMB / (1/cos LIMB − 1),
# where the two axial surfaces meet; below, the fold is a chevron with one
# vertical axial surface.
A = 600.0
LIMB = 30.0
GROUND = -50.0
H_STAR = A * np.tan(np.radians(LIMB)) / (1 / np.cos(np.radians(LIMB)) - 1)


def box_bed(h, x):
    t = np.radians(LIMB)
    return np.minimum(-h, -(np.abs(x) - A) * np.tan(t) - h / np.cos(t))


def box_fold_construction(spacing=0.0):
    # The axial surfaces bisect crest and limb: at the ground they lie
    # GROUND·tan(LIMB/2) inside the reference hinges; dip stations 100 m
    # either side of each.
    axial = A + GROUND * np.tan(np.radians(LIMB / 2))
    stations_x = np.array([-axial - 100, -axial + 100, axial - 100, axial + 100])
    levels = np.array([0.0, 20.0, 40.0])  # beds that crop out on both limbs
    outcrop = A + (-GROUND - levels / np.cos(np.radians(LIMB))) / np.tan(np.radians(LIMB))
    contacts = np.column_stack((np.r_[-outcrop, outcrop[::-1]], np.full(6, GROUND)))
    units = np.array(["u"] * 6, dtype=object)
    return construct(
        KINK,
        np.array([-3000.0, 3000.0]),
        np.array([GROUND, GROUND]),
        np.column_stack((stations_x, np.full(4, GROUND))),
        np.array([-LIMB, 0.0, 0.0, LIMB]),
        contacts,
        units,
        units,
        3000.0,
        spacing,
    )


def test_kink_form_lines_lie_on_the_analytic_box_fold_within_1_m():
    result = box_fold_construction(spacing=250.0)
    # one form line per bed (the contacts on both limbs are on one level),
    # cut by the ground into two limbs
    assert (result.contact >= 0).sum() == 6
    deepest = 0.0
    for line in result.lines:
        xz = shapely.get_coordinates(shapely.segmentize(line, 5.0))
        h = _level_of(xz[len(xz) // 2])
        assert np.abs(xz[:, 1] - box_bed(h, xz[:, 0])).max() < 1.0
        deepest = max(deepest, h)
    assert deepest > H_STAR + 250  # also below the meeting of the axial surfaces


def test_kink_axial_surfaces_meet_at_depth_and_one_continues():
    fold = box_fold_construction()
    bottoms = [shapely.get_coordinates(a)[:, 1].min() for a in fold.axes]
    deepest = shapely.get_coordinates(fold.axes[int(np.argmin(bottoms))])
    # the two axial surfaces meet h* below the reference bed; from there one
    # runs straight down, vertical, bisecting −30° and +30°
    assert deepest[:, 0] == pytest.approx([0.0, 0.0], abs=1e-6)
    assert deepest[:, 1].max() == pytest.approx(-H_STAR, abs=1e-6)
    upper = [shapely.get_coordinates(a) for k, a in enumerate(fold.axes) if bottoms[k] > -3000]
    assert len(upper) == 2
    for coords in upper:
        assert coords[:, 1].min() == pytest.approx(-H_STAR, abs=1e-6)


def test_kink_axial_surfaces_bisect_the_limbs():
    fold = box_fold_construction()
    for line, left, right, dip in zip(fold.axes, fold.dip_left, fold.dip_right, fold.axis_dip):
        direction = np.diff(shapely.get_coordinates(line), axis=0)[0]
        direction /= np.linalg.norm(direction)
        limbs = [np.array([np.cos(np.radians(a)), -np.sin(np.radians(a))]) for a in (left, right)]
        # equal angles between the axial surface and the two limbs
        angles = [np.degrees(np.arccos(abs(direction @ limb))) for limb in limbs]
        assert angles[0] == pytest.approx(angles[1], abs=1e-9)


def test_kink_thickness_normal_to_the_beds_is_the_same_on_both_limbs_and_the_crest():
    result = construct(
        KINK,
        np.array([-3000.0, 3000.0]),
        np.array([400.0, 400.0]),
        np.array([[-800.0, 400], [-400, 400], [400, 400], [800, 400]]),
        np.array([-LIMB, 0.0, 0.0, LIMB]),
        np.array([[-1000.0, 400], [1000.0, 400]]),
        np.array(["X", "X"], dtype=object),
        np.array(["Y", "Y"], dtype=object),
        2000.0,
        100.0,
    )
    # with the contact at 0 m and spacing lines every 100 m, the distance
    # between neighbouring form lines measured normal to the beds is 100 m
    # on each limb and in the crest (Suppe 1985)
    probes = {"left limb": -1500.0, "crest": 0.0, "right limb": 1500.0}
    for where, x in probes.items():
        crossing = []
        for line in result.lines:
            hit = shapely.intersection(line, shapely.LineString([(x, -5000), (x, 5000)]))
            if not hit.is_empty:
                crossing.append(shapely.get_coordinates(hit)[0, 1])
        z = np.sort(crossing)[-4:]
        dip = 0.0 if where == "crest" else LIMB
        assert np.diff(z) * np.cos(np.radians(dip)) == pytest.approx([100.0] * 3, abs=1e-6), where


def _level_of(point):
    """h of the analytic box-fold bed through a point (by bisection)."""
    low, high = -1000.0, 5000.0
    for _ in range(200):
        mid = 0.5 * (low + high)
        if box_bed(mid, point[0]) > point[1]:
            low = mid
        else:
            high = mid
    return mid


# A concentric anticline: beds are circles about CENTRE; the attitude at a
# ground point is the circle's tangent there.
CENTRE = np.array([200.0, -1200.0])


def test_arc_form_lines_lie_on_the_analytic_circles_within_1_m():
    ground = 0.0
    stations_x = np.array([-900.0, -450.0, -50.0, 300.0, 700.0, 1150.0, 1350.0])
    dips = np.degrees(np.arctan((stations_x - CENTRE[0]) / (ground - CENTRE[1])))
    radii = np.array([1250.0, 1400.0, 1600.0])
    offsets = np.sqrt(radii**2 - (ground - CENTRE[1]) ** 2)
    contacts_x = np.r_[CENTRE[0] - offsets, CENTRE[0] + offsets]
    result = construct(
        ARC,
        np.array([-2000.0, 2500.0]),
        np.array([ground, ground]),
        np.column_stack((stations_x, np.full(7, ground))),
        dips,
        np.column_stack((contacts_x, np.full(6, ground))),
        np.array(["a"] * 6, dtype=object),
        np.array(["b"] * 6, dtype=object),
        1500.0,
        50.0,
    )
    # the wedge between the normals through the outermost stations (outside
    # it the beds run straight at the end dips)
    ends = np.array([[stations_x[0], ground], [stations_x[-1], ground]]) - CENTRE
    ends *= 1e4 / np.linalg.norm(ends, axis=1)[:, None]
    between = shapely.Polygon([CENTRE, CENTRE + ends[0], CENTRE + ends[1]])
    checked = 0
    for line, contact in zip(result.lines, result.contact):
        arc = shapely.intersection(line, between)
        if arc.is_empty:
            continue
        xy = shapely.get_coordinates(shapely.segmentize(arc, 2.0))
        radius = np.linalg.norm(xy - CENTRE, axis=1)
        assert np.ptp(radius) < 1.0  # on one circle about the known centre
        if contact >= 0:  # … the circle of that contact
            assert np.min(np.abs(radius.mean() - radii)) < 1.0
        checked += 1
    assert checked >= 6
    # every arc is centred on the fold's centre: the axes start there
    for axis in result.axes:
        start = shapely.get_coordinates(axis)
        assert np.min(np.linalg.norm(start - CENTRE, axis=1)) < 1.0 or start[:, 1].max() < 0


# True thickness: t = w·|sin δ cos σ sin β ± cos δ sin σ| with w the slope
# distance along the traverse, σ the ground slope, β the angle between strike
# and traverse; "+" when the ground slopes opposite to the dip (Rowland et
# al. 2007; Ragan 2009). Values worked out here from that formula.
@pytest.mark.parametrize(
    "dip, beta, slope, slope_faces_dip, w",
    [
        (30.0, 90.0, 0.0, True, 200.0),
        (40.0, 90.0, 15.0, False, 300.0),
        (40.0, 90.0, 15.0, True, 300.0),
        (25.0, 60.0, 10.0, False, 150.0),
        (70.0, 45.0, 20.0, True, 500.0),
    ],
)
def test_true_thickness_matches_the_formula_with_ground_slope(dip, beta, slope, slope_faces_dip, w):
    d, b, s = np.radians([dip, beta, slope])
    sign = -1.0 if slope_faces_dip else 1.0
    expected = w * abs(np.sin(d) * np.cos(s) * np.sin(b) + sign * np.cos(d) * np.sin(s))
    # the line runs east (azimuth 90); the bed dips toward the line's end at
    # angle β to its strike: dip direction 90 − (90 − β) = β
    dip_direction = 90.0 - (90.0 - beta)
    dx = w * np.cos(s)
    # the ground faces the dip (slopes down toward the end) or the opposite way
    dz = -w * np.sin(s) if slope_faces_dip else w * np.sin(s)
    normal = bed_normals(np.array([dip]), np.array([dip_direction]), np.array([90.0]))
    assert true_thickness(np.array([dx]), np.array([dz]), normal)[0] == pytest.approx(expected)


def test_flat_ground_thickness_is_width_times_sin_dip():
    # t = w sin δ on flat ground across strike (Rowland et al. 2007)
    normal = bed_normals(np.array([35.0]), np.array([270.0]), np.array([90.0]))
    assert true_thickness(np.array([120.0]), np.array([0.0]), normal)[0] == pytest.approx(
        120.0 * np.sin(np.radians(35.0))
    )


def test_thickness_sd_is_the_first_order_propagation_of_the_dip_sd():
    # numerical derivative of t = cos δ·|Δx tan α + Δz| at fixed obliquity
    dx, dz, delta, alpha, sigma = 250.0, -40.0, np.radians(38.0), np.radians(31.0), 2.0

    def t(a):
        return np.cos(delta) * abs(dx * np.tan(a) + dz)

    h = 1e-6
    expected = abs(t(alpha + h) - t(alpha - h)) / (2 * h) * np.radians(sigma)
    normal = np.array([[np.cos(delta) * np.tan(alpha), 0.3, np.cos(delta)]])
    assert thickness_sd(np.array([dx]), normal, np.array([sigma]))[0] == pytest.approx(expected)


def test_a_unit_that_thickens_is_flagged_and_one_that_does_not_is_not():
    """A dedicated synthetic section (the demo world has no unit of changing
    thickness): units A, B, C in a syncline on flat ground, limbs dipping
    30° and 40°; B is 100 m thick on the left limb and 150 m on the right,
    A and C are 80 m everywhere."""
    left, right = np.radians(30.0), np.radians(40.0)
    # outcrop widths on flat ground: w = t / sin δ (Rowland et al. 2007)
    widths_left = np.array([80.0, 100.0, 80.0]) / np.sin(left)  # C, B, A going inward
    widths_right = np.array([80.0, 150.0, 80.0]) / np.sin(right)  # A, B, C going outward
    edges_left = np.cumsum(np.r_[0.0, widths_left])
    edges_right = edges_left[-1] + 500.0 + np.cumsum(np.r_[0.0, widths_right])
    contacts_x = np.r_[edges_left, edges_right]
    contacts = np.column_stack((contacts_x, np.zeros(8)))
    before = np.array(["D", "C", "B", "A", "Z", "A", "B", "C"], dtype=object)
    after = np.array(["C", "B", "A", "Z", "A", "B", "C", "D"], dtype=object)
    stations = np.r_[edges_left[:-1] + 10, edges_right[:-1] + 10]
    dip_direction = np.r_[np.full(3, 90.0), np.full(3, 270.0)]  # line runs east
    dips = np.r_[np.full(3, 30.0), np.full(3, 40.0)]
    normals = bed_normals(dips, dip_direction, np.full(6, 90.0))
    table = unit_thickness(
        contacts, before, after, stations, normals, np.full(6, 2.0), np.array([])
    )
    assert table["unit"].tolist() == ["C", "B", "A", "Z", "A", "B", "C"]
    assert table["flags"][3] == ["closure", "no_dip"]  # the syncline's core
    measured = dict(zip(range(7), table["thick_m"].tolist()))
    assert [measured[i] for i in (0, 1, 2, 4, 5, 6)] == pytest.approx([80, 100, 80, 80, 150, 80])
    change, flagged = thickness_changes(table["unit"], table["thick_m"], 15.0)
    assert flagged.tolist() == [False, True, False, False, False, True, False]
    assert change[5] == pytest.approx(50.0)


def test_a_fold_closure_and_a_fault_give_no_thickness():
    contacts = np.array([[0.0, 0], [100, 0], [200, 0], [300, 0]])
    table = unit_thickness(
        contacts,
        np.array(["A", "B", "C", "B"], dtype=object),
        np.array(["B", "C", "B", "A"], dtype=object),
        np.array([50.0, 150, 250]),
        bed_normals(np.full(3, 30.0), np.full(3, 90.0), np.full(3, 90.0)),
        np.full(3, 2.0),
        np.array([280.0]),
    )
    assert table["flags"] == [[], ["closure"], ["faulted"]]
    assert np.isnan(table["thick_m"][1:]).all()


@pytest.mark.parametrize("method", [KINK, ARC])
def test_form_lines_never_cross_below_the_ground(method):
    """Form lines are level sets of one stratigraphic level, so lines of
    different levels never cross (common practice: form lines never cross).
    Seeded random sections: folds sampled at random stations with noise, on
    hilly ground, axial surfaces meeting at depth and in the air, arcs
    whose wedges overlap at depth."""
    rng = np.random.default_rng(13)
    for _ in range(30):
        length = 15000.0
        ground_x = np.linspace(0, length, 300)
        ground_z = 500 + 40 * np.sin(ground_x / 700 + rng.uniform(0, 6))
        stations = np.sort(rng.uniform(0, length, rng.integers(5, 40)))
        wavelength, amplitude = rng.uniform(3000, 8000), rng.uniform(100, 600)
        slope = amplitude * 2 * np.pi / wavelength * np.cos(2 * np.pi * stations / wavelength)
        dips = np.degrees(np.arctan(-slope)) + rng.normal(0, 3, len(stations))
        floor = ground_z.min() - 2000
        fold = (
            kink_section(stations, dips, ground_x, ground_z, floor)
            if method == KINK
            else arc_section(stations, np.interp(stations, ground_x, ground_z), dips, 1e6)
        )
        parts, level = below_ground(fold.form_lines(np.linspace(-2500, 1500, 41)), ground_x,
                                    ground_z, floor)  # fmt: skip
        drawn = [shapely.multilinestrings(list(parts[level == k])) for k in np.unique(level)]
        for upper, lower in zip(drawn, drawn[1:]):
            assert not shapely.intersects(upper, lower)
