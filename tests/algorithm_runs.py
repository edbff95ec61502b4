"""How each Sectionwright algorithm is run on a map of map_files.py: the
registry the generated-map, cancel and progress tests go through.

A new algorithm is added with one ``register(...)``: the map layers it
needs, its parameters for a map, and — where it writes one row (or one
SKIPPED row) per input — how many rows it reads.
"""

from dataclasses import dataclass
from typing import Callable, Optional, Tuple

import processing

RUNS = {}


@dataclass
class AlgorithmRun:
    algorithm: str
    needs: Tuple[str, ...]  # map layers (and "dem") it cannot run without
    parameters: Callable  # (map files, destination(name) -> str, scratch folder) -> dict
    rows_read: Optional[Callable] = None  # map files -> the Summary's read=


def register(algorithm, needs, parameters, rows_read=None):
    RUNS[algorithm] = AlgorithmRun(
        f"sectionwright:{algorithm}", tuple(needs), parameters, rows_read
    )


def runnable(map_files):
    """The registered runs whose inputs the map has."""
    present = set(map_files.counts) | ({"dem"} if map_files.dem else set())
    return [run for run in RUNS.values() if set(run.needs) <= present]


def memory(name):
    return "memory:"


def made(m, name, output, scratch):
    """An output of ``name`` on map ``m``, for an algorithm that builds on it;
    each run once per map (check_run of test_foreign_maps leaves its results)."""
    if name not in m.made:
        parameters = {**RUNS[name].parameters(m, memory, scratch), "SKIPPED": "memory:"}
        m.made[name] = processing.run(f"sectionwright:{name}", parameters)
    return m.made[name][output]


def section_parts(map_files):
    return map_files.parts


def lines(m):
    return {"INPUT": m.layer("sections"), "LINE_ID_FIELD": "name"}


def numeric_attitudes(m):
    return {
        "ATTITUDES": m.layer("attitudes"),
        "CONVENTION": 0,
        "AZIMUTH_FIELD": "dipdir",
        "DIP_FIELD": "dip",
    }


def optional_layer(m, parameter, layer, **fields):
    return {parameter: m.layer(layer), **fields} if m.has(layer) else {}


register(
    "profile",
    ("sections", "dem"),
    lambda m, out, scratch: {
        **lines(m),
        "DEM": m.dem_layer(),
        "STEP": 40.0,
        "VERTICAL_EXAGGERATION": 2.0,
        "OUTPUT": out("OUTPUT"),
        "OUTPUT_SECTION": out("OUTPUT_SECTION"),
        "SKIPPED": out("SKIPPED"),
    },
    section_parts,
)
register(
    "projectattitudes",
    ("sections", "attitudes"),
    lambda m, out, scratch: {
        **lines(m),
        **numeric_attitudes(m),
        "MAX_DISTANCE": 400.0,
        **({"DEM": m.dem_layer()} if m.dem else {}),
        **optional_layer(m, "UNITS", "units", UNIT_FIELD="unit"),
        "VERTICAL_EXAGGERATION": 2.0,
        "OUTPUT": out("OUTPUT"),
        "OUTPUT_TICKS": out("OUTPUT_TICKS"),
        "OUTPUT_CONNECTORS": out("OUTPUT_CONNECTORS"),
        "SKIPPED": out("SKIPPED"),
    },
    lambda m: m.counts["attitudes"],
)
register(
    "normalizeattitudes",
    ("attitudes",),
    lambda m, out, scratch: {
        "INPUT": m.layer("attitudes"),
        "CONVENTION": 3,
        "TEXT_FIELD": "text",
        "NORTH_REFERENCE": 1,
        "OUTPUT": out("OUTPUT"),
        "SKIPPED": out("SKIPPED"),
    },
    lambda m: m.counts["attitudes"],
)
register(
    "geologycrossings",
    ("sections", "dem"),
    lambda m, out, scratch: {
        **lines(m),
        "DEM": m.dem_layer(),
        **optional_layer(m, "UNITS", "units", UNIT_FIELD="unit"),
        **optional_layer(m, "CONTACTS", "contacts", CONTACT_TYPE_FIELD="type"),
        "TRACE_WINDOW": 150.0,
        "VERTICAL_EXAGGERATION": 2.0,
        "OUTPUT": out("OUTPUT"),
        "OUTPUT_INTERVALS": out("OUTPUT_INTERVALS"),
        "SKIPPED": out("SKIPPED"),
    },
    section_parts,
)
register(
    "projectboreholes",
    ("sections", "collars"),
    lambda m, out, scratch: {
        **lines(m),
        "COLLARS": m.layer("collars"),
        "HOLE_ID_FIELD": "hole",
        "AZIMUTH_FIELD": "az",
        "INCLINATION_FIELD": "incl",
        "DEPTH_FIELD": "depth",
        **optional_layer(
            m,
            "SURVEYS",
            "surveys",
            SURVEY_HOLE_FIELD="hole",
            SURVEY_DEPTH_FIELD="depth",
            SURVEY_AZIMUTH_FIELD="az",
            SURVEY_INCLINATION_FIELD="incl",
        ),
        **optional_layer(
            m,
            "INTERVALS",
            "intervals",
            INTERVAL_HOLE_FIELD="hole",
            INTERVAL_FROM_FIELD="from_m",
            INTERVAL_TO_FIELD="to_m",
            INTERVAL_CODE_FIELD="code",
        ),
        **({"DEM": m.dem_layer()} if m.dem else {}),
        "MAX_DISTANCE": 400.0,
        "VERTICAL_EXAGGERATION": 2.0,
        "OUTPUT": out("OUTPUT"),
        "OUTPUT_INTERVALS": out("OUTPUT_INTERVALS"),
        "OUTPUT_TRACES": out("OUTPUT_TRACES"),
        "SKIPPED": out("SKIPPED"),
    },
    lambda m: sum(m.counts.get(name, 0) for name in ("collars", "surveys", "intervals")),
)


def sheet_parameters(m, out, scratch):
    """The sheet draws the profile: made first."""
    return {
        **lines(m),
        "PROFILE": made(m, "profile", "OUTPUT_SECTION", scratch),
        "PAGE_SIZE": 0,
        "OUTPUT": str(scratch / "sheet.pdf"),
        "SKIPPED": out("SKIPPED"),
    }


register("sectionsheet", ("sections", "dem"), sheet_parameters, section_parts)


def domain_parameters(m, out, scratch):
    """Dip domains group the attitudes carried onto the sections: carried first."""
    return {
        "ATTITUDES": made(m, "projectattitudes", "OUTPUT", scratch),
        "ANGLE_TOLERANCE": 10.0,
        "OUTPUT": out("OUTPUT"),
        "OUTPUT_DOMAINS": out("OUTPUT_DOMAINS"),
        "SKIPPED": out("SKIPPED"),
    }


register("dipdomains", ("sections", "attitudes"), domain_parameters)
register(
    "structuraltrend",
    ("attitudes",),
    lambda m, out, scratch: {
        **numeric_attitudes(m),
        **optional_layer(m, "AREAS", "units", AREA_FIELD="unit"),
        **(lines(m) if m.has("sections") else {}),
        "MAX_DISTANCE": 400.0,
        "OUTPUT": out("OUTPUT"),
        "OUTPUT_LINES": out("OUTPUT_LINES"),
        "SKIPPED": out("SKIPPED"),
    },
)


def form_line_parameters(m, out, scratch):
    """Form lines are built from the carried attitudes, the crossings and the
    profile of the same sections: made first."""
    return {
        "ATTITUDES": made(m, "projectattitudes", "OUTPUT", scratch),
        "CROSSINGS": made(m, "geologycrossings", "OUTPUT", scratch),
        "PROFILE": made(m, "profile", "OUTPUT_SECTION", scratch),
        "SPACING": 50.0,
        "VERTICAL_EXAGGERATION": 2.0,
        "OUTPUT": out("OUTPUT"),
        "OUTPUT_AXES": out("OUTPUT_AXES"),
        "OUTPUT_THICKNESS": out("OUTPUT_THICKNESS"),
        "SKIPPED": out("SKIPPED"),
    }


register("formlines", ("sections", "attitudes", "dem"), form_line_parameters)
register(
    "sectionsin3d",
    ("sections", "dem"),
    lambda m, out, scratch: {
        **lines(m),
        "SECTION_LAYER": made(m, "profile", "OUTPUT_SECTION", scratch),
        "OUTPUT": out("OUTPUT"),
        "SKIPPED": out("SKIPPED"),
    },
)
