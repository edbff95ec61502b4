"""The collar, survey and interval tables of one borehole run checked
against each other, turned into survey stations and the depths drawn.
The tables are dictionaries of columns, as read; refused rows are
collected as (table, hole, fid, depth, reason)."""

import numpy as np

from .attitudes import as_numbers
from .boreholes import assemble_stations, check_intervals, check_surveys, drawing_depths
from .desurvey import positions_at_depths, station_offsets
from .north import to_grid


def survey_stations(holes, surveys, skipped):
    """The stations of every collar from its usable surveys (azimuths to
    grid north as the collars'); refused survey rows join ``skipped`` as
    (table, hole, fid, depth, reason) and ``surveys["used"]`` marks the
    others. ``holes`` and ``surveys`` are the run's column dictionaries."""
    depth, _ = as_numbers(surveys["depth"], "depth")
    azimuth, _ = as_numbers(surveys["azimuth"], "azimuth")
    inclination, _ = as_numbers(surveys["inclination"], "inclination")
    collar = surveys["collar"]
    reasons = check_surveys(collar, depth, azimuth, inclination, holes["depth"])
    refuse_rows("surveys", surveys, depth, reasons, holes, skipped)
    good = reasons == ""
    surveys["used"] = good
    grid_azimuth = to_grid(
        azimuth[good], holes["north"], holes["convergence"][collar[good]], holes["declination"]
    )
    return assemble_stations(
        holes["inclination"],
        holes["azimuth"],
        collar[good],
        depth[good],
        inclination[good],
        grid_azimuth,
    )


def kept_intervals(holes, intervals, skipped):
    """The usable interval rows (hole = collar index, from, to, code);
    refused rows join ``skipped``.

    >>> holes = {"depth": np.array([50.0]), "reason": np.array([""], dtype=object)}
    >>> rows = {"from": [0.0, 40], "to": [10.0, 60], "code": ["sst", None],
    ...         "collar": np.array([0, 0]), "hole": ["A", "A"], "fid": [1, 2]}
    >>> skipped = []
    >>> kept = kept_intervals(holes, rows, skipped)
    >>> kept["from"].tolist(), kept["code"], [row[-1] for row in skipped]
    ([0.0], ['sst'], ['beyond total depth'])
    """
    top, _ = as_numbers(intervals["from"], "from")
    bottom, _ = as_numbers(intervals["to"], "to")
    collar = intervals["collar"]
    reasons = check_intervals(collar, top, bottom, holes["depth"])
    refuse_rows("intervals", intervals, top, reasons, holes, skipped)
    good = np.flatnonzero(reasons == "")
    codes = [intervals["code"][i] for i in good]
    return {
        "hole": collar[good],
        "from": top[good],
        "to": bottom[good],
        "code": ["" if c is None else str(c) for c in codes],
    }


def drawn_samples(holes, stations, intervals, drawn, step):
    """Depths drawn per hole of ``drawn`` (stations, interval ends, every
    ``step``, the bottom) and their positions: xyz from the collars' xy and z."""
    hole, md = drawing_depths(
        holes["depth"],
        drawn,
        stations,
        np.concatenate((intervals["hole"], intervals["hole"])),
        np.concatenate((intervals["from"], intervals["to"])),
        step,
    )
    offsets = station_offsets(stations.md, stations.inclination, stations.azimuth, stations.hole)
    enu = positions_at_depths(
        stations.md, stations.inclination, stations.azimuth, stations.hole, offsets, hole, md
    )
    xyz = np.column_stack((holes["xy"][hole] + enu[:, :2], holes["z"][hole] - enu[:, 2]))
    return {"hole": hole, "md": md, "xyz": xyz}


def refuse_rows(table, rows, depth, reasons, holes, skipped):
    """Rows of a collar that is not drawn are refused too; every refused row
    joins ``skipped``. ``reasons`` is updated in place."""
    collar = rows["collar"]
    not_drawn = (reasons == "") & (collar >= 0)
    not_drawn[not_drawn] = holes["reason"][collar[not_drawn]] != ""
    reasons[not_drawn] = "collar skipped"
    for i in np.flatnonzero(reasons != ""):
        skipped.append((table, rows["hole"][i], rows["fid"][i], depth[i], str(reasons[i])))
