"""Dip ticks: short lines drawn in the section view at the plotted dip."""

import numpy as np


def tick_segments(chainage, elevation, exaggeration, plot_dip, sense, length):
    """(n, 2, 2) end points of ticks centred at (chainage, elevation × VE),
    ``length`` long, at ``plot_dip`` degrees, going down to the right when
    ``sense`` is +1 (dips toward the end of the line) and down to the left
    when it is −1.

    >>> tick_segments(np.array([100.0]), np.array([50.0]), 2.0, np.array([45.0]),
    ...               np.array([1]), np.array([np.sqrt(2) * 20])).round(6).tolist()
    [[[90.0, 110.0], [110.0, 90.0]]]
    """
    half = np.asarray(length, dtype=float) / 2.0
    angle = np.radians(np.asarray(plot_dip, dtype=float))
    dx, dy = half * np.cos(angle), half * np.sin(angle)
    down_right = np.where(np.asarray(sense) < 0, -1.0, 1.0)
    x = np.asarray(chainage, dtype=float)
    y = np.asarray(elevation, dtype=float) * exaggeration
    first = np.column_stack((x - dx, y + down_right * dy))
    second = np.column_stack((x + dx, y - down_right * dy))
    return np.stack((first, second), axis=1)
