"""Dip domains along sections, and the one attitude worth plotting in each.

Along each section the carried attitudes, in chainage order, are cut into
consecutive domains by optimal partitioning (B. Jackson et al., "An
algorithm for optimal partitioning of data on an interval", *IEEE Signal
Processing Letters* 12(2), 2005; the objective PELT minimises, R. Killick,
P. Fearnhead, I. A. Eckley, *JASA* 107(500), 2012): the partition of the
signed apparent dips s₁ … sₙ that minimises

    Σ over domains Σᵢ (sᵢ − s̄)²  +  β · (number of domains − 1),

with the penalty per boundary β = τ²/2 for the angle tolerance τ — so two
lone attitudes are split exactly when they differ by more than τ, and more
attitudes on either side split at a smaller (better supported) change —
under two rules:

* a change of dip direction always splits: no domain holds a dip toward the
  end and one toward the start when either exceeds τ (a hard constraint);
* a domain has at least ``min_count`` attitudes wherever the first rule
  allows (fewest short domains first, then the objective).

Without those rules active it is the formulation of ``ruptures``'
``Pelt(model="l2", min_size=min_count, jump=1).predict(pen=β)``.

The dynamic programme runs over all sections of similar size at once: a
Python loop over the end position, arrays over the sections and every
candidate start. Input order never matters: attitudes are put in order of
(section, chainage, signed dip, tie-break key) first.
"""

import numpy as np

BLOCKING_FLAGS = {
    "oblique": "oblique",
    "unit_changed": "unit changed",
    "no_elevation": "no elevation",
}
ONLY = "only attitude in its domain"
NEAREST = "nearest the line"
CERTAIN = "smallest uncertainty"
NEAREST_AND_CERTAIN = "nearest the line, smallest uncertainty"
BALANCED = "near the line and certain together"
STILL_FLAGGED = "; flagged: "
REDUNDANT = "redundant with "


def boundary_penalty(tolerance):
    """β = τ²/2: the drop in squared deviation a boundary must buy.

    >>> boundary_penalty(10.0)
    50.0
    """
    return 0.5 * float(tolerance) ** 2


def signed_apparent_dip(app_dip, dips_to):
    """+ toward the section's end, − toward its start; a vertical bed (90,
    no sense) counts +90.

    >>> signed_apparent_dip(np.array([30.0, 30.0, 0.0, 90.0]),
    ...                     np.array(["end", "start", "", ""], dtype=object)).tolist()
    [30.0, -30.0, 0.0, 90.0]
    """
    app_dip = np.asarray(app_dip, dtype=float)
    toward_start = np.asarray(dips_to, dtype=object) == "start"
    return np.where(toward_start, -app_dip, app_dip)


def _length_buckets(lengths):
    """Sections grouped by the power of two above their length, so that
    padding at most doubles the work."""
    size = np.ceil(np.log2(np.maximum(lengths, 1))).astype(int)
    return [np.flatnonzero(size == b) for b in np.unique(size)]


def _partition(values, inside, lengths, tolerance, min_count):
    """Domain-start flags (sections × longest) for padded rows of values."""
    count, longest = values.shape
    rows = np.arange(count)
    beta = boundary_penalty(tolerance)
    # Sums of values less each section's mean stay small: no cancellation.
    centred = np.where(inside, values - values.sum(axis=1, keepdims=True) / lengths[:, None], 0.0)
    zero = np.zeros((count, 1))
    first = np.concatenate([zero, np.cumsum(centred, axis=1)], axis=1)
    second = np.concatenate([zero, np.cumsum(centred**2, axis=1)], axis=1)
    best = np.full((count, longest + 1), np.inf)
    best[:, 0] = -beta
    short = np.zeros((count, longest + 1), dtype=int)
    back = np.zeros((count, longest + 1), dtype=int)
    highest = np.empty((count, longest))
    lowest = np.empty((count, longest))
    for end in range(1, longest + 1):
        newest = values[:, end - 1 : end]
        highest[:, end - 1] = lowest[:, end - 1] = newest[:, 0]
        np.maximum(highest[:, :end], newest, out=highest[:, :end])
        np.minimum(lowest[:, :end], newest, out=lowest[:, :end])
        size = end - np.arange(end)
        total = first[:, end : end + 1] - first[:, :end]
        cost = np.maximum(second[:, end : end + 1] - second[:, :end] - total**2 / size, 0.0)
        both_ways = (highest[:, :end] > 0) & (lowest[:, :end] < 0)
        steep = np.maximum(highest[:, :end], -lowest[:, :end]) > tolerance
        allowed = ~(both_ways & steep)
        shorts = np.where(allowed, short[:, :end] + (size < min_count), np.iinfo(int).max)
        fewest = shorts.min(axis=1, keepdims=True)
        objective = np.where(shorts == fewest, best[:, :end] + cost + beta, np.inf)
        start = np.argmin(objective, axis=1)
        best[:, end] = objective[rows, start]
        short[:, end] = fewest[:, 0]
        back[:, end] = start
    starts = np.zeros((count, longest), dtype=bool)
    position = lengths.copy()
    while (position > 0).any():
        open_rows = np.flatnonzero(position > 0)
        begin = back[open_rows, position[open_rows]]
        starts[open_rows, begin] = True
        position[open_rows] = begin
    return starts


def segment(section, chainage, signed_dip, tolerance, min_count=1, tie_break=None):
    """Domain number (1, 2 … along each section's chainage) of every
    attitude; 0 where chainage or dip is NaN.

    ``section`` integer codes; ``tie_break`` (optional) a key that orders
    attitudes of equal chainage and dip (e.g. their source ids).

    A step from 20° to 35° toward the end, then a change of direction:

    >>> segment(np.zeros(7, int), np.arange(7.0), np.array([20, 21, 19, 35, 36, -5, -4.0]),
    ...         10.0).tolist()
    [1, 1, 1, 2, 2, 3, 3]
    >>> segment(np.zeros(4, int), np.array([3.0, 2, 1, 0]), np.array([5, 5, 6, 6.0]), 10.0).tolist()
    [1, 1, 1, 1]
    """
    section = np.asarray(section, dtype=int)
    chainage = np.asarray(chainage, dtype=float)
    signed_dip = np.asarray(signed_dip, dtype=float)
    tie_break = np.zeros(len(section)) if tie_break is None else np.asarray(tie_break)
    good = np.flatnonzero(np.isfinite(chainage) & np.isfinite(signed_dip))
    order = good[np.lexsort((tie_break[good], signed_dip[good], chainage[good], section[good]))]
    domain = np.zeros(len(section), dtype=int)
    if len(order) == 0:
        return domain
    codes = section[order]
    head = np.flatnonzero(np.r_[True, codes[1:] != codes[:-1]])
    lengths = np.diff(np.r_[head, len(order)])
    values = signed_dip[order]
    for bucket in _length_buckets(lengths):
        longest = int(lengths[bucket].max())
        column = np.arange(longest)
        inside = column < lengths[bucket, None]
        where = np.where(inside, head[bucket, None] + column, 0)
        padded = np.where(inside, values[where], 0.0)
        starts = _partition(padded, inside, lengths[bucket].copy(), tolerance, min_count)
        number = np.cumsum(starts, axis=1)
        domain[order[where[inside]]] = number[inside]
    return domain


def blocking_flags(flags):
    """The flags that keep an attitude from standing for its domain, as
    text ('' for none).

    >>> blocking_flags(np.array(["oblique,no_elevation", "horizontal", ""], dtype=object)).tolist()
    ['oblique, no elevation', '', '']
    """
    flags = np.asarray(flags, dtype=object).astype(str)
    text = np.full(len(flags), "", dtype=object)
    for flag, words in BLOCKING_FLAGS.items():
        hit = np.char.find(flags, flag) >= 0
        text[hit] = np.where(text[hit] == "", words, text[hit] + ", " + words)
    return text


def _domain_fraction(value, group, count):
    """value / its group's largest value (0 … 1; NaN counts as the worst)."""
    largest = np.zeros(count)
    finite = np.where(np.isfinite(value), value, -np.inf)
    np.maximum.at(largest, group, finite)
    with np.errstate(invalid="ignore", divide="ignore"):
        fraction = np.where(largest[group] > 0, value / largest[group], 0.0)
    return np.where(np.isfinite(value), fraction, 1.0)


def representatives(group, travel, dip_sd, flags, ids):
    """(represent, why) per attitude: in each group (a domain; −1 = none)
    the attitude worth plotting, and a short reason for every choice.

    The choice: fewest blocking flags (oblique, unit changed, no
    elevation) first; then the smallest sum of travel and app_dip_sd, each
    as a fraction of its largest value in the domain; then the smallest id.

    >>> rep, why = representatives(np.array([0, 0, 0, 1]), np.array([50.0, 10.0, 5.0, 80.0]),
    ...                            np.array([2.0, 2.0, 3.0, 1.0]),
    ...                            np.array(["", "", "oblique", ""], dtype=object),
    ...                            np.array([11, 12, 13, 14]))
    >>> rep.tolist()
    [False, True, False, True]
    >>> for reason in why: print(reason)
    redundant with 12
    nearest the line, smallest uncertainty
    oblique
    only attitude in its domain
    """
    group = np.asarray(group, dtype=int)
    ids = np.asarray(ids)
    represent = np.zeros(len(group), dtype=bool)
    why = np.full(len(group), "", dtype=object)
    member = np.flatnonzero(group >= 0)
    if len(member) == 0:
        return represent, why
    g = group[member]
    count = int(g.max()) + 1
    blocked = blocking_flags(np.asarray(flags, dtype=object)[member])
    flag_count = np.char.count(blocked.astype(str), ",") + (blocked != "")
    travel = np.asarray(travel, dtype=float)[member]
    dip_sd = np.asarray(dip_sd, dtype=float)[member]
    score = _domain_fraction(travel, g, count) + _domain_fraction(dip_sd, g, count)
    order = np.lexsort((ids[member], score, flag_count, g))
    first = order[np.r_[True, g[order][1:] != g[order][:-1]]]
    chosen = np.full(count, -1)
    chosen[g[first]] = first
    represent[member[first]] = True
    # Flags the representative shares say nothing against the others.
    worse = flag_count > flag_count[chosen[g]]
    redundant = np.char.add(REDUNDANT, ids[member][chosen[g]].astype(str)).astype(object)
    why[member] = np.where(worse, blocked, redundant)
    why[member[first]] = _choice_reasons(first, chosen, g, travel, dip_sd, flag_count, blocked)
    return represent, why


def _choice_reasons(first, chosen, g, travel, dip_sd, flag_count, blocked):
    """Why each chosen attitude won, judged against the members as little
    flagged as itself."""
    count = len(chosen)
    size = np.bincount(g, minlength=count)[g[first]]
    peers = flag_count == flag_count[chosen[g]]
    least = lambda value: _group_min(np.where(peers, value, np.inf), g, count)  # noqa: E731
    nearest = travel[first] <= least(travel)[g[first]]
    certain = dip_sd[first] <= least(dip_sd)[g[first]]
    reasons = np.select(
        [size == 1, nearest & certain, nearest, certain],
        [ONLY, NEAREST_AND_CERTAIN, NEAREST, CERTAIN],
        BALANCED,
    ).astype(object)
    flagged = flag_count[first] > 0
    reasons[flagged] = reasons[flagged] + STILL_FLAGGED + blocked[first][flagged]
    return reasons


def _group_min(value, group, count):
    smallest = np.full(count, np.inf)
    np.minimum.at(smallest, group, np.where(np.isfinite(value), value, np.inf))
    return smallest


def domain_table(group, chainage, signed_dip, represent):
    """Per group (0 … k-1): from_ch, to_ch, count, mean_dip, dip_sd
    (population standard deviation of the signed apparent dips; 0 for one
    attitude), dips_to (of the mean) and rep (row index of the
    representative), as a dict of arrays.

    >>> t = domain_table(np.array([0, 0, 1]), np.array([5.0, 1.0, 9.0]),
    ...                  np.array([10.0, 20.0, -4.0]), np.array([False, True, True]))
    >>> t["from_ch"].tolist(), t["mean_dip"].tolist(), t["dip_sd"].tolist(), t["dips_to"].tolist()
    ([1.0, 9.0], [15.0, -4.0], [5.0, 0.0], ['end', 'start'])
    >>> t["rep"].tolist()
    [1, 2]
    """
    group = np.asarray(group, dtype=int)
    member = np.flatnonzero(group >= 0)
    g = group[member]
    count = int(g.max()) + 1 if len(g) else 0
    chainage = np.asarray(chainage, dtype=float)[member]
    values = np.asarray(signed_dip, dtype=float)[member]
    n = np.bincount(g, minlength=count)
    safe = np.maximum(n, 1)
    mean = np.bincount(g, values, minlength=count) / safe
    spread = np.sqrt(np.maximum(np.bincount(g, (values - mean[g]) ** 2, minlength=count) / safe, 0))
    from_ch = np.full(count, np.inf)
    to_ch = np.full(count, -np.inf)
    np.minimum.at(from_ch, g, chainage)
    np.maximum.at(to_ch, g, chainage)
    rep = np.full(count, -1)
    chosen = np.asarray(represent, dtype=bool)[member]
    rep[g[chosen]] = member[chosen]
    return {
        "from_ch": from_ch,
        "to_ch": to_ch,
        "count": n,
        "mean_dip": mean,
        "dip_sd": spread,
        "dips_to": np.select([mean > 0, mean < 0], ["end", "start"], "").astype(object),
        "rep": rep,
    }
