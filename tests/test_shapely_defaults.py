"""No shapely call relies on a default that depends on the GEOS version.

From shapely 2.1, ``to_wkb`` and ``to_wkt`` write 4 dimensions by default
when shapely's GEOS is 3.12 or newer; inside a QGIS process (qgis_process,
desktop QGIS, and every process pytest-qgis starts) a shapely wheel's GEOS
calls can reach the older GEOS QGIS has loaded, which refuses them
(``GEOSException: IllegalArgumentException: WKB output dimension must be 2
or 3``). The CI leg ``newest-shapely`` of scripts/test_releases.sh runs the
headless tests with the newest shapely; this test finds the calls first.
"""

import ast
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
SOURCES = ("algorithms", "plugin", "scripts", "benchmarks", "test_data", "tests")

# shapely function -> the keywords whose defaults GEOS decides (or that
# choose what a reader gets), each of which a call must spell out.
EXPLICIT = {
    "to_wkb": {"output_dimension", "flavor", "byte_order"},
    "to_wkt": {"output_dimension", "rounding_precision", "trim"},
    "from_wkb": {"on_invalid"},
}
# Properties of shapely geometries that call to_wkb/to_wkt with the defaults.
DEFAULTED_PROPERTIES = {"wkb", "wkb_hex", "wkt"}


def python_files():
    for folder in SOURCES:
        yield from sorted((ROOT / folder).rglob("*.py"))


def defaulted_calls(path):
    """(line, what) for every call that leaves a GEOS-dependent choice to shapely."""
    found = []
    for node in ast.walk(ast.parse(path.read_text(), str(path))):
        if isinstance(node, ast.Call) and isinstance(node.func, ast.Attribute):
            owner = node.func.value
            if isinstance(owner, ast.Name) and owner.id == "shapely":
                wanted = EXPLICIT.get(node.func.attr, set())
                missing = wanted - {k.arg for k in node.keywords}
                if missing:
                    found.append(
                        (node.lineno, f"shapely.{node.func.attr} without {sorted(missing)}")
                    )
            elif isinstance(owner, ast.Attribute) and owner.attr in ("wkb", "wkt"):
                found.append((node.lineno, f"shapely.{owner.attr}.{node.func.attr}"))
        elif isinstance(node, ast.Attribute) and node.attr in DEFAULTED_PROPERTIES:
            if isinstance(node.ctx, ast.Load):
                found.append((node.lineno, f".{node.attr} (the defaults of shapely's writer)"))
    return found


def test_the_scan_finds_what_it_looks_for(tmp_path):
    sample = tmp_path / "sample.py"
    sample.write_text(
        "import shapely\n"
        "a = shapely.to_wkb(g)\n"
        "b = shapely.to_wkb(g, output_dimension=3, flavor='iso', byte_order=1)\n"
        "c = g.wkt\n"
        "d = shapely.from_wkb(w)\n"
    )
    assert [line for line, _ in defaulted_calls(sample)] == [2, 4, 5]


@pytest.mark.parametrize("path", list(python_files()), ids=lambda p: str(p.relative_to(ROOT)))
def test_no_shapely_call_leaves_a_geos_dependent_default(path):
    assert defaulted_calls(path) == []
