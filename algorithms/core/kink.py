"""The kink (dip-domain) construction of a section at true scale.

Each apparent dip defines a domain of constant dip (neighbouring equal dips
share one). The boundary between neighbouring domains — the axial surface —
starts at the ground halfway between their outermost stations and runs down
along the bisector of the two beds, the direction −(u₁ + u₂) of the sum of
their upward normals: there the stratigraphic level s = u · p + c is the
same from both sides, so beds keep their thickness across it (Suppe,
*Principles of Structural Geology*, 1985; Groshong, *3-D Structural
Geology*, 2006, ch. 6).

Where two neighbouring axial surfaces meet below the ground the domain
between them ends; from the meeting point a new axial surface runs down
between the two domains that now touch, bisecting their beds. The
construction sweeps downward from the highest such meeting to the lowest
until the floor, and the same way upward into the air (mirrored), so that
a bed eroded from a crest crosses the axial surfaces it met up there and
those never cross one another.

A form line is a level set s = constant. Within a domain it is straight;
it bends where it crosses an axial surface. Since ∂s/∂z = cos α > 0 in
every domain, a form line meets every vertical once, so its vertices are
its crossings with the axial-surface segments sorted by chainage.
"""

from dataclasses import dataclass

import numpy as np
import shapely

from .bedding import bed_directions, signed_line_dip, upward_normals

EQUAL_DIPS = 1e-9  # degrees: neighbouring dips closer than this share a domain
SAME_POINT = 1e-7  # metres: crossings closer than this are one


@dataclass
class KinkSection:
    """The dip domains of one section and the axial-surface segments
    between them. Segment i runs from ``upper[i]`` down to ``lower[i]`` with
    domain ``left[i]`` on its start side and ``right[i]`` on its end side."""

    dips: np.ndarray  # (m,) signed apparent dip of each domain
    normals: np.ndarray  # (m, 2) upward normals
    offsets: np.ndarray  # (m,) c in s = u · p + c
    upper: np.ndarray  # (r, 2)
    lower: np.ndarray  # (r, 2)
    left: np.ndarray  # (r,) int
    right: np.ndarray  # (r,) int
    reach: float  # a length longer than any form line in the section

    def domain_at(self, points):
        """Domain index of each (x, z) point; −1 where none is known (below
        the floor). The nearest axial segment to the left at the point's
        height gives its right-hand domain; failing that, the nearest to
        the right gives its left-hand one."""
        points = np.atleast_2d(np.asarray(points, dtype=float))
        if len(self.upper) == 0:
            return np.zeros(len(points), dtype=int)
        x, z = points[:, :1], points[:, 1:2]
        top, bottom = self.upper[None, :, :], self.lower[None, :, :]
        spans = (z <= top[..., 1]) & (z >= bottom[..., 1])
        height = top[..., 1] - bottom[..., 1]
        t = np.divide(top[..., 1] - z, height, out=np.zeros_like(spans, float), where=height > 0)
        at = top[..., 0] + t * (bottom[..., 0] - top[..., 0])
        left_of = np.where(spans & (at <= x), at, -np.inf)
        right_of = np.where(spans & (at > x), at, np.inf)
        nearest_left = np.argmax(left_of, axis=1)
        nearest_right = np.argmin(right_of, axis=1)
        has_left = np.isfinite(left_of[np.arange(len(points)), nearest_left])
        has_right = np.isfinite(right_of[np.arange(len(points)), nearest_right])
        domain = np.where(has_left, self.right[nearest_left], self.left[nearest_right])
        return np.where(has_left | has_right, domain, -1)

    def levels_at(self, points):
        """Stratigraphic level s of each (x, z) point (NaN where unknown)."""
        points = np.atleast_2d(np.asarray(points, dtype=float))
        domain = self.domain_at(points)
        safe = np.maximum(domain, 0)
        s = np.einsum("ij,ij->i", self.normals[safe], points) + self.offsets[safe]
        return np.where(domain >= 0, s, np.nan)

    def form_lines(self, levels):
        """One (Multi)LineString per level, at true scale, running past both
        ends of the section (clip it to the ground afterwards)."""
        levels = np.asarray(levels, dtype=float)
        direction = bed_directions(self.dips)
        if len(self.upper) == 0:
            return np.array(
                [_straight(self, 0, level, direction) for level in levels], dtype=object
            )
        s_upper = self._level(self.left, self.upper)
        s_lower = self._level(self.left, self.lower)
        span = s_lower - s_upper
        t = (levels[:, None] - s_upper[None, :]) / np.where(span == 0, np.nan, span)[None, :]
        crossing = (t >= 0) & (t <= 1)
        points = self.upper[None] + t[..., None] * (self.lower - self.upper)[None]
        lines = []
        for k, level in enumerate(levels):
            hits = np.flatnonzero(crossing[k])
            if len(hits) == 0:
                lines.append(self._line_within_one_domain(level, direction))
                continue
            hits = hits[np.argsort(points[k, hits, 0], kind="stable")]
            lines.append(self._line_through(points[k, hits], hits, direction))
        return np.array(lines, dtype=object)

    def axes(self):
        """(LineStrings, left dips, right dips, axis dips) of the
        axial-surface segments, at true scale, unclipped."""
        lines = shapely.linestrings(np.stack((self.upper, self.lower), axis=1))
        axis_dip = signed_line_dip(self.lower - self.upper)
        return lines, self.dips[self.left], self.dips[self.right], axis_dip

    def _level(self, domain, points):
        return np.einsum("ij,ij->i", self.normals[domain], points) + self.offsets[domain]

    def _line_through(self, points, segments, direction):
        """Crossings joined in chainage order; where the domain right of one
        crossing is not the one left of the next, the form line went below
        the floor between them: each side is carried on along its own
        domain (and cut at the floor later)."""
        points, before, after = _one_crossing_per_point(
            points, self.left[segments], self.right[segments]
        )
        pieces, current = [], [points[0] - self.reach * direction[before[0]]]
        for i in range(len(points)):
            current.append(points[i])
            if i + 1 < len(points) and after[i] != before[i + 1]:
                current.append(points[i] + self.reach * direction[after[i]])
                pieces.append(current)
                current = [points[i + 1] - self.reach * direction[before[i + 1]]]
        current.append(points[-1] + self.reach * direction[after[-1]])
        pieces.append(current)
        return shapely.multilinestrings([shapely.linestrings(p) for p in pieces])

    def _line_within_one_domain(self, level, direction):
        """A level that crosses no axial surface lies in one domain: the
        one whose own line of that level passes through a point of it."""
        middle = 0.5 * (self.upper[:, 0].min() + self.upper[:, 0].max())
        z = (level - self.offsets - self.normals[:, 0] * middle) / self.normals[:, 1]
        candidates = np.column_stack((np.full(len(z), middle), z))
        own = np.flatnonzero(self.domain_at(candidates) == np.arange(len(z)))
        if len(own) == 0:
            return shapely.MultiLineString()
        return _straight(self, int(own[0]), level, direction)


def _one_crossing_per_point(points, before, after):
    """Crossings at one point (a level through a surface's start, where its
    part in the air meets its part below, or through a meeting of axial
    surfaces) merged into one, from the domain none of them leads into to
    the one none of them leads out of."""
    same = np.r_[False, np.all(np.abs(np.diff(points, axis=0)) <= SAME_POINT, axis=1)]
    group = np.cumsum(~same) - 1
    if not same.any():
        return points, before, after
    keep = np.flatnonzero(~same)
    merged_before, merged_after = before[keep].copy(), after[keep].copy()
    for g in np.unique(group[same]):
        members = np.flatnonzero(group == g)
        entering = [d for d in before[members] if d not in set(after[members])]
        leaving = [d for d in after[members] if d not in set(before[members])]
        merged_before[g] = entering[0] if entering else before[members[0]]
        merged_after[g] = leaving[0] if leaving else after[members[-1]]
    return points[keep], merged_before, merged_after


def _straight(section, domain, level, direction):
    normal = section.normals[domain]
    point = normal * (level - section.offsets[domain])
    return shapely.multilinestrings(
        [
            shapely.linestrings(
                [
                    point - section.reach * direction[domain],
                    point + section.reach * direction[domain],
                ]
            )
        ]
    )


def kink_section(station_x, signed_dips, ground_x, ground_z, floor):
    """The dip-domain construction from stations at chainages ``station_x``
    with signed apparent dips, down to elevation ``floor``; the ground is
    given by sorted samples ``ground_x``, ``ground_z``.

    A symmetric anticline, limbs dipping 30° away from a hinge at 500 on
    flat ground at 100: one vertical axial surface through the hinge.

    >>> fold = kink_section(np.array([400.0, 600]), np.array([-30.0, 30]),
    ...                     np.array([0.0, 1000]), np.array([100.0, 100]), -400.0)
    >>> fold.upper.round(6).tolist()  # below the ground, then into the air
    [[500.0, 100.0], [500.0, 6100.0]]
    >>> fold.lower.round(6).tolist()
    [[500.0, -400.0], [500.0, 100.0]]

    Nothing is guessed without dips:

    >>> kink_section(np.array([]), np.array([]), np.array([0.0, 1]), np.array([0.0, 0]), -1.0)
    """
    station_x = np.asarray(station_x, dtype=float)
    signed_dips = np.asarray(signed_dips, dtype=float)
    usable = ~(np.isnan(station_x) | np.isnan(signed_dips))
    station_x, signed_dips = station_x[usable], signed_dips[usable]
    if len(station_x) == 0 or len(ground_x) == 0:
        return None
    order = np.argsort(station_x, kind="stable")
    station_x, signed_dips = station_x[order], signed_dips[order]
    first = np.flatnonzero(np.r_[True, np.abs(np.diff(signed_dips)) > EQUAL_DIPS])
    dips = signed_dips[first]
    normals = upward_normals(dips)
    boundary_x = 0.5 * (station_x[first[1:] - 1] + station_x[first[1:]])
    starts = np.column_stack((boundary_x, np.interp(boundary_x, ground_x, ground_z)))
    jumps = np.einsum("ij,ij->i", normals[:-1] - normals[1:], starts)
    offsets = np.r_[0.0, np.cumsum(jumps)]
    width = max(float(ground_x[-1] - ground_x[0]), float(station_x[-1] - station_x[0]), 1.0)
    reach = 4.0 * (width + float(np.max(ground_z)) - floor)
    down = _sweep(starts, normals, ground_x, ground_z, floor)
    # The same construction upward into the air, mirrored (z → −z turns the
    # dips over), so that a bed eroded from a crest still meets the axial
    # surface it crossed there, and the axial surfaces up there do not cross
    # (the air is cut off afterwards).
    top = float(np.max(ground_z)) + reach
    mirror = np.array([1.0, -1.0])
    # (mirrored, a bed's upward normal is −(u_x, −u_z))
    up = _sweep(starts * mirror, -normals * mirror, ground_x, -ground_z, -top)
    upper = np.vstack((down[0], up[1] * mirror))
    lower = np.vstack((down[1], up[0] * mirror))
    left, right = np.r_[down[2], up[2]], np.r_[down[3], up[3]]
    return KinkSection(dips, normals, offsets, upper, lower, left, right, reach)


def _sweep(starts, normals, ground_x, ground_z, floor):
    """Axial-surface segments from their starts at the ground down to
    ``floor``, ending each pair of neighbours where they meet below both
    starts and below the ground, and starting the new one there."""
    direction = -(normals[:-1] + normals[1:])
    direction /= np.linalg.norm(direction, axis=1)[:, None]
    count = len(starts)
    # every segment ever made, by id; the active ones in order along the section
    upper = list(starts)
    lower = [None] * count
    sides = [(k, k + 1) for k in range(count)]
    ids = np.arange(count)
    origin, heading, limit = starts.copy(), direction, starts[:, 1].copy()
    domains = list(range(len(normals)))
    while len(ids) >= 2:
        meeting = _meetings(origin, heading, limit, ground_x, ground_z, floor)
        if meeting is None:
            break
        j, point = meeting
        lower[ids[j]] = lower[ids[j + 1]] = point
        new_direction = -(normals[domains[j]] + normals[domains[j + 2]])
        new_direction /= np.linalg.norm(new_direction)
        upper.append(point)
        lower.append(None)
        sides.append((domains[j], domains[j + 2]))
        del domains[j + 1]
        # the pair j, j + 1 becomes the new surface
        keep = np.arange(len(ids)) != j + 1
        ids, origin, heading, limit = ids[keep], origin[keep], heading[keep], limit[keep]
        ids[j], origin[j], heading[j], limit[j] = len(upper) - 1, point, new_direction, point[1]
    ends = origin + ((floor - origin[:, 1]) / heading[:, 1])[:, None] * heading
    for k, end in zip(ids.tolist(), ends):
        lower[k] = end
    left, right = np.array(sides, dtype=int).reshape(-1, 2).T
    return (
        np.array(upper, dtype=float).reshape(-1, 2),
        np.array(lower, dtype=float).reshape(-1, 2),
        left,
        right,
    )


def _meetings(origin, heading, limit, ground_x, ground_z, floor):
    """(index j, point) of the highest meeting of neighbours j and j + 1
    that converge downward, below the ground (or below the later one's
    start) and above the floor; None when there is none."""
    a, b = origin[:-1], origin[1:]
    da, db = heading[:-1], heading[1:]
    denominator = da[:, 0] * db[:, 1] - da[:, 1] * db[:, 0]
    gap = b - a
    with np.errstate(divide="ignore", invalid="ignore"):
        t = (gap[:, 0] * db[:, 1] - gap[:, 1] * db[:, 0]) / denominator
        point = a + t[:, None] * da
        # x changes by d_x / d_z per unit of height; the right-hand surface
        # leaning further right going up means they close going down.
        converging = db[:, 0] / db[:, 1] > da[:, 0] / da[:, 1]
    ceiling = np.minimum(
        np.minimum(limit[:-1], limit[1:]), np.interp(point[:, 0], ground_x, ground_z)
    )
    valid = (
        converging
        & np.isfinite(point).all(axis=1)
        & (point[:, 1] < ceiling)
        & (point[:, 1] > floor)
    )
    if not valid.any():
        return None
    j = int(np.argmax(np.where(valid, point[:, 1], -np.inf)))
    return j, point[j]
