"""The arc (Busk) construction of a section at true scale.

Neighbouring dip stations P₁, P₂ are joined by circular arcs tangent to
both dips, centred at C, where the normals to the beds through the two
stations meet; the form lines between them are concentric about C
(H. G. Busk, *Earth Flexures*, 1929; construction steps in R. H. Groshong,
*3-D Structural Geology*, 2006, fig. 6.29). Each station's normal is shared
by the arcs on either side of it, so a form line passes from one centre's
arc to the next on that normal, tangentially, at the same distance along
it: the stratigraphic level s is the distance along the normals, and beds
keep their thickness.

Before the first station and after the last the beds run straight at the
end stations' dips. Where two neighbouring dips are equal (parallel
normals) the beds between them are straight. Where the two normals meet
between the stations' sides (one station above the meeting point, the
other below it) no single arc is tangent to both: the form lines are
joined straight from normal to normal there. Arcs shrink toward their
centre: on each station's normal a form line ends where that normal
crosses another station's normal (for neighbours, their arc's centre), so
that arcs never overlap (the space problem of concentric folds at depth).
"""

from dataclasses import dataclass

import numpy as np
import shapely

from .bedding import bed_directions, signed_line_dip, upward_normals

CHORD_TOLERANCE = 0.25  # metres between a drawn arc's chords and the true arc
NEAR = 1e-9


@dataclass
class ArcSection:
    """Stations, their levels and, for each pair of neighbours, the centre
    of the arcs between them (NaN when the pair is joined straight)."""

    stations: np.ndarray  # (n, 2)
    dips: np.ndarray  # (n,) signed apparent dips
    normals: np.ndarray  # (n, 2) upward normals
    station_levels: np.ndarray  # (n,) s at each station
    centres: np.ndarray  # (n - 1, 2)
    lam: np.ndarray  # (n - 1,) C = P_k + lam · u_k
    mu: np.ndarray  # (n - 1,) C = P_k+1 + mu · u_k+1
    reach: float

    @property
    def arcs(self):
        return ~np.isnan(self.lam)

    def levels_at(self, points):
        """Stratigraphic level s of each (x, z) point, from the arc (or the
        straight beds) of the pair of normals it lies between."""
        points = np.atleast_2d(np.asarray(points, dtype=float))
        offset = points[:, None, :] - self.stations[None, :, :]
        cross = (
            self.normals[None, :, 0] * offset[..., 1] - self.normals[None, :, 1] * offset[..., 0]
        )
        sector = np.sum(-cross > 0, axis=1)  # normals the point lies end-ward of
        first = np.clip(sector - 1, 0, len(self.stations) - 1)
        straight = self.station_levels[first] + np.einsum(
            "ij,ij->i", self.normals[first], points - self.stations[first]
        )
        if len(self.lam) == 0:
            return straight
        pair = np.clip(sector - 1, 0, len(self.lam) - 1)
        inside = (sector >= 1) & (sector <= len(self.lam)) & self.arcs[pair]
        radius = np.linalg.norm(points - self.centres[pair], axis=1)
        lam = self.lam[pair]
        on_arc = self.station_levels[pair] + lam - np.sign(lam) * radius
        return np.where(inside, on_arc, straight)

    def form_lines(self, levels):
        """One (Multi)LineString per level, at true scale, running past both
        ends of the section (clip it to the ground afterwards)."""
        levels = np.asarray(levels, dtype=float)
        on_normals = (
            self.stations[None, :, :]
            + (levels[:, None] - self.station_levels[None, :])[..., None] * self.normals[None, :, :]
        )  # (K, n, 2): where each form line crosses each station's normal
        direction = bed_directions(self.dips)
        reachable = self._short_of_the_centres(levels)
        pieces = [on_normals[:, :1] - self.reach * direction[0]]
        valid = [reachable[:, :1]]
        for k in range(len(self.lam)):
            points, ok = self._between(k, levels, on_normals[:, k], on_normals[:, k + 1])
            ok &= reachable[:, k] & reachable[:, k + 1]
            pieces.append(points)
            valid.append(np.repeat(ok[:, None], points.shape[1], axis=1))
        pieces.append(on_normals[:, -1:] + self.reach * direction[-1])
        valid.append(reachable[:, -1:])
        points, valid = np.concatenate(pieces, axis=1), np.concatenate(valid, axis=1)
        return np.array([_runs(points[k], valid[k]) for k in range(len(levels))], dtype=object)

    def _short_of_the_centres(self, levels):
        """(K, n): whether each form line meets each station's normal short
        of the nearest point, on either side of the station, where that
        normal crosses the normal of another station (for neighbours: the
        centre of their arc). Beyond it the wedges of the arcs overlap, and
        form lines drawn there would cross each other."""
        along = levels[:, None] - self.station_levels[None, :]  # distance along each normal
        p, u = self.stations, self.normals
        gap = p[None, :, :] - p[:, None, :]  # P_k − P_j
        denominator = u[:, None, 0] * u[None, :, 1] - u[:, None, 1] * u[None, :, 0]
        with np.errstate(invalid="ignore", divide="ignore"):
            # P_j + t u_j = P_k + s u_k, solved for t (along normal j)
            t = (gap[..., 0] * u[None, :, 1] - gap[..., 1] * u[None, :, 0]) / denominator
        t[~np.isfinite(t) | (np.abs(denominator) <= NEAR)] = np.nan
        below = np.nanmax(np.where(t < 0, t, np.nan), axis=1, initial=-np.inf)
        above = np.nanmin(np.where(t > 0, t, np.nan), axis=1, initial=np.inf)
        return (along > below[None, :]) & (along < above[None, :])

    def axes(self):
        """(LineStrings, left dips, right dips, axis dips): for each arc the
        radius from its centre along the bisector of its two normals, toward
        the stations, at true scale, unclipped."""
        k = np.flatnonzero(self.arcs)
        toward = -np.sign(self.lam[k])[:, None]
        bisector = toward * (self.normals[k] + self.normals[k + 1])
        bisector /= np.linalg.norm(bisector, axis=1)[:, None]
        ends = self.centres[k] + self.reach * bisector
        lines = shapely.linestrings(np.stack((self.centres[k], ends), axis=1))
        return lines, self.dips[k], self.dips[k + 1], signed_line_dip(bisector)

    def _between(self, k, levels, start, end):
        """(K, m, 2) vertices of the form lines between normals k and k + 1
        and whether each exists there."""
        if not self.arcs[k]:
            t = np.linspace(0.0, 1.0, 2)
            return start[:, None, :] + t[None, :, None] * (end - start)[:, None, :], np.ones(
                len(levels), dtype=bool
            )
        lam = self.lam[k]
        outward = -np.sign(lam)
        radius = (levels - self.station_levels[k] - lam) * outward
        a = np.arctan2(outward * self.normals[k, 1], outward * self.normals[k, 0])
        b = np.arctan2(outward * self.normals[k + 1, 1], outward * self.normals[k + 1, 0])
        turn = (b - a + np.pi) % (2 * np.pi) - np.pi
        largest = max(float(np.max(radius, initial=0.0)), CHORD_TOLERANCE)
        step = 2 * np.arccos(max(1.0 - CHORD_TOLERANCE / largest, -1.0))
        angle = a + turn * np.linspace(0.0, 1.0, max(2, int(np.ceil(abs(turn) / step)) + 1))
        ring = np.column_stack((np.cos(angle), np.sin(angle)))
        points = self.centres[k] + np.maximum(radius, 0.0)[:, None, None] * ring[None]
        return points, radius > 0


def _runs(points, valid):
    """A MultiLineString of the runs of consecutive valid vertices."""
    edges = np.diff(np.r_[0, valid.astype(np.int8), 0])
    starts, stops = np.flatnonzero(edges == 1), np.flatnonzero(edges == -1)
    runs = [shapely.linestrings(points[a:b]) for a, b in zip(starts, stops) if b - a >= 2]
    return shapely.multilinestrings(runs) if runs else shapely.MultiLineString()


def arc_section(station_x, station_z, signed_dips, reach):
    """The arc construction through stations (x, z) with signed apparent
    dips; ``reach`` is a length longer than any form line in the section.

    Two stations on a circle of radius 1000 about (0, −1000): their normals
    meet at its centre.

    >>> fold = arc_section(np.array([-600.0, 600]), np.array([-200.0, -200]),
    ...                    np.array([-36.8699, 36.8699]), 1e5)
    >>> fold.centres.round(2).tolist()
    [[0.0, -1000.0]]
    """
    x = np.asarray(station_x, dtype=float)
    z = np.asarray(station_z, dtype=float)
    dips = np.asarray(signed_dips, dtype=float)
    usable = ~(np.isnan(x) | np.isnan(z) | np.isnan(dips))
    if not usable.any():
        return None
    order = np.argsort(x[usable], kind="stable")
    stations = np.column_stack((x[usable], z[usable]))[order]
    dips = dips[usable][order]
    normals = upward_normals(dips)
    u, w = normals[:-1], normals[1:]
    gap = stations[1:] - stations[:-1]
    denominator = u[:, 0] * w[:, 1] - u[:, 1] * w[:, 0]
    with np.errstate(divide="ignore", invalid="ignore"):
        lam = (gap[:, 0] * w[:, 1] - gap[:, 1] * w[:, 0]) / denominator
        mu = (gap[:, 0] * u[:, 1] - gap[:, 1] * u[:, 0]) / denominator
    arcs = (np.abs(denominator) > NEAR) & (np.sign(lam) == np.sign(mu)) & (np.abs(lam) > NEAR)
    arcs &= np.abs(mu) > NEAR
    lam = np.where(arcs, lam, np.nan)
    mu = np.where(arcs, mu, np.nan)
    centres = stations[:-1] + lam[:, None] * u
    mean = u + w
    mean /= np.maximum(np.linalg.norm(mean, axis=1), NEAR)[:, None]
    straight_step = np.einsum("ij,ij->i", mean, gap)
    steps = np.where(arcs, lam - mu, straight_step)
    station_levels = np.r_[0.0, np.cumsum(steps)]
    return ArcSection(stations, dips, normals, station_levels, centres, lam, mu, float(reach))
