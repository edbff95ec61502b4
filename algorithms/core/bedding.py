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


def below_ground(ground_x, ground_z, floor):
    """Polygon between the ground and the construction floor, over the
    section's length: everything a form line may occupy.

    >>> below_ground(np.array([0.0, 10]), np.array([5.0, 5]), -5.0).area
    100.0
    """
    ring = np.vstack(
        ([ground_x[0], floor], np.column_stack((ground_x, ground_z)), [ground_x[-1], floor])
    )
    return shapely.make_valid(shapely.Polygon(ring))


def clipped_parts(lines, region):
    """The pieces (LineStrings) of ``lines`` inside ``region``, with the
    index of the line each came from."""
    if len(lines) == 0:
        return np.empty(0, dtype=object), np.empty(0, dtype=int)
    shapely.prepare(region)
    inside = shapely.intersection(np.asarray(lines, dtype=object), region)
    parts, index = shapely.get_parts(inside, return_index=True)
    lines_only = shapely.get_type_id(parts) == shapely.GeometryType.LINESTRING
    parts, index = parts[lines_only], index[lines_only]
    long_enough = shapely.length(parts) > 1e-6
    return parts[long_enough], index[long_enough]


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
