"""What a run that stops early leaves behind: nothing.

A cancelled run, or one that fails, ends with a ``QgsProcessingException``
and without partial outputs: every output file the run created is removed,
and a layer it wrote into a GeoPackage that was there before is dropped
(other layers of that GeoPackage stay). Messages about a parameter name it
by its label, as the dialog shows it.
"""

from pathlib import Path

from osgeo import gdal
from qgis.core import (
    QgsDataSourceUri,
    QgsProcessing,
    QgsProcessingException,
    QgsProcessingOutputLayerDefinition,
    QgsProperty,
)
from qgis.PyQt import sip

CANCELLED = "Cancelled: the run stopped and wrote no output."
# Files beside a data file that belong to it (Shapefile parts, SQLite journals).
SHAPEFILE_PARTS = (".shx", ".dbf", ".prj", ".cpg", ".qix", ".qmd")
SQLITE_COMPANIONS = ("-wal", "-shm", "-journal")
SQLITE_SUFFIXES = (".gpkg", ".sqlite", ".db")


class RunCancelled(QgsProcessingException):
    """The user pressed Cancel."""

    def __init__(self):
        super().__init__(CANCELLED)


class ParameterProblem(QgsProcessingException):
    """A problem with one parameter's value; the algorithm puts the
    parameter's label in front of ``message``."""

    def __init__(self, parameter, message):
        super().__init__(message)
        self.parameter = parameter
        self.message = message


def stop_if_cancelled(feedback):
    """Raises RunCancelled once the user has pressed Cancel."""
    if feedback is not None and feedback.isCanceled():
        raise RunCancelled()


def destination_asked(value, context):
    """The destination a sink parameter's value names, as text, or None for
    a temporary output. Read without parameterAsOutputLayer, which for a
    value bound for a project already registers a layer to load."""
    if isinstance(value, QgsProcessingOutputLayerDefinition):
        value = value.sink
    if isinstance(value, QgsProperty):
        value, _ = value.valueAsString(context.expressionContext(), "")
    if not isinstance(value, str) or value in ("", QgsProcessing.TEMPORARY_OUTPUT):
        return None
    return value


def destination_file(destination):
    """(file path, layer name) of a sink destination written to a file;
    (None, None) for memory layers and databases."""
    if not destination or destination.startswith(("memory:", "postgres:", "spatialite:")):
        return None, None
    if destination.startswith("ogr:"):
        uri = QgsDataSourceUri(destination[len("ogr:") :])
        return uri.database() or None, uri.table() or None
    path, _, options = destination.partition("|")
    layer = next(
        (o.split("=", 1)[1] for o in options.split("|") if o.startswith("layername=")), None
    )
    return path, layer or Path(path).stem


class OutputRecord:
    """The sinks of one run and whether their files were there before."""

    def __init__(self):
        self.sinks = []
        self.created_files = {}  # path: the files of it that were not there before
        self.layers_in_old_files = []

    def before_sink(self, destination):
        path, layer = destination_file(destination)
        if path is None or path in self.created_files:
            return
        if Path(path).exists():
            self.layers_in_old_files.append((path, layer))
        else:
            self.created_files[path] = [f for f in _files_of(Path(path)) if not f.exists()]

    def add(self, sink):
        if sink is not None:
            self.sinks.append(sink)

    def release(self):
        """Lets go of the sinks of a finished run, so that they close now,
        before Processing hands their layers to the project (a sink kept
        past that point writes into a layer it no longer owns)."""
        self.sinks = []

    def withdraw(self):
        """Closes every sink and removes what the run wrote."""
        for sink in self.sinks:
            if not sip.isdeleted(sink):
                sip.delete(sink)  # the sink is ours (Processing hands it over): closes the file
        self.sinks = []
        for files in self.created_files.values():
            for file in files:
                if file.is_file():
                    file.unlink()
        for path, layer in self.layers_in_old_files:
            if path not in self.created_files:
                _drop_layer(path, layer)


def _files_of(path):
    """A data file and the files its format writes beside it: a
    Shapefile's parts, an SQLite database's journals."""
    suffix = path.suffix.lower()
    if suffix == ".shp":
        return [path, *(path.with_suffix(s) for s in SHAPEFILE_PARTS)]
    if suffix in SQLITE_SUFFIXES:
        return [path, *(Path(f"{path}{s}") for s in SQLITE_COMPANIONS)]
    return [path]


def _drop_layer(path, layer):
    dataset = gdal.OpenEx(path, gdal.OF_VECTOR | gdal.OF_UPDATE)
    if dataset is None:
        return
    for index in range(dataset.GetLayerCount()):
        if dataset.GetLayer(index).GetName() == layer:
            dataset.DeleteLayer(index)
            break
    dataset = None
