"""One help text per algorithm, in ``<algorithm id>.html`` beside this file."""

from pathlib import Path


def help_text(algorithm_name):
    return (Path(__file__).parent / f"{algorithm_name}.html").read_text(encoding="utf-8")
