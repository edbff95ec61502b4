"""The kink and arc constructions on the demo world's plunging anticline,
against its analytic contacts (test_data/demo_world.py is the ground truth).

Dips are taken every 100 m along the sections across the fold (A, B, C)
from the world itself: the apparent dip is the slope of the contact
surface along the section line, by central differences — independent of the
plugin's apparent-dip formula. Contacts are where the ground crosses the
analytic contact surfaces.

Stated tolerance: on the fault block of its contact and within 1 km of it
along the section, every contact's form line lies within 3 m (A, B) and
10 m (C, kinked) of the analytic contact down to 100 m below the ground,
15 m down to 200 m, and 60 m down to 500 m. The growth with depth is the
difference between the constructions, which keep bed thickness normal to
the beds (parallel folds), and the world's fold, whose contacts are one
surface shifted vertically (a similar fold): thickness normal to the beds
shrinks there with cos δ (Groshong, *3-D Structural Geology*, 2006, ch. 6,
on parallel and similar folds; confirmed in part).
"""

import demo_world as W
import numpy as np
import pytest
import shapely

from sectionwright.algorithms.core.formlines import ARC, KINK, construct

STATION_SPACING = 100.0
REACH = 1000.0  # along the section from each contact
TOLERANCE = {"A": {100: 3, 200: 15, 500: 60}, "B": {100: 3, 200: 15, 500: 60},
             "C": {100: 10, 200: 15, 500: 60}}  # fmt: skip


def _section(label):
    line = shapely.LineString(np.array(W.SECTION_LINES[label]) + np.array(W.ORIGIN))
    return line, lambda ch: shapely.get_coordinates(shapely.line_interpolate_point(line, ch))


def _stations(line, at):
    chainage = np.arange(STATION_SPACING / 2, line.length, STATION_SPACING)
    h = 0.5
    before, after = at(chainage - h), at(chainage + h)
    slope = (W.fold_surface(*after.T) - W.fold_surface(*before.T)) / (2 * h)
    unbroken = W.fault_side(*before.T) == W.fault_side(*after.T)
    return chainage[unbroken], np.degrees(np.arctan(-slope))[unbroken]


def _contacts(chainage, xy, ground):
    found = []
    for k in range(len(W.CONTACT_LEVELS)):
        misfit = ground - W.contact_elevation(k, *xy.T)
        i = np.flatnonzero(np.sign(misfit[:-1]) != np.sign(misfit[1:]))
        i = i[W.fault_side(*xy[i].T) == W.fault_side(*xy[i + 1].T)]
        t = misfit[i] / (misfit[i] - misfit[i + 1])
        found += [(c, k) for c in chainage[i] + t * (chainage[i + 1] - chainage[i])]
    found.sort()
    return np.array([c for c, _ in found]), np.array([k for _, k in found])


@pytest.mark.parametrize("method", [KINK, ARC])
@pytest.mark.parametrize("label", ["A", "B", "C"])
def test_contacts_follow_the_analytic_anticline(label, method):
    line, at = _section(label)
    chainage = np.arange(0.0, line.length, 5.0)
    xy = at(chainage)
    ground = W.ground(*xy.T)
    station_x, dips = _stations(line, at)
    contact_x, contact_k = _contacts(chainage, xy, ground)
    names = np.array([W.UNITS[k] for k in contact_k], dtype=object)
    below = np.array([W.UNITS[k + 1] for k in contact_k], dtype=object)
    result = construct(
        method,
        chainage,
        ground,
        np.column_stack((station_x, np.interp(station_x, chainage, ground))),
        dips,
        np.column_stack((contact_x, np.interp(contact_x, chainage, ground))),
        names,
        below,
        2000.0,
        0.0,
    )
    # every contact lies on a contact form line (a bed met on two limbs at
    # the same level is drawn once)
    drawn = shapely.multilinestrings(list(result.lines[result.contact >= 0]))
    points = shapely.points(contact_x, np.interp(contact_x, chainage, ground))
    assert shapely.distance(points, drawn).max() < 1.0
    worst = {depth: 0.0 for depth in TOLERANCE[label]}
    for form_line, c in zip(result.lines, result.contact):
        if c < 0:
            continue
        xz = shapely.get_coordinates(shapely.segmentize(form_line, 5.0))
        xz = xz[np.abs(xz[:, 0] - contact_x[c]) <= REACH]
        p = at(xz[:, 0])
        block = W.fault_side(*p.T) == W.fault_side(*at(np.array([contact_x[c]]))[0])
        error = np.abs(xz[block, 1] - W.contact_elevation(contact_k[c], *p[block].T))
        depth = W.ground(*p[block].T) - xz[block, 1]
        for limit in worst:
            if (depth <= limit).any():
                worst[limit] = max(worst[limit], error[depth <= limit].max())
    for limit, tolerance in TOLERANCE[label].items():
        assert worst[limit] < tolerance, (limit, worst)
