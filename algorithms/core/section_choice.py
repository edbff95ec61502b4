"""Where to cut: a suggested section line across each area, and how well
existing lines sit against the recommended azimuth.

A section at angle m (the misfit) to the recommended azimuth shows a dip δ
at tan α = tan δ · cos m (the apparent-dip formula with β = 90° − m; J. B.
Jukes 1859, D. M. Ragan 2009): at 15° a 40° dip draws as 39.0°, at 30° as
36.0°, at 45° as 30.7°. The grades below are ours (common practice in
spirit: within 15° is as good as perpendicular for drawing).
"""

import numpy as np
import shapely

from .orientation import angle_between

GOOD_MISFIT = 15.0
FAIR_MISFIT = 30.0
MOSTLY_OBLIQUE = 0.5  # share of carried attitudes flagged oblique that earns a warning
STEEP_AXIS = 60.0  # a fold axis plunging more than this is seen better in plan view


def misfit(line_azimuth, best_azimuth):
    """Acute angle (0–90) between a line and the recommended azimuth — a
    line and its reverse are the same section.

    >>> misfit(np.array([10.0, 190.0, 100.0, 0.0]), np.array([20.0, 20.0, 20.0, np.nan])).tolist()
    [10.0, 10.0, 80.0, nan]
    """
    d = angle_between(line_azimuth, best_azimuth)
    return np.minimum(d, 180.0 - d)


def overall_azimuth(coords):
    """Azimuth from a line's first vertex to its last.

    >>> float(overall_azimuth(np.array([[0.0, 0.0], [5.0, 9.0], [10.0, 0.0]])))
    90.0
    """
    delta = np.asarray(coords, dtype=float)[-1, :2] - np.asarray(coords, dtype=float)[0, :2]
    return np.degrees(np.arctan2(delta[0], delta[1])) % 360.0


def suggested_lines(regions, azimuth):
    """A line through each region's centre (its centroid, or a point on its
    surface when the centroid falls outside) at ``azimuth``, across the
    region: the piece of that infinite line inside the region that holds
    the centre, directed along the azimuth. None where the azimuth is NaN
    or the region empty.

    >>> line = suggested_lines(np.array([shapely.box(0, 0, 100, 40)]), np.array([90.0]))[0]
    >>> shapely.get_coordinates(line).round(9).tolist()
    [[0.0, 20.0], [100.0, 20.0]]
    """
    regions = np.asarray(regions, dtype=object)
    azimuth = np.asarray(azimuth, dtype=float)
    lines = np.full(len(regions), None, dtype=object)
    usable = np.flatnonzero(np.isfinite(azimuth) & ~shapely.is_empty(regions))
    if len(usable) == 0:
        return lines
    area = regions[usable]
    centre = shapely.centroid(area)
    outside = ~shapely.intersects(area, centre)
    centre[outside] = shapely.point_on_surface(area[outside])
    xy = shapely.get_coordinates(centre)
    bounds = shapely.bounds(area)
    reach = np.hypot(bounds[:, 2] - bounds[:, 0], bounds[:, 3] - bounds[:, 1]) + 1.0
    direction = np.radians(azimuth[usable])
    step = np.column_stack((np.sin(direction), np.cos(direction))) * reach[:, None]
    chords = shapely.intersection(
        shapely.linestrings(np.stack((xy - step, xy + step), axis=1)), area
    )
    parts, owner = shapely.get_parts(chords, return_index=True)
    lines_only = shapely.get_type_id(parts) == 1
    parts, owner = parts[lines_only], owner[lines_only]
    gap = shapely.distance(parts, centre[owner])
    order = np.lexsort((gap, owner))
    nearest = order[np.r_[True, owner[order][1:] != owner[order][:-1]]] if len(order) else order
    chosen = parts[nearest]
    run = shapely.get_coordinates(shapely.get_point(chosen, -1)) - shapely.get_coordinates(
        shapely.get_point(chosen, 0)
    )
    backwards = np.einsum("ij,ij->i", run, step[owner[nearest]]) < 0
    chosen[backwards] = shapely.reverse(chosen[backwards])
    lines[usable[owner[nearest]]] = chosen
    return lines


def longest_overlap(lines, regions):
    """Index of the region holding the greatest length of each line; -1
    where a line meets none.

    >>> lines = [shapely.LineString([(0, 5), (30, 5)]), shapely.LineString([(50, 50), (60, 50)])]
    >>> longest_overlap(lines, [shapely.box(0, 0, 10, 10), shapely.box(10, 0, 40, 10)]).tolist()
    [1, -1]
    """
    lines = np.asarray(lines, dtype=object)
    regions = np.asarray(regions, dtype=object)
    found = np.full(len(lines), -1, dtype=int)
    if len(lines) == 0 or len(regions) == 0:
        return found
    line, region = shapely.STRtree(regions).query(lines, predicate="intersects")
    if len(line) == 0:
        return found
    length = shapely.length(shapely.intersection(lines[line], regions[region]))
    order = np.lexsort((region, -length, line))
    first = order[np.r_[True, line[order][1:] != line[order][:-1]]]
    found[line[first]] = region[first]
    return found


def advice(misfit_angle, best_azimuth, n_near, n_oblique, pattern, axis_plunge):
    """One line of advice per section line.

    >>> advice(np.array([5.0, 22.0, 50.0]), np.array([125.0, 125.0, 125.0]), np.array([9, 9, 0]),
    ...        np.array([0, 6, 0]), np.array(["girdle"] * 3, dtype=object),
    ...        np.array([8.0, 8.0, 8.0])).tolist()[:2]
    ['good: within 15° of 125°', 'fair: 22° off 125°; most attitudes oblique to it']
    """
    misfit_angle = np.asarray(misfit_angle, dtype=float)
    best = np.asarray(best_azimuth, dtype=float)
    pattern = np.asarray(pattern, dtype=object)
    n_near, n_oblique = np.asarray(n_near), np.asarray(n_oblique)
    texts = []
    for m, b, near, oblique, kind, plunge in zip(
        misfit_angle, best, n_near, n_oblique, pattern, np.asarray(axis_plunge, dtype=float)
    ):
        if kind == "":
            text = "too few attitudes to tell the structure"
        elif not np.isfinite(b):
            text = "no clear structural trend: any azimuth shows the dips as well"
        elif m <= GOOD_MISFIT:
            text = f"good: within {GOOD_MISFIT:.0f}° of {b:.0f}°"
        elif m <= FAIR_MISFIT:
            text = f"fair: {m:.0f}° off {b:.0f}°"
        else:
            text = f"poor: {m:.0f}° off; redraw it at {b:.0f}°"
        if kind == "girdle" and plunge > STEEP_AXIS:
            text += f"; the fold axis plunges {plunge:.0f}°: a down-plunge view shows it better"
        if near == 0:
            text += "; carries no attitudes"
        elif oblique > MOSTLY_OBLIQUE * near:
            text += "; most attitudes oblique to it"
        texts.append(text)
    return np.array(texts, dtype=object)
