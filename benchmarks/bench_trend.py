"""Benchmark of the structural-trend and dip-domain cores.

    .venv/bin/python benchmarks/bench_trend.py

* structuraltrend: 100,000 attitudes in 100 areas (a 10 × 10 grid of 2 km
  squares): which area each attitude is in, then the orientation tensor,
  its eigen decomposition, fold axis, shape, pattern and recommended
  azimuth for every area — beside a loop over the areas calling
  ``np.linalg.eigh`` once per area (the straightforward way).
* dipdomains: 100,000 carried attitudes on 1,000 sections (100 each on
  average, Poisson), five dip levels with 3° scatter: segmentation,
  representatives and the domain table — beside ``ruptures``
  (Pelt, model "l2", jump 1, the same penalty) called once per section, and
  one section of 10,000 attitudes (the segmentation is quadratic per
  section).

Best of 3, in one process.
"""

import sys
from pathlib import Path

import numpy as np
import shapely

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
sys.path.insert(0, str(HERE.parent / "scripts"))
from bench_attitudes import best_of  # noqa: E402
from plugin_package import import_plugin  # noqa: E402

import_plugin()

from sectionwright.algorithms.core import domains as D  # noqa: E402
from sectionwright.algorithms.core import fabric as F  # noqa: E402
from sectionwright.algorithms.core.units import polygon_index_at  # noqa: E402

TOLERANCE = 10.0


def trend_data(rng, count=100_000, side=10, cell=2000.0):
    squares = [
        shapely.box(i * cell, j * cell, (i + 1) * cell, (j + 1) * cell)
        for j in range(side)
        for i in range(side)
    ]
    xy = rng.uniform(0, side * cell, (count, 2))
    dip_direction = rng.uniform(0, 360, count)
    dip = rng.uniform(5, 80, count)
    return squares, xy, dip_direction, dip


def trend_core(squares, xy, dip_direction, dip):
    group = polygon_index_at(squares, xy)
    return F.fabric(dip_direction, dip, group, len(squares))


def trend_loop(squares, xy, dip_direction, dip):
    group = polygon_index_at(squares, xy)
    poles = F.poles(dip_direction, dip)
    axes = []
    for k in range(len(squares)):
        mine = poles[group == k]
        values, vectors = np.linalg.eigh(mine.T @ mine / len(mine))
        axes.append(vectors[:, 0])
    return axes


def domain_data(rng, sections=1000, mean=100):
    sizes = rng.poisson(mean, sections)
    section = np.repeat(np.arange(sections), sizes)
    count = len(section)
    chainage = rng.uniform(0, 15000, count)
    signed = rng.choice([-40.0, -12.0, 8.0, 25.0, 60.0], count) + rng.normal(0, 3, count)
    # Runs, not noise: each section's levels change every ~10 attitudes.
    order = np.lexsort((chainage, section))
    run = np.cumsum(rng.random(count) < 0.1)
    signed[order] = rng.choice([-40.0, -12.0, 8.0, 25.0, 60.0], run[-1] + 1)[run] + rng.normal(
        0, 3, count
    )
    travel = rng.uniform(0, 250, count)
    dip_sd = rng.uniform(1, 5, count)
    flags = np.where(rng.random(count) < 0.1, "oblique", "").astype(object)
    return section, chainage, signed, travel, dip_sd, flags


def domain_core(section, chainage, signed, travel, dip_sd, flags):
    ids = np.arange(len(section))
    domain = D.segment(section, chainage, signed, TOLERANCE, 1, ids)
    _, group = np.unique(section * (domain.max() + 1) + domain, return_inverse=True)
    represent, why = D.representatives(group, travel, dip_sd, flags, ids)
    return D.domain_table(group, chainage, signed, represent)


def domain_ruptures(section, chainage, signed):
    import ruptures

    order = np.lexsort((chainage, section))
    values = signed[order]
    heads = np.flatnonzero(np.r_[True, np.diff(section[order]) != 0])
    ends = np.r_[heads[1:], len(values)]
    penalty = D.boundary_penalty(TOLERANCE)
    return [
        ruptures.Pelt(model="l2", min_size=1, jump=1).fit(values[a:b]).predict(pen=penalty)
        for a, b in zip(heads, ends)
    ]


def main():
    rng = np.random.default_rng(14)
    squares, xy, dd, dip = trend_data(rng)
    seconds, result = best_of(3, lambda: trend_core(squares, xy, dd, dip))
    print(
        f"structuraltrend core, {len(xy):,} attitudes in {len(squares)} areas: {seconds:.3f} s "
        f"({seconds / len(xy) * 1e6:.2f} µs per attitude; patterns "
        f"{dict(zip(*np.unique(result['pattern'], return_counts=True)))})"
    )
    seconds, _ = best_of(3, lambda: trend_loop(squares, xy, dd, dip))
    print(f"  a loop over the areas, one np.linalg.eigh each (reference): {seconds:.3f} s")
    group = polygon_index_at(squares, xy)
    seconds, _ = best_of(3, lambda: F.fabric(dd, dip, group, len(squares)))
    print(f"  of which the fabric alone (areas known): {seconds:.3f} s")

    data = domain_data(rng)
    seconds, table = best_of(3, lambda: domain_core(*data))
    print(
        f"dipdomains core, {len(data[0]):,} attitudes on {data[0].max() + 1:,} sections: "
        f"{seconds:.3f} s ({len(table['count']):,} domains)"
    )
    seconds, _ = best_of(3, lambda: D.segment(data[0], data[1], data[2], TOLERANCE, 1))
    print(f"  of which the segmentation: {seconds:.3f} s")
    try:
        seconds, pelt = best_of(1, lambda: domain_ruptures(*data[:3]))
        boundaries = sum(len(p) for p in pelt)
        print(
            f"  ruptures Pelt (l2, jump 1) per section (reference): {seconds:.3f} s "
            f"({boundaries:,} segments)"
        )
    except ImportError:
        print("  ruptures not installed: no reference timing")
    long = (np.zeros(10_000, int),) + tuple(a[:10_000] for a in data[1:3])
    seconds, _ = best_of(3, lambda: D.segment(*long, TOLERANCE, 1))
    print(f"  one section of 10,000 attitudes, segmentation: {seconds:.3f} s")


if __name__ == "__main__":
    main()
