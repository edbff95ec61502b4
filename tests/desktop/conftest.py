import sys


def pytest_runtest_logreport(report):
    """A failure's report at once: QGIS can abort while pytest-qgis tears the
    application down, before pytest prints its summary."""
    if report.failed:
        print(report.longreprtext[-3000:], file=sys.stderr, flush=True)
