"""Carrying attitudes onto section lines: everything a section needs of each
attitude, for many points and lines at once."""

from dataclasses import dataclass

import numpy as np

from .apparent_dip import apparent_dip_sd, section_attitude
from .orientation import strike_from_dip_direction
from .projection import (
    along_directions,
    line_azimuths,
    nearest_points,
    plunge_elevation,
    signed_offsets,
)

PERPENDICULAR, ALONG_STRIKE, ALONG_PLUNGE = range(3)
TOO_FAR = "beyond max distance"
PAST_END = "beyond the end of the line"
PARALLEL = {
    ALONG_STRIKE: "strike nearly parallel to the line",
    ALONG_PLUNGE: "plunge trend nearly parallel to the line",
}


@dataclass
class CarryOptions:
    method: int = PERPENDICULAR
    max_distance: float = 250.0
    plunge: float = 0.0
    exaggeration: float = 1.0
    oblique_angle: float = 20.0
    dip_sd: float = 2.0
    strike_sd: float = 5.0


def _landing(network, xy, dip_direction, dip, trend, options):
    """Where each point lands, and why the others land nowhere."""
    if options.method == PERPENDICULAR:
        landing = nearest_points(network, xy, options.max_distance)
    else:
        direction = (
            strike_from_dip_direction(dip_direction)
            if options.method == ALONG_STRIKE
            else np.asarray(trend, dtype=float)
        )
        landing = along_directions(network, xy, direction, options.max_distance)
        if options.method == ALONG_STRIKE:
            # Any horizontal line in a horizontal bed is a strike line: the
            # perpendicular one is as good as any.
            flat = np.flatnonzero(dip == 0)
            if len(flat):
                _replace(landing, flat, nearest_points(network, xy[flat], options.max_distance))
    reasons = np.select([landing.line >= 0, landing.past_end], ["", PAST_END], TOO_FAR).astype(
        object
    )
    if options.method != PERPENDICULAR:
        missed = np.flatnonzero(landing.line < 0)
        near = nearest_points(network, xy[missed], options.max_distance).line >= 0
        reasons[missed[near]] = PARALLEL[options.method]
    return landing, reasons


def _replace(landing, index, other):
    for name in ("line", "piece", "chainage", "xy", "travel", "past_end"):
        getattr(landing, name)[index] = getattr(other, name)


def carry_attitudes(
    network, xy, z, dip_direction, dip, options, trend=None, elevation_at=None, unit_at=None
):
    """Every attitude's section record, as a dict of arrays (one row per input
    point), plus ``reason`` ('' for the points that were carried).

    ``xy``, ``dip_direction`` (grid azimuths) and ``trend`` are in the
    working CRS; ``z`` may be NaN (then ``elevation_at(xy)`` is asked, when
    given); ``unit_at(xy)`` returns unit labels (None outside every unit).
    Points whose ``dip_direction`` is NaN are left out (their reason comes
    from reading them).
    """
    n = len(xy)
    readable = ~np.isnan(dip_direction) & ~np.isnan(dip) & np.all(np.isfinite(xy), axis=1)
    landing, reasons = _landing(
        network, np.where(readable[:, None], xy, np.nan), dip_direction, dip, trend, options
    )
    reasons[~readable] = ""
    carried = landing.line >= 0
    z = np.asarray(z, dtype=float).copy()
    if elevation_at is not None and np.isnan(z).any():
        missing = np.isnan(z) & carried
        z[missing] = elevation_at(xy[missing])
    line_azimuth = line_azimuths(network, landing)
    record = section_attitude(dip, dip_direction, line_azimuth, options.exaggeration)
    travel = landing.travel
    if options.method == ALONG_PLUNGE:
        z = np.where(carried, plunge_elevation(z, travel, options.plunge), np.nan)
    record.update(
        line=landing.line,
        chainage=landing.chainage,
        landing_xy=landing.xy,
        offset=signed_offsets(network, landing, xy),
        travel=np.abs(travel),
        elev=z,
        gnd_elev=_ground(elevation_at, landing.xy, carried, n),
        dip_dir=np.asarray(dip_direction, dtype=float),
        dip=np.asarray(dip, dtype=float),
        line_az=line_azimuth,
        app_dip_sd=apparent_dip_sd(dip, record["line_angle"], options.dip_sd, options.strike_sd),
        dips_to=np.select([record["sense"] > 0, record["sense"] < 0], ["end", "start"], ""),
        reason=reasons,
    )
    record["flags"] = _flags(record, options, carried, xy, unit_at)
    return record


def _ground(elevation_at, landing_xy, carried, n):
    ground = np.full(n, np.nan)
    if elevation_at is not None and carried.any():
        ground[carried] = elevation_at(landing_xy[carried])
    return ground


def _flags(record, options, carried, xy, unit_at):
    checks = [
        ("oblique", record["line_angle"] < options.oblique_angle),
        ("no_elevation", np.isnan(record["elev"])),
        ("vertical", record["dip"] == 90.0),
        ("horizontal", record["dip"] == 0.0),
    ]
    if unit_at is not None and carried.any():
        changed = np.zeros(len(xy), dtype=bool)
        here = np.flatnonzero(carried)
        changed[here] = np.asarray(unit_at(xy[here]), dtype=object) != np.asarray(
            unit_at(record["landing_xy"][here]), dtype=object
        )
        checks.insert(1, ("unit_changed", changed))
    flags = np.full(len(xy), "", dtype=object)
    for name, hit in checks:
        hit = hit & carried
        flags[hit] = np.where(flags[hit] == "", name, flags[hit] + "," + name)
    return flags
