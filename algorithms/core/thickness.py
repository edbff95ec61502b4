"""True stratigraphic thickness of units met along a section, and the check
that a unit keeps its thickness between its occurrences.

For a traverse in a vertical section from one contact to the next — Δx
along the line (horizontal), Δz up — across a bed with true dip δ, dip
direction θ_d, on a line of azimuth θ_l, the true thickness is the
traverse's component along the bed's unit normal
N = (sin δ cos(θ_d − θ_l), sin δ sin(θ_d − θ_l), cos δ) (along the line,
across it, up): t = |N_along·Δx + N_up·Δz|. This is the formula with the
ground slope σ and the angle β between strike and line,
t = w·|sin δ cos σ sin β ± cos δ sin σ| (w = slope distance; R. C. Rowland,
E. M. Duebendorfer, I. M. Schiefelbein, *Structural Analysis and
Synthesis*, 3rd ed., 2007; D. M. Ragan, *Structural Geology*, 2009, ch. 3),
with the sign taken care of by the vectors.
"""

import numpy as np


def bed_normals(dip, dip_direction, line_azimuth):
    """(n, 3) unit normals (along the line, across it, up) of beds.

    >>> bed_normals(np.array([30.0]), np.array([90.0]), np.array([90.0])).round(4).tolist()
    [[0.5, 0.0, 0.866]]
    """
    delta = np.radians(np.asarray(dip, dtype=float))
    theta = np.radians(
        np.asarray(dip_direction, dtype=float) - np.asarray(line_azimuth, dtype=float)
    )
    return np.column_stack(
        (np.sin(delta) * np.cos(theta), np.sin(delta) * np.sin(theta), np.cos(delta))
    )


def true_thickness(dx, dz, normal):
    """|N · (Δx, 0, Δz)|: true thickness across a traverse (Δx along the
    line, Δz up) of beds with unit normals ``normal`` (n, 3).

    A bed dipping 30° toward the line's end, 100 m of flat ground:
    100 sin 30° = 50.

    >>> true_thickness(np.array([100.0]), np.array([0.0]),
    ...                bed_normals(np.array([30.0]), np.array([90.0]), np.array([90.0]))).round(6)
    array([50.])
    """
    normal = np.atleast_2d(normal)
    return np.abs(
        normal[:, 0] * np.asarray(dx, dtype=float) + normal[:, 2] * np.asarray(dz, dtype=float)
    )


def thickness_sd(dx, normal, apparent_dip_sd):
    """First-order standard deviation of the true thickness from the
    apparent dip's standard deviation σ_α (degrees): with N_along =
    N_up·tan α, ∂t/∂α = N_up·Δx / cos² α (the obliquity N_up = cos δ held).

    >>> thickness_sd(np.array([100.0]), np.array([[0.0, 0.0, 1.0]]), np.array([1.0])).round(4)
    array([1.7453])
    """
    normal = np.atleast_2d(normal)
    alpha = np.arctan2(normal[:, 0], normal[:, 2])
    slope = normal[:, 2] * np.abs(np.asarray(dx, dtype=float)) / np.cos(alpha) ** 2
    return slope * np.radians(np.asarray(apparent_dip_sd, dtype=float))


def mean_normals(normal, apparent_dip_sd, group, count):
    """Per group (0 … count − 1): the mean unit normal of its beds and the
    standard deviation of its mean apparent dip, √(Σσ²)/n; NaN for groups
    with no bed.

    >>> n, sd = mean_normals(np.array([[0.0, 0, 1], [0, 0, 1]]), np.array([3.0, 4]),
    ...                      np.array([0, 0]), 2)
    >>> n.tolist(), sd.tolist()
    ([[0.0, 0.0, 1.0], [nan, nan, nan]], [2.5, nan])
    """
    group = np.asarray(group, dtype=int)
    total = np.zeros((count, 3))
    np.add.at(total, group, normal)
    length = np.linalg.norm(total, axis=1)
    with np.errstate(invalid="ignore", divide="ignore"):
        mean = total / length[:, None]
        members = np.bincount(group, minlength=count).astype(float)
        variance = np.bincount(group, weights=np.asarray(apparent_dip_sd) ** 2, minlength=count)
        sd = np.sqrt(variance) / members
    empty = members == 0
    mean[empty] = np.nan
    sd[empty] = np.nan
    return mean, sd


def thickness_changes(unit, thickness, tolerance_percent):
    """For each occurrence: the % difference of its thickness from the mean
    of the same unit's other occurrences (NaN when there is none or either
    is unknown), and whether it exceeds the tolerance.

    >>> change, flag = thickness_changes(np.array(["A", "A", "B"]), np.array([100.0, 130, 50]), 15)
    >>> change.round(1).tolist(), flag.tolist()
    ([-23.1, 30.0, nan], [True, True, False])
    """
    unit = np.asarray(unit, dtype=object)
    thickness = np.asarray(thickness, dtype=float)
    known = ~np.isnan(thickness)
    _, code = np.unique(unit, return_inverse=True)
    code = code.ravel()
    total = np.bincount(code, weights=np.where(known, thickness, 0.0))
    count = np.bincount(code, weights=known.astype(float))
    others = count[code] - known
    with np.errstate(invalid="ignore", divide="ignore"):
        mean_of_others = (total[code] - np.where(known, thickness, 0.0)) / others
        change = np.where(known & (others > 0), 100.0 * (thickness / mean_of_others - 1.0), np.nan)
    return change, np.abs(np.nan_to_num(change)) > tolerance_percent


def unit_thickness(contacts, units_before, units_after, stations, normals, dip_sd, faults):
    """The thickness table of one section.

    ``contacts`` (n, 2) ground points (chainage, elevation) of the
    contacts, sorted by chainage, with the units either side (looking along
    the line); ``stations`` the chainages of the attitudes, their unit
    normals (see ``bed_normals``) and apparent-dip σ; ``faults`` the
    chainages of fault crossings.

    A unit is met between two neighbouring contacts when the unit after the
    first is the unit before the second. Its thickness comes from the
    attitudes between the two contacts (their mean normal); with none there
    the attitude nearest the middle of the outcrop is used and the row is
    flagged ``no_dip``. Flag ``closure``: the units outside both contacts
    are the same — the outcrop crosses a fold hinge (or the unit is cut
    through by erosion), so its width is no thickness; ``faulted``: a fault
    lies between the contacts. Neither gets a thickness.

    Returns a dict of columns: ``unit``, ``from_ch``, ``to_ch``,
    ``thick_m``, ``thick_sd``, ``flags`` (lists).

    >>> table = unit_thickness(np.array([[0.0, 10], [100, 10]]), np.array(["A", "B"]),
    ...                        np.array(["B", "C"]), np.array([50.0]),
    ...                        bed_normals(np.array([30.0]), np.array([90.0]), np.array([90.0])),
    ...                        np.array([2.0]), np.array([]))
    >>> table["unit"].tolist(), table["thick_m"].round(3).tolist(), table["flags"]
    (['B'], [50.0], [[]])
    """
    units_before = np.asarray(units_before, dtype=object)
    units_after = np.asarray(units_after, dtype=object)
    first = np.flatnonzero((units_after[:-1] == units_before[1:]) & (units_after[:-1] != ""))
    start, stop = contacts[first], contacts[first + 1]
    count = len(first)
    stations = np.asarray(stations, dtype=float)
    if len(stations):
        # interval index of each station among the contacts (1 = between contact 0 and 1)
        interval = np.searchsorted(contacts[:, 0], stations, side="right")
        slot = np.full(len(contacts) + 1, -1)
        slot[first + 1] = np.arange(count)
        group = slot[interval]
        inside = group >= 0
        mean, sd = mean_normals(normals[inside], np.asarray(dip_sd)[inside], group[inside], count)
        no_dip = np.isnan(mean[:, 0])
        middle = 0.5 * (start[:, 0] + stop[:, 0])
        nearest = np.argmin(np.abs(stations[None, :] - middle[:, None]), axis=1)
        mean[no_dip] = normals[nearest[no_dip]]
        sd[no_dip] = np.asarray(dip_sd, dtype=float)[nearest[no_dip]]
    else:
        mean, sd, no_dip = np.full((count, 3), np.nan), np.full(count, np.nan), np.ones(count, bool)
    closure = units_before[first] == units_after[first + 1]
    faults = np.sort(np.asarray(faults, dtype=float))
    faulted = np.searchsorted(faults, stop[:, 0]) > np.searchsorted(
        faults, start[:, 0], side="right"
    )
    dx, dz = stop[:, 0] - start[:, 0], stop[:, 1] - start[:, 1]
    measurable = ~(closure | faulted)
    thick = np.where(measurable, true_thickness(dx, dz, mean), np.nan)
    thick_sd = np.where(measurable, thickness_sd(dx, mean, sd), np.nan)
    flags = [
        [name for name, on in (("closure", c), ("faulted", f), ("no_dip", n)) if on]
        for c, f, n in zip(closure.tolist(), faulted.tolist(), no_dip.tolist())
    ]
    return {
        "unit": units_after[first],
        "from_ch": start[:, 0],
        "to_ch": stop[:, 0],
        "thick_m": thick,
        "thick_sd": thick_sd,
        "flags": flags,
    }
