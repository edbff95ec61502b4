"""The attitude of a contact from its trace draped on the ground surface:
a least-squares plane through many points (the three-point problem,
generalised).

The plane through the points' centroid that minimises the sum of squared
perpendicular distances has as normal the eigenvector of the smallest
eigenvalue of the points' covariance (orthogonal regression). With the
eigenvalues λ1 ≥ λ2 ≥ λ3 of that covariance:

* the trace is *too straight* to fix a plane when √(λ2/λ1) < STRAIGHTNESS —
  it bends out of its main direction by less than 2 % of its spread along
  it (in 3-D: a straight map trace on evenly sloping or flat ground, which
  any plane through that line fits) — or when that bend is not clearly
  larger than the points' scatter about the fitted plane,
  √λ2 < SCATTER_RATIO · √λ3 (then noise, not the trace, sets the plane);
* the trace is *too flat* when its points' vertical spread (standard
  deviation of elevation) is below MIN_RELIEF of their horizontal spread —
  on ground that flat the fit measures the DEM, not the contact.

Either makes the estimate ill-conditioned: it is still given, flagged.
"""

import numpy as np
import shapely

STRAIGHTNESS = 0.02
SCATTER_RATIO = 3.0
MIN_RELIEF = 0.005


def plane_fits(xyz, group):
    """Best-fit planes for groups of points, all groups at once.

    ``xyz`` (n, 3) points, ``group`` (n,) integer group of each point
    (0 … k-1). Returns dip direction, dip, rms distance to the plane and a
    boolean ``ill_conditioned`` per group; groups of fewer than 3 points
    get NaN and True.

    Three points of a plane dipping 30° toward 090, the classic three-point
    problem:

    >>> t = np.tan(np.radians(30))
    >>> pts = np.array([[0, 0, 100], [100, 0, 100 - 100 * t], [0, 100, 100.0]])
    >>> dd, dip, rms, bad = plane_fits(pts, np.zeros(3, int))
    >>> round(float(dd[0]), 6), round(float(dip[0]), 6), bool(bad[0])
    (90.0, 30.0, False)

    No points (every trace off the DEM), no groups:

    >>> [a.shape for a in plane_fits(np.empty((0, 3)), np.empty(0, int))]
    [(0,), (0,), (0,), (0,)]
    """
    xyz = np.asarray(xyz, dtype=float)
    group = np.asarray(group, dtype=int)
    k = int(group.max()) + 1 if len(group) else 0
    count = np.bincount(group, minlength=k).astype(float)
    safe = np.maximum(count, 1)
    # bincount of nothing is an integer array, weights or not
    sums = np.stack([np.bincount(group, xyz[:, i], minlength=k) for i in range(3)], axis=1)
    mean = sums.astype(float) / safe[:, None]
    centred = xyz - mean[group]
    covariance = np.zeros((k, 3, 3))
    for i in range(3):
        for j in range(i, 3):
            covariance[:, i, j] = covariance[:, j, i] = (
                np.bincount(group, centred[:, i] * centred[:, j], minlength=k) / safe
            )
    eigenvalues, eigenvectors = np.linalg.eigh(covariance)  # ascending
    normal = eigenvectors[:, :, 0]
    normal = np.where(normal[:, 2:3] < 0, -normal, normal)  # upward
    dip = np.degrees(np.arccos(np.clip(normal[:, 2], -1.0, 1.0)))
    dip_direction = np.degrees(np.arctan2(normal[:, 0], normal[:, 1])) % 360.0
    rms = np.sqrt(np.maximum(eigenvalues[:, 0], 0.0))
    largest = np.maximum(eigenvalues[:, 2], 1e-300)
    bend = np.sqrt(np.maximum(eigenvalues[:, 1], 0.0))
    straight = (bend / np.sqrt(largest) < STRAIGHTNESS) | (
        bend < SCATTER_RATIO * np.sqrt(np.maximum(eigenvalues[:, 0], 0.0))
    )
    horizontal_spread = np.sqrt(covariance[:, 0, 0] + covariance[:, 1, 1])
    flat = np.sqrt(covariance[:, 2, 2]) < MIN_RELIEF * horizontal_spread
    too_few = count < 3
    nan = np.where(too_few, np.nan, 1.0)
    return (dip_direction * nan, dip * nan, rms * nan, straight | flat | too_few)


def trace_windows(contacts, contact_index, crossing_xy, radius, spacing):
    """Points along the piece of each crossing's contact trace that lies
    within ``radius`` of the crossing and is connected to it, every
    ``spacing`` at most. Returns (xy, crossing index of each point).

    >>> bent = [shapely.LineString([(0, 0), (10, 0), (10, 10)])]
    >>> xy, which = trace_windows(bent, np.array([0]), np.array([[9.0, 0.0]]), 3.0, 1.0)
    >>> xy[[0, -1]].round(2).tolist(), int(which.max())   # circle drawn as a polygon
    ([[6.0, 0.0], [10.0, 2.83]], 0)
    """
    contacts = np.asarray(contacts, dtype=object)
    points = shapely.points(crossing_xy)
    circles = shapely.buffer(points, radius, quad_segs=32)
    clipped = shapely.intersection(contacts[contact_index], circles)
    parts, owner = shapely.get_parts(clipped, return_index=True)
    if len(parts) == 0:
        return np.empty((0, 2)), np.empty(0, dtype=int)
    gap = shapely.distance(parts, points[owner])
    order = np.lexsort((gap, owner))
    nearest = order[np.r_[True, owner[order][1:] != owner[order][:-1]]]
    pieces = shapely.segmentize(parts[nearest], spacing)
    xy, which = shapely.get_coordinates(pieces, return_index=True)
    return xy, owner[nearest][which]
