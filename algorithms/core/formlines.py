"""Form lines of one section: the chosen construction, a form line through
every contact and, optionally, every ``spacing`` metres of stratigraphy,
cut to the ground and the floor, at true scale."""

from dataclasses import dataclass

import numpy as np
import shapely

from .bedding import below_ground, level_spacing
from .busk import arc_section
from .kink import kink_section

KINK, ARC = 0, 1
EDGE_SAMPLES = 200
SAME_LEVEL = 1.0  # metres of stratigraphy: contacts this close share a form line


@dataclass
class SectionFormLines:
    lines: np.ndarray  # LineStrings, true scale
    contact: np.ndarray  # index of the contact each line goes through, −1 for spacing lines
    unit_above: np.ndarray
    unit_below: np.ndarray
    axes: np.ndarray  # LineStrings, true scale
    dip_left: np.ndarray
    dip_right: np.ndarray
    axis_dip: np.ndarray


def construct(method, ground_x, ground_z, stations, dips, contacts, before, after, depth, spacing):
    """Form lines and axes of one section.

    ``ground_x``/``ground_z`` the ground (sorted, no gaps), ``stations``
    (n, 2) dip stations (chainage, elevation) with signed apparent
    ``dips``, ``contacts`` (k, 2) ground points of the contacts with the
    units ``before`` and ``after`` them along the line; the construction
    reaches ``depth`` metres below the section's lowest ground.

    A homocline dipping 45° toward the end (younger beds toward the end),
    one contact at the ground:

    >>> result = construct(KINK, np.array([0.0, 100]), np.array([0.0, 0]),
    ...                    np.array([[50.0, 0]]), np.array([45.0]), np.array([[20.0, 0]]),
    ...                    np.array(["A"]), np.array(["B"]), 30.0, 0.0)
    >>> shapely.get_coordinates(result.lines).round(6).tolist(), result.unit_above.tolist()
    ([[20.0, 0.0], [50.0, -30.0]], ['B'])

    Without a usable dip nothing is constructed:

    >>> len(construct(ARC, np.array([0.0, 100]), np.array([0.0, 0]), np.array([[50.0, 0]]),
    ...               np.array([np.nan]), np.empty((0, 2)), [], [], 30.0, 0.0).lines)
    0
    """
    floor = float(np.min(ground_z)) - depth
    width = max(float(ground_x[-1] - ground_x[0]), 1.0)
    reach = 4.0 * (width + float(np.max(ground_z)) - floor)
    if method == ARC:
        section = arc_section(stations[:, 0], stations[:, 1], dips, reach)
    else:
        section = kink_section(stations[:, 0], dips, ground_x, ground_z, floor)
    if section is None:
        return _nothing()
    contact_levels = section.levels_at(contacts) if len(contacts) else np.empty(0)
    contact_levels[_repeated(contact_levels, before, after)] = np.nan
    axes, left, right, axis_dip = section.axes()
    axis_lines, axis_index = below_ground(axes, ground_x, ground_z, floor)
    extra = (
        level_spacing(
            contact_levels, *_level_range(section, ground_x, ground_z, floor, axis_lines), spacing
        )
        if spacing > 0
        else np.empty(0)
    )
    levels = np.r_[contact_levels, extra]
    known = ~np.isnan(levels)
    lines, which = below_ground(section.form_lines(levels[known]), ground_x, ground_z, floor)
    which = np.flatnonzero(known)[which]
    contact = np.where(which < len(contacts), which, -1)
    above, below = _units_above_below(section, contacts, before, after, ground_x, ground_z)
    pick = np.maximum(contact, 0)
    return SectionFormLines(
        lines,
        contact,
        np.where(contact >= 0, above[pick] if len(above) else "", ""),
        np.where(contact >= 0, below[pick] if len(below) else "", ""),
        axis_lines,
        left[axis_index],
        right[axis_index],
        axis_dip[axis_index],
    )


def _nothing():
    none = np.empty(0, dtype=object)
    numbers = np.empty(0)
    return SectionFormLines(
        none, np.empty(0, dtype=int), none, none, none, numbers, numbers, numbers
    )


def _repeated(levels, before, after):
    """Contacts on the level of an earlier contact between the same two
    units (one bed met on both limbs of a fold): its form line is drawn
    once."""
    pair = np.array([" | ".join(sorted((str(b), str(a)))) for b, a in zip(before, after)])
    close = np.abs(levels[:, None] - levels[None, :]) < SAME_LEVEL
    same = close & (pair[:, None] == pair[None, :])
    return np.triu(same, k=1).any(axis=0)


def _level_range(section, ground_x, ground_z, floor, axes):
    """Lowest and highest stratigraphic level met below the ground: at the
    ground's samples (at most EDGE_SAMPLES of them), along the floor and at
    the ends of the axes, where the levels' pattern changes."""
    every = max(1, len(ground_x) // EDGE_SAMPLES)
    along = np.linspace(ground_x[0], ground_x[-1], EDGE_SAMPLES)
    points = np.vstack(
        (
            np.column_stack((ground_x[::every], ground_z[::every])),
            [[ground_x[-1], ground_z[-1]]],
            np.column_stack((along, np.full(EDGE_SAMPLES, floor))),
            shapely.get_coordinates(axes),
        )
    )
    levels = section.levels_at(points)
    levels = levels[~np.isnan(levels)]
    return (levels.min(), levels.max()) if len(levels) else (np.nan, np.nan)


def _units_above_below(section, contacts, before, after, ground_x, ground_z):
    """Which of the units either side of each contact is the upper: walking
    along the ground toward the end goes up-section where the level rises.
    Contacts between the same two units are given the order most of them
    show, so that one badly placed dip does not turn a unit over."""
    if len(contacts) == 0:
        return np.empty(0, dtype=object), np.empty(0, dtype=object)
    step = 0.5
    ahead = contacts[:, 0] + step
    behind = contacts[:, 0] - step
    rise = section.levels_at(np.column_stack((ahead, np.interp(ahead, ground_x, ground_z))))
    rise -= section.levels_at(np.column_stack((behind, np.interp(behind, ground_x, ground_z))))
    before, after = np.asarray(before, dtype=object), np.asarray(after, dtype=object)
    # +1 when the alphabetically first unit of the pair is the upper one
    first_is_after = np.array([str(a) < str(b) for b, a in zip(before, after)])
    vote = np.where(first_is_after, 1, -1) * np.sign(np.nan_to_num(rise))
    pair = np.array([" | ".join(sorted((str(b), str(a)))) for b, a in zip(before, after)])
    _, code = np.unique(pair, return_inverse=True)
    majority = np.bincount(code.ravel(), weights=vote)[code.ravel()]
    orientation = np.where(first_is_after, 1, -1)
    upward = np.where(majority != 0, np.sign(majority) * orientation, np.nan_to_num(rise)) > 0
    return np.where(upward, after, before), np.where(upward, before, after)
