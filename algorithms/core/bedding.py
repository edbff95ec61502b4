"""What the kink and arc constructions share: beds in a vertical section at
true scale (x = chainage, z = elevation), the ground that bounds them, and
the exaggeration applied only when they are written.

A signed apparent dip is + when the bed goes down toward the section's end.
Its *upward normal* u = (sin α, cos α) points to younger beds (unless the
sequence is overturned); the *stratigraphic level* s = u · p + c measures
distance normal to the beds, so two form lines Δs apart are Δs thick.
"""

import numpy as np
import shapely

# Apparent dips are clipped to this so that a vertical bed still has a
# direction along the section (its normal is horizontal, not undefined).
STEEPEST_DIP = 89.9
CUT_ROUNDING = 1e-6  # metres: a vertex this close to the ground counts as on it


def upward_normals(signed_dip):
    """(n, 2) upward unit normals of beds with the given signed apparent
    dips (degrees).

    >>> upward_normals(np.array([0.0, 30.0])).round(4).tolist()
    [[0.0, 1.0], [0.5, 0.866]]
    """
    alpha = np.radians(np.clip(np.asarray(signed_dip, dtype=float), -STEEPEST_DIP, STEEPEST_DIP))
    return np.column_stack((np.sin(alpha), np.cos(alpha)))


def bed_directions(signed_dip):
    """(n, 2) unit vectors along the beds, pointing toward the section's end.

    >>> bed_directions(np.array([45.0])).round(4).tolist()
    [[0.7071, -0.7071]]
    """
    normal = upward_normals(signed_dip)
    return np.column_stack((normal[:, 1], -normal[:, 0]))


def signed_line_dip(direction):
    """Signed dip (degrees) of lines with the given (n, 2) directions: the
    angle below the horizontal, + when the line goes down toward the end.

    >>> signed_line_dip(np.array([[1.0, -1.0], [-1.0, 1.0], [-1.0, -1.0], [0, -1]])).tolist()
    [45.0, 45.0, -45.0, 90.0]
    """
    d = np.asarray(direction, dtype=float)
    down = np.where(d[:, 1:2] > 0, -d, d)
    dip = np.degrees(np.arctan2(-down[:, 1], np.abs(down[:, 0])))
    return np.where(down[:, 0] < 0, -dip, dip)


def ground_arrays(chainage, elevation):
    """The ground as sorted chainages and elevations, samples without an
    elevation left out (the ground is bridged straight across a gap)."""
    chainage = np.asarray(chainage, dtype=float)
    elevation = np.asarray(elevation, dtype=float)
    keep = ~(np.isnan(chainage) | np.isnan(elevation))
    order = np.argsort(chainage[keep], kind="stable")
    return chainage[keep][order], elevation[keep][order]


def below_ground(lines, ground_x, ground_z, floor):
    """The pieces of ``lines`` (LineStrings or MultiLineStrings) that lie
    below the ground, above ``floor`` and within the ground's chainages, as
    LineStrings with the index of the line each came from.

    The ground is linear between its samples and each line between its
    vertices, so the two meet only where a sign change shows between the
    vertices of both: the cut is exact, and no polygon of the whole ground
    is built (on long sections that would cost more than the construction).

    >>> parts, index = below_ground(np.array([shapely.LineString([(-5, 5), (5, -5)])]),
    ...                             np.array([0.0, 10]), np.array([0.0, 0]), -3.0)
    >>> shapely.get_coordinates(parts).round(6).tolist(), index.tolist()
    ([[0.0, 0.0], [3.0, -3.0]], [0])
    """
    lines = np.asarray(lines, dtype=object)
    parts, owner = shapely.get_parts(lines, return_index=True)
    coords, vertex_part = shapely.get_coordinates(parts, return_index=True)
    if len(coords) == 0:
        return np.empty(0, dtype=object), np.empty(0, dtype=int)
    # one row of NaN between parts, so that no segment joins two of them
    starts = np.flatnonzero(np.r_[True, np.diff(vertex_part) != 0])
    path = np.insert(coords, starts[1:], np.nan, axis=0)
    part_of = np.insert(vertex_part, starts[1:], -1)
    a = path[:-1]
    step = np.diff(path, axis=0)
    # Only where a segment is within the ground's range of elevations can it
    # meet the ground: the ground's samples there are where the difference
    # of the two may change its slope.
    low, high = np.min(ground_z), np.max(ground_z)
    with np.errstate(invalid="ignore", divide="ignore"):
        t_low = (low - a[:, 1]) / step[:, 1]
        t_high = (high - a[:, 1]) / step[:, 1]
        t0 = np.clip(np.fmin(t_low, t_high), 0.0, 1.0)
        t1 = np.clip(np.fmax(t_low, t_high), 0.0, 1.0)
        flat = step[:, 1] == 0
        inside_band = (a[:, 1] >= low) & (a[:, 1] <= high)
        t0 = np.where(flat, np.where(inside_band, 0.0, 1.0), t0)
        t1 = np.where(flat, np.where(inside_band, 1.0, 0.0), t1)
        x0, x1 = a[:, 0] + t0 * step[:, 0], a[:, 0] + t1 * step[:, 0]
    valid = ~np.isnan(x0 + x1) & (t1 > t0)
    lo, hi = np.where(valid, np.fmin(x0, x1), 0.0), np.where(valid, np.fmax(x0, x1), 0.0)
    first = np.searchsorted(ground_x, lo, side="right")
    count = np.where(valid, np.maximum(np.searchsorted(ground_x, hi, side="left") - first, 0), 0)
    segment = np.repeat(np.arange(len(a)), count)
    k = first[segment] + np.arange(count.sum()) - np.repeat(np.cumsum(count) - count, count)
    t = (ground_x[k] - a[segment, 0]) / step[segment, 0]
    band = np.flatnonzero(valid)
    u = np.sort(
        np.r_[np.arange(len(path), dtype=float), segment + t, band + t0[band], band + t1[band]]
    )

    def at(u):
        s = np.minimum(u.astype(int), len(a) - 1)
        f = (u - s)[:, None]
        with np.errstate(invalid="ignore"):
            # a part's last vertex is itself, not a step toward the separator
            return np.where(f == 0, a[s], a[s] + f * step[s])

    def margins(p):  # all ≤ 0 inside
        with np.errstate(invalid="ignore"):
            ground = np.interp(p[:, 0], ground_x, ground_z)
        return np.column_stack(
            (p[:, 1] - ground, floor - p[:, 1], ground_x[0] - p[:, 0], p[:, 0] - ground_x[-1])
        )

    points = at(u)
    m = margins(points)
    with np.errstate(invalid="ignore", divide="ignore"):
        sign_change = m[:-1] * m[1:] < 0
        fraction = m[:-1] / (m[:-1] - m[1:])
        cuts = (u[:-1, None] + fraction * np.diff(u)[:, None])[sign_change]
    cut_points = at(cuts)
    order = np.argsort(np.r_[u, cuts], kind="stable")
    u = np.r_[u, cuts][order]
    points = np.vstack((points, cut_points))[order]
    worst = np.r_[m.max(axis=1), margins(cut_points).max(axis=1)][order]
    distinct = np.r_[True, np.diff(u) > 0]
    u, points, worst = u[distinct], points[distinct], worst[distinct]
    # Each margin is linear between neighbouring samples and changes sign
    # only at a sample, so an interval is inside when both its ends are
    # (to within rounding at the cuts).
    with np.errstate(invalid="ignore"):
        inside = np.fmax(worst[:-1], worst[1:]) <= CUT_ROUNDING
        inside &= ~np.isnan(worst[:-1] + worst[1:])
    edges = np.diff(np.r_[0, inside.astype(np.int8), 0])
    run_start, run_stop = np.flatnonzero(edges == 1), np.flatnonzero(edges == -1)
    if len(run_start) == 0:
        return np.empty(0, dtype=object), np.empty(0, dtype=int)
    length = run_stop - run_start + 1
    vertices = (
        np.repeat(run_start, length)
        + np.arange(length.sum())
        - np.repeat(np.cumsum(length) - length, length)
    )
    pieces = shapely.linestrings(
        points[vertices], indices=np.repeat(np.arange(len(length)), length)
    )
    which = owner[part_of[np.minimum(u[run_start].astype(int), len(part_of) - 1)]]
    keep = shapely.length(pieces) > 1e-6
    return pieces[keep], which[keep]


def exaggerated(geometries, exaggeration):
    """Section-space geometries: elevations multiplied by the exaggeration,
    after the construction (angles are never bisected in exaggerated space).

    >>> shapely.to_wkt(exaggerated(np.array([shapely.LineString([(0, 1), (2, 3)])]), 2)[0])
    'LINESTRING (0 2, 2 6)'
    """
    return shapely.transform(geometries, lambda xy: xy * np.array([1.0, exaggeration]))


def level_spacing(contact_levels, lowest, highest, spacing):
    """Extra stratigraphic levels every ``spacing`` between the contacts'
    levels, and beyond them up to ``highest`` and down to ``lowest`` (the
    range of levels the construction reaches), counted from the nearest
    contact below (or, under the lowest contact, from it downward). Levels
    closer than half a spacing to a contact are left to the contact.

    >>> level_spacing(np.array([0.0, 25.0]), -21.0, 40.0, 10.0).tolist()
    [-20.0, -10.0, 10.0, 20.0, 35.0]
    """
    levels = np.unique(np.asarray(contact_levels, dtype=float))
    levels = levels[~np.isnan(levels)]
    if spacing <= 0 or len(levels) == 0 or not np.isfinite(lowest + highest):
        return np.empty(0)
    below = levels[0] - spacing * np.arange(1, int((levels[0] - lowest) // spacing) + 1)
    bounds = np.r_[levels, max(highest, levels[-1])]
    steps = [
        start + spacing * np.arange(1, int((stop - start) // spacing) + 1)
        for start, stop in zip(bounds[:-1], bounds[1:])
    ]
    extra = np.concatenate([below[::-1]] + steps)
    gap = np.min(np.abs(extra[:, None] - levels[None, :]), axis=1) if len(extra) else extra
    return extra[gap >= spacing / 2]
