"""Every algorithm reports progress up to 100 % and honours Cancel: a
cancelled run stops with a message and leaves no partial output.

What "no partial GeoPackage" means (algorithms/framework/run_guard.py): the
run raises ``Cancelled: …``; an output file the run created does not exist
afterwards; a layer it wrote into a GeoPackage that was there before is
gone while the GeoPackage's other layers stay.
"""

import gc
from pathlib import Path

import processing
import pytest
from algorithm_runs import RUNS
from feedback import LogFeedback
from map_files import ordinary_map, write_map
from osgeo import ogr
from qgis.core import QgsProcessingException


class ProgressFeedback(LogFeedback):
    """Keeps every progress value reported."""

    def __init__(self):
        super().__init__()
        self.progress = []

    def setProgress(self, progress):
        self.progress.append(progress)
        super().setProgress(progress)


class CancelMidRun(ProgressFeedback):
    """Presses Cancel at the first progress report between 0 and 100 %."""

    def setProgress(self, progress):
        super().setProgress(progress)
        if 0 < progress < 100:
            self.cancel()


def free_the_failed_run():
    """The context processing.run made points at our feedback, and the
    error's traceback keeps both in a reference cycle: collected now, while
    the feedback still lives (freed in the wrong order, QGIS crashes)."""
    gc.collect()


@pytest.fixture(scope="module")
def ordinary(tmp_path_factory):
    return write_map(ordinary_map(), tmp_path_factory.mktemp("ordinary"))


def file_outputs(folder):
    """A destination per output: a GeoPackage file of its own."""
    return lambda name: str(folder / f"{name.lower()}.gpkg")


@pytest.mark.parametrize("name", sorted(RUNS))
def test_a_finished_run_ends_at_100_percent(provider, ordinary, tmp_path, name):
    run = RUNS[name]
    feedback = ProgressFeedback()
    processing.run(
        run.algorithm, run.parameters(ordinary, file_outputs(tmp_path), tmp_path), feedback=feedback
    )
    assert feedback.progress[-1] == 100
    assert max(feedback.progress) <= 100


@pytest.mark.parametrize("name", sorted(RUNS))
def test_cancel_mid_run_stops_and_leaves_no_output(provider, ordinary, tmp_path, name):
    run = RUNS[name]
    parameters = run.parameters(ordinary, file_outputs(tmp_path), tmp_path)
    before = {path.name for path in tmp_path.iterdir()}
    feedback = CancelMidRun()
    with pytest.raises(QgsProcessingException, match="Cancelled"):
        processing.run(run.algorithm, parameters, feedback=feedback)
    free_the_failed_run()
    assert feedback.isCanceled()
    assert not any(line.startswith("Summary:") for line in feedback.lines)
    assert {path.name for path in tmp_path.iterdir()} == before


def test_a_cancelled_run_drops_only_its_own_layers_from_an_existing_geopackage(
    provider, ordinary, tmp_path
):
    kept = tmp_path / "results.gpkg"
    dataset = ogr.GetDriverByName("GPKG").CreateDataSource(str(kept))
    dataset.CreateLayer("earlier_work", None, ogr.wkbNone)
    dataset = None
    parameters = RUNS["profile"].parameters(
        ordinary, lambda name: f"ogr:dbname='{kept}' table=\"{name.lower()}\" (geom)", tmp_path
    )
    with pytest.raises(QgsProcessingException, match="Cancelled"):
        processing.run("sectionwright:profile", parameters, feedback=CancelMidRun())
    dataset = ogr.Open(str(kept))
    assert [dataset.GetLayer(i).GetName() for i in range(dataset.GetLayerCount())] == [
        "earlier_work"
    ]


def test_a_cancelled_run_leaves_the_files_beside_its_outputs_alone(provider, ordinary, tmp_path):
    """Only the files an output's own format writes, and only those the run
    created, are taken back: a Shapefile of the same name beside a new
    GeoPackage output keeps all its parts."""
    parameters = RUNS["profile"].parameters(ordinary, file_outputs(tmp_path), tmp_path)
    outputs = [v for v in parameters.values() if isinstance(v, str) and v.endswith(".gpkg")]
    neighbours = [
        Path(output).with_suffix(suffix)
        for output in outputs
        for suffix in (".shp", ".dbf", ".shx", ".prj")
    ]
    for neighbour in neighbours:
        neighbour.write_bytes(b"the user's own file")
    with pytest.raises(QgsProcessingException, match="Cancelled"):
        processing.run("sectionwright:profile", parameters, feedback=CancelMidRun())
    free_the_failed_run()
    assert outputs and all(not Path(output).exists() for output in outputs)
    assert all(n.read_bytes() == b"the user's own file" for n in neighbours)
