"""ElevationsAhead: the DEM read on its own thread, one batch ahead."""

import gc
import threading
import time
import weakref

import numpy as np

from sectionwright.algorithms.inputs import dem
from sectionwright.algorithms.inputs.dem import ElevationsAhead


class RecordingSampler:
    """Elevation = x + y; records the threads that sample and lets a test
    hold a batch until it says go."""

    def __init__(self, hold=()):
        self.started = threading.Event()
        self.go = threading.Event()
        self.hold = set(hold)  # batch numbers (from 1) that wait for go
        self.threads = set()
        self.batches = 0
        self.stop_asked = self.resumed = False

    def stop_reading(self):
        self.stop_asked = True
        self.go.set()  # a held batch ends at once, as a stopped read does

    def resume_reading(self):
        self.resumed = True

    def elevations(self, xy):
        self.threads.add(threading.get_ident())
        self.batches += 1
        self.started.set()
        if self.batches in self.hold:
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


def test_leaving_early_stops_the_batch_in_hand_and_reads_no_more(monkeypatch):
    monkeypatch.setattr(dem, "BATCH_SAMPLES", 4)
    sampler = RecordingSampler(hold={2})  # the batch in hand as the caller leaves
    with ElevationsAhead(jobs(6, 4), sampler) as ahead:
        results = iter(ahead)
        assert next(results)[0] == 0
        assert wait_until(lambda: sampler.batches == 2)
    assert sampler.stop_asked and sampler.resumed
    assert not reader_threads()
    assert sampler.batches == 2  # the first, and the one in hand


def test_reading_to_the_end_stops_nothing():
    sampler = RecordingSampler()
    with ElevationsAhead(jobs(3, 4), sampler) as ahead:
        assert len(list(ahead)) == 3
    assert not sampler.stop_asked


def test_an_error_before_iterating_leaves_no_reader_behind():
    sampler = RecordingSampler(hold={1})
    try:
        with ElevationsAhead(jobs(3, 4), sampler):
            assert sampler.started.wait(10)
            raise OSError("the output cannot be written there")
    except OSError:
        pass
    assert sampler.stop_asked and not reader_threads()


def test_a_failing_batch_leaves_nothing_for_the_cycle_collector():
    # The failed future's traceback holds the caller's frame: unless it is
    # let go, the DEM's handles (and a run's sinks) are freed by the cycle
    # collector in any order, which crashed GDAL.
    def failing_jobs():
        yield 0, np.zeros((2, 2))
        raise MemoryError("samples")

    collecting = gc.isenabled()
    gc.disable()
    try:
        with ElevationsAhead(failing_jobs(), RecordingSampler()) as ahead:
            left = weakref.ref(ahead)
            try:
                list(ahead)
            except MemoryError:
                pass
        del ahead
        assert left() is None
    finally:
        if collecting:
            gc.enable()


def reader_threads():
    return [t for t in threading.enumerate() if t.name.startswith(dem.READER_THREAD)]


def wait_until(condition, seconds=10.0):
    deadline = time.monotonic() + seconds
    while not condition():
        if time.monotonic() > deadline:
            return False
        time.sleep(0.01)
    return True
