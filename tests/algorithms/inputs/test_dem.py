"""ElevationsAhead: the DEM read on its own thread, one batch ahead."""

import threading

import numpy as np

from sectionwright.algorithms.inputs import dem
from sectionwright.algorithms.inputs.dem import ElevationsAhead


class RecordingSampler:
    """Elevation = x + y; records the threads that sample and lets a test
    hold a batch until it says go."""

    def __init__(self):
        self.started = threading.Event()
        self.go = threading.Event()
        self.go.set()
        self.threads = set()
        self.batches = 0

    def elevations(self, xy):
        self.threads.add(threading.get_ident())
        self.batches += 1
        self.started.set()
        assert self.go.wait(10)
        return xy[:, 0] + xy[:, 1]


def jobs(count, samples, consumed_on=None):
    for key in range(count):
        if consumed_on is not None:
            consumed_on.add(threading.get_ident())
        xy = None if key == 1 else np.full((samples, 2), float(key))
        yield key, xy


def test_results_come_in_order_with_none_for_jobs_without_positions(monkeypatch):
    monkeypatch.setattr(dem, "BATCH_SAMPLES", 25)
    sampler = RecordingSampler()
    results = list(ElevationsAhead(jobs(9, 10), sampler))
    assert [key for key, _ in results] == list(range(9))
    assert results[1][1] is None
    for key, z in results[:1] + results[2:]:
        np.testing.assert_array_equal(z, np.full(10, 2.0 * key))
    assert sampler.batches == 3  # 0, 2-3 / 4-6 / 7-8: ~25 positions a batch


def test_the_first_batch_is_read_before_anyone_asks_and_off_the_callers_thread():
    sampler = RecordingSampler()
    consumed_on = set()
    ahead = ElevationsAhead(jobs(3, 4, consumed_on), sampler)
    assert sampler.started.wait(10)  # nobody has iterated yet
    list(ahead)
    caller = threading.get_ident()
    assert caller not in sampler.threads and caller not in consumed_on


def test_leaving_early_waits_for_the_batch_in_hand_and_reads_no_more(monkeypatch):
    monkeypatch.setattr(dem, "BATCH_SAMPLES", 4)
    sampler = RecordingSampler()
    with ElevationsAhead(jobs(6, 4), sampler) as ahead:
        assert next(iter(ahead))[0] == 0
        sampler.go.clear()  # the next batch is held while the caller leaves
        threading.Timer(0.2, sampler.go.set).start()
    assert not [t for t in threading.enumerate() if t.name.startswith(dem.READER_THREAD)]
    assert sampler.batches <= 2  # the first, and the one in hand
