"""One help text per algorithm: ``algorithms/<id>.html``, beside its module."""

from pathlib import Path

CONVENTIONS_MARK = "<!--conventions-->"


def help_text(algorithm_name):
    """The help of ``algorithm_name``; the attitude conventions, shared by
    every algorithm that reads attitudes, come from conventions.html."""
    text = (Path(__file__).parent.parent / f"{algorithm_name}.html").read_text(encoding="utf-8")
    if CONVENTIONS_MARK in text:
        shared = (Path(__file__).parent / "conventions.html").read_text(encoding="utf-8")
        text = text.replace(CONVENTIONS_MARK, shared.strip())
    return text
