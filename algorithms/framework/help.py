"""One help text per algorithm: ``algorithms/<id>.html``, beside its module."""

from pathlib import Path


def help_text(algorithm_name):
    return (Path(__file__).parent.parent / f"{algorithm_name}.html").read_text(encoding="utf-8")
