"""sectionwright:profile through processing.run."""

import threading

import numpy as np
import processing
import pytest
from feedback import LogFeedback
from layers import by_section, is_null, line_layer, plane_raster, write_raster
from osgeo import gdal
from pyproj import Transformer
from qgis.core import QgsProcessingException, QgsVectorLayer
from scipy import ndimage

from sectionwright.algorithms import profile
from sectionwright.algorithms.compat.qgis_compat import (
    MULTI_LINE_STRING,
    MULTI_LINE_STRING_ZM,
    POINT_Z,
)

ORIGIN_X, ORIGIN_Y = 431000.0, 5127000.0
GT = (ORIGIN_X, 10.0, 0.0, ORIGIN_Y + 2000.0, 0.0, -10.0)  # 200 x 200 cells of 10 m


def plane(x, y):
    return 420.0 + 0.031 * (x - ORIGIN_X) - 0.047 * (y - ORIGIN_Y)


def run_profile(lines, dem, feedback=None, **extra):
    parameters = {
        "INPUT": lines,
        "LINE_ID_FIELD": "name",
        "DEM": dem,
        "STEP": 25.0,
        "OUTPUT": "memory:",
        "OUTPUT_LINE": "memory:",
        "OUTPUT_SECTION": "memory:",
        "SKIPPED": "memory:",
    }
    parameters.update(extra)
    return processing.run("sectionwright:profile", parameters, feedback=feedback)


@pytest.fixture(scope="module")
def plane_dem(tmp_path_factory):
    return plane_raster(tmp_path_factory.mktemp("dem") / "plane.tif", plane, GT, (200, 200), 32633)


KINKED = (
    f"LINESTRING({ORIGIN_X + 100} {ORIGIN_Y + 150}, {ORIGIN_X + 900} {ORIGIN_Y + 700}, "
    f"{ORIGIN_X + 1100} {ORIGIN_Y + 1600}, {ORIGIN_X + 1900} {ORIGIN_Y + 1850})"
)


def test_plane_dem_is_reproduced_exactly(provider, plane_dem):
    # Common practice: bilinear interpolation reproduces a plane exactly, the
    # sharpest test of cell-centre registration (REFERENCES.md, DEM sampling).
    result = run_profile(line_layer([KINKED]), plane_dem)
    features = list(result["OUTPUT"].getFeatures())
    assert len(features) > 100
    for feature in features:
        point = feature.geometry().constGet()
        assert feature["elev"] == pytest.approx(plane(feature["x"], feature["y"]), abs=1e-6)
        assert point.z() == pytest.approx(feature["elev"], abs=1e-9)
        assert (point.x(), point.y()) == (feature["x"], feature["y"])


def test_values_match_scipy_bilinear_on_the_demo_dem(provider, demo_dir):
    # Source: SciPy reference guide, ndimage.map_coordinates(order=1) =
    # bilinear interpolation at array (cell-centre) coordinates.
    dem_path = str(demo_dir / "dem.tif")
    result = run_profile(f"{demo_dir}/tarrowgill.gpkg|layername=sections", dem_path, STEP=7.0)
    ds = gdal.Open(dem_path)
    grid = ds.ReadAsArray().astype(float)
    x0, dx, _, y0, _, dy = ds.GetGeoTransform()
    features = list(result["OUTPUT"].getFeatures())
    x = np.array([f["x"] for f in features])
    y = np.array([f["y"] for f in features])
    elev = np.array([f["elev"] for f in features], dtype=float)
    u, v = (x - x0) / dx - 0.5, (y - y0) / dy - 0.5
    inside = (u >= 0) & (u <= grid.shape[1] - 1) & (v >= 0) & (v <= grid.shape[0] - 1)
    expected = ndimage.map_coordinates(grid, [v[inside], u[inside]], order=1)
    assert inside.sum() > 5000
    np.testing.assert_allclose(elev[inside], expected, atol=1e-4)


def test_chainages_match_shapely_and_the_line_length(provider, plane_dem):
    import shapely

    result = run_profile(line_layer([KINKED]), plane_dem, STEP=33.0)
    features = by_section(result["OUTPUT"])["L0"]
    line = shapely.from_wkt(KINKED)
    chainage = np.array([f["chainage"] for f in features])
    points = shapely.points([(f["x"], f["y"]) for f in features])
    # Source: shapely 2 / GEOS `line_locate_point`, an independent library.
    np.testing.assert_allclose(chainage, shapely.line_locate_point(line, points), atol=1e-6)
    section = next(result["OUTPUT_SECTION"].getFeatures())
    assert section["length"] == pytest.approx(line.length, abs=1e-6)
    for vertex in shapely.get_coordinates(line):
        assert min(np.hypot(f["x"] - vertex[0], f["y"] - vertex[1]) for f in features) < 1e-6


def test_section_view_is_chainage_against_exaggerated_elevation(provider, plane_dem):
    result = run_profile(line_layer([KINKED]), plane_dem, VERTICAL_EXAGGERATION=2.5)
    section = next(result["OUTPUT_SECTION"].getFeatures())
    points = list(result["OUTPUT"].getFeatures())
    vertices = list(section.geometry().vertices())
    assert len(vertices) == len(points)
    for vertex, point in zip(vertices, sorted(points, key=lambda f: f["chainage"])):
        assert vertex.x() == pytest.approx(point["chainage"])
        assert vertex.y() == pytest.approx(2.5 * point["elev"])
    assert section["ve"] == 2.5
    elevations = [p["elev"] for p in points]
    assert section["min_elev"] == pytest.approx(min(elevations))
    assert section["max_elev"] == pytest.approx(max(elevations))
    crs = result["OUTPUT_SECTION"].crs()
    assert crs.isValid() and "Section view" in crs.toWkt()


def test_z_factor_scales_elevations(provider, plane_dem):
    base = run_profile(line_layer([KINKED]), plane_dem)
    feet = run_profile(line_layer([KINKED]), plane_dem, Z_FACTOR=0.3048)
    a = sorted(f["elev"] for f in base["OUTPUT"].getFeatures())
    b = sorted(f["elev"] for f in feet["OUTPUT"].getFeatures())
    np.testing.assert_allclose(np.array(b), 0.3048 * np.array(a), rtol=1e-12)


def test_dem_in_another_crs_than_the_lines(provider, tmp_path):
    # The DEM is a plane in UTM 33N; the lines are in ETRS89-LAEA (EPSG:3035).
    # Expected positions from pyproj, an independent transformation library.
    dem = plane_raster(tmp_path / "utm.tif", plane, GT, (200, 200), 32633)
    to_laea = Transformer.from_crs(32633, 3035, always_xy=True)
    xs, ys = to_laea.transform([ORIGIN_X + 200, ORIGIN_X + 1700], [ORIGIN_Y + 300, ORIGIN_Y + 1500])
    wkt = f"LINESTRING({xs[0]} {ys[0]}, {xs[1]} {ys[1]})"
    result = run_profile(line_layer([wkt], epsg="EPSG:3035"), dem)
    back = Transformer.from_crs(3035, 32633, always_xy=True)
    for feature in result["OUTPUT"].getFeatures():
        ux, uy = back.transform(feature["x"], feature["y"])
        assert feature["elev"] == pytest.approx(plane(ux, uy), abs=1e-5)
    assert result["OUTPUT"].crs().authid() == "EPSG:3035"


def test_geographic_lines_give_the_chainages_of_the_same_lines_in_utm(provider, plane_dem):
    # Reference: the same line in UTM 33N; vertices moved to WGS 84 by pyproj.
    # Tolerance from the issue: 0.5 m per 10 km.
    utm = [
        (ORIGIN_X + 100, ORIGIN_Y + 150),
        (ORIGIN_X + 5100, ORIGIN_Y + 3150),
        (ORIGIN_X + 9100, ORIGIN_Y + 9150),
    ]
    to_geo = Transformer.from_crs(32633, 4326, always_xy=True)
    geo = [to_geo.transform(x, y) for x, y in utm]
    feedback = LogFeedback()
    projected = run_profile(
        line_layer(["LINESTRING(%s)" % ", ".join(f"{x} {y}" for x, y in utm)]),
        plane_dem,
        STEP=500.0,
    )
    geographic = run_profile(
        line_layer(
            ["LINESTRING(%s)" % ", ".join(f"{x!r} {y!r}" for x, y in geo)], epsg="EPSG:4326"
        ),
        plane_dem,
        feedback=feedback,
        STEP=500.0,
    )
    a = np.array([f["chainage"] for f in by_section(projected["OUTPUT"])["L0"]])
    b = np.array([f["chainage"] for f in by_section(geographic["OUTPUT"])["L0"]])
    assert len(a) == len(b)
    assert np.max(np.abs(a - b)) <= 0.5 * a[-1] / 10000.0
    assert any("EPSG:32633" in line for line in feedback.lines)
    assert geographic["OUTPUT"].crs().authid() == "EPSG:4326"


def test_step_zero_takes_the_dem_cell_size(provider, plane_dem):
    line = f"LINESTRING({ORIGIN_X + 100} {ORIGIN_Y + 100}, {ORIGIN_X + 1100} {ORIGIN_Y + 100})"
    result = run_profile(line_layer([line]), plane_dem, STEP=0.0)
    chainage = sorted(f["chainage"] for f in result["OUTPUT"].getFeatures())
    np.testing.assert_allclose(np.diff(chainage), 10.0)


def test_multipart_and_curved_lines(provider, plane_dem):
    x, y = ORIGIN_X, ORIGIN_Y
    multi = (
        f"MULTILINESTRING(({x + 100} {y + 100}, {x + 600} {y + 100}),"
        f"({x + 100} {y + 400}, {x + 600} {y + 900}))"
    )
    arc = f"CIRCULARSTRING({x + 1000} {y + 1000}, {x + 1500} {y + 1500}, {x + 2000} {y + 1000})"
    layer = line_layer([multi], names=["M"])
    curved = QgsVectorLayer("CompoundCurve?crs=EPSG:32633&field=name:string", "c", "memory")
    from qgis.core import QgsFeature, QgsGeometry

    feature = QgsFeature(curved.fields())
    feature.setGeometry(QgsGeometry.fromWkt(f"COMPOUNDCURVE({arc})"))
    feature.setAttributes(["arc"])
    curved.dataProvider().addFeatures([feature])
    feedback = LogFeedback()
    result = run_profile(layer, plane_dem, feedback=feedback)
    assert set(by_section(result["OUTPUT"])) == {"M#1", "M#2"}
    assert any("2 parts" in line for line in feedback.lines)
    arc_result = run_profile(curved, plane_dem)
    section = next(arc_result["OUTPUT_SECTION"].getFeatures())
    assert section["length"] == pytest.approx(np.pi * 500.0, rel=1e-3)  # half circle


def test_nodata_gives_null_and_a_gap_in_the_section(provider, tmp_path):
    rows, cols = np.mgrid[0:200, 0:200]
    values = plane(ORIGIN_X + (cols + 0.5) * 10, GT[3] - (rows + 0.5) * 10)
    values[:, 90:110] = -9999.0
    dem = write_raster(tmp_path / "hole.tif", values, GT, 32633, nodata=-9999.0)
    line = f"LINESTRING({ORIGIN_X + 100} {ORIGIN_Y + 1000}, {ORIGIN_X + 1900} {ORIGIN_Y + 1000})"
    result = run_profile(line_layer([line]), dem, STEP=10.0)
    features = by_section(result["OUTPUT"])["L0"]
    nulls = [f["chainage"] for f in features if is_null(f["elev"])]
    assert nulls and min(nulls) >= 795.0 and max(nulls) <= 1105.0
    section = next(result["OUTPUT_SECTION"].getFeatures())
    assert section.geometry().constGet().numGeometries() == 2
    line = next(result["OUTPUT_LINE"].getFeatures()).geometry().constGet()
    assert line.numGeometries() == 2
    assert line.geometryN(0).pointN(line.geometryN(0).numPoints() - 1).m() < min(nulls)
    assert line.geometryN(1).pointN(0).m() > max(nulls)


def test_the_line_is_the_samples_draped_with_chainage_as_m(provider, plane_dem):
    result = run_profile(line_layer([KINKED]), plane_dem)
    samples = by_section(result["OUTPUT"])["L0"]
    line = next(result["OUTPUT_LINE"].getFeatures())
    vertices = list(line.geometry().vertices())
    assert len(vertices) == len(samples)
    for vertex, sample in zip(vertices, samples):
        assert (vertex.x(), vertex.y()) == (sample["x"], sample["y"])
        assert vertex.z() == pytest.approx(sample["elev"], abs=1e-9)
        assert vertex.m() == pytest.approx(sample["chainage"], abs=1e-9)
        # The plane itself, as test_plane_dem_is_reproduced_exactly checks.
        assert vertex.z() == pytest.approx(plane(vertex.x(), vertex.y()), abs=1e-6)
    section = next(result["OUTPUT_SECTION"].getFeatures())
    for name in ("section", "length", "min_elev", "max_elev"):
        assert line[name] == section[name]
    assert line.fields().names() == ["section", "length", "min_elev", "max_elev"]


def test_the_points_are_made_only_when_asked_for(provider, plane_dem):
    parameters = {
        "INPUT": line_layer([KINKED]),
        "LINE_ID_FIELD": "name",
        "DEM": plane_dem,
        "STEP": 25.0,
        "OUTPUT_SECTION": "memory:",
    }
    result = processing.run("sectionwright:profile", parameters)
    assert "OUTPUT" not in result
    assert result["OUTPUT_LINE"].featureCount() == 1  # made although not named


def test_bad_lines_go_to_skipped_with_reasons(provider, plane_dem):
    x, y = ORIGIN_X, ORIGIN_Y
    wkts = [
        KINKED,
        None,
        "MULTILINESTRING EMPTY",
        f"LINESTRING({x + 500} {y + 500}, {x + 500} {y + 500})",
        f"LINESTRING({x - 9000} {y}, {x - 5000} {y})",
    ]
    feedback = LogFeedback()
    result = run_profile(line_layer(wkts), plane_dem, feedback=feedback)
    reasons = {f["section"]: f["reason"] for f in result["SKIPPED"].getFeatures()}
    assert reasons == {
        "L1": "null geometry",
        "L2": "empty geometry",
        "L3": "zero-length line",
        "L4": "no DEM coverage",
    }
    assert set(by_section(result["OUTPUT"])) == {"L0"}
    log = feedback.algorithm_log()
    assert log[-2] == "Summary: read=5 written=1 skipped=4"
    assert log[-1] == (
        "Skipped: empty geometry=1, no DEM coverage=1, null geometry=1, zero-length line=1"
    )


@pytest.mark.parametrize("limit", [("GROUP", 2), ("GROUP_SAMPLES", 100)])
def test_sections_written_in_groups_come_out_as_when_written_at_once(
    provider, plane_dem, monkeypatch, limit
):
    x, y = ORIGIN_X, ORIGIN_Y
    wkts = [
        KINKED,
        f"LINESTRING({x + 200} {y + 300}, {x + 1700} {y + 900})",
        None,
        f"LINESTRING({x + 1500} {y + 100}, {x + 300} {y + 1900})",
        f"LINESTRING({x + 50} {y + 1000}, {x + 1950} {y + 1010}, {x + 1900} {y + 200})",
        f"LINESTRING({x + 900} {y + 50}, {x + 1000} {y + 1950})",
    ]

    def outputs():
        result = run_profile(line_layer(wkts), plane_dem)
        return {
            name: [(f.attributes(), f.geometry().asWkt(6)) for f in result[name].getFeatures()]
            for name in ("OUTPUT_LINE", "OUTPUT_SECTION", "OUTPUT", "SKIPPED")
        }

    at_once = outputs()
    monkeypatch.setattr(profile.ProfileWriter, *limit)
    in_groups = outputs()
    assert in_groups == at_once
    assert [row[0][0] for row in at_once["OUTPUT_LINE"]] == ["L0", "L1", "L3", "L4", "L5"]
    assert [row[0][0] for row in at_once["SKIPPED"]] == ["L2"]


def test_the_outputs_are_opened_while_the_dem_is_being_read(provider, plane_dem, monkeypatch):
    reading = threading.Event()
    elevations = profile.DemSampler.elevations
    open_sinks = profile.ProfileAlgorithm._sinks

    def elevations_reading(self, xy):
        reading.set()
        return elevations(self, xy)

    def sinks_once_reading(self, *args):
        assert reading.wait(10), "the outputs were opened before the DEM was read"
        return open_sinks(self, *args)

    monkeypatch.setattr(profile.DemSampler, "elevations", elevations_reading)
    monkeypatch.setattr(profile.ProfileAlgorithm, "_sinks", sinks_once_reading)
    result = run_profile(line_layer([KINKED]), plane_dem)
    assert result["OUTPUT_LINE"].featureCount() == 1


def test_missing_band_and_non_raster_are_clear_errors(provider, plane_dem, demo_dir):
    with pytest.raises(QgsProcessingException, match="DEM band"):
        run_profile(line_layer([KINKED]), plane_dem, DEM_BAND=5)
    with pytest.raises(QgsProcessingException, match="DEM"):
        run_profile(line_layer([KINKED]), f"{demo_dir}/tarrowgill.gpkg|layername=units")


def test_cancel_stops_between_sections(provider, plane_dem):
    class CancelAfterFirst(LogFeedback):
        def setProgress(self, progress):
            super().setProgress(progress)
            self.cancel()

    lines = line_layer([KINKED] * 5)
    feedback = CancelAfterFirst()
    with pytest.raises(QgsProcessingException, match="Cancelled"):
        run_profile(lines, plane_dem, feedback=feedback)
    assert not any(line.startswith("Section 1:") for line in feedback.lines)


def test_the_input_layer_is_not_modified(provider, demo_dir):
    path = f"{demo_dir}/tarrowgill.gpkg|layername=sections"
    before = [(f.attributes(), f.geometry().asWkt()) for f in QgsVectorLayer(path).getFeatures()]
    run_profile(path, f"{demo_dir}/dem.tif")
    after = [(f.attributes(), f.geometry().asWkt()) for f in QgsVectorLayer(path).getFeatures()]
    assert before == after


def test_output_geometry_types(provider, plane_dem):
    result = run_profile(line_layer([KINKED]), plane_dem)
    assert result["OUTPUT"].wkbType() == POINT_Z
    assert result["OUTPUT_LINE"].wkbType() == MULTI_LINE_STRING_ZM
    assert result["OUTPUT_SECTION"].wkbType() == MULTI_LINE_STRING


def virtual_raster(path):
    """The same raster behind QGIS's own 'virtualraster' provider (not GDAL)."""
    from qgis.core import QgsRasterDataProvider, QgsRasterLayer

    source = QgsRasterLayer(path, "source", "gdal")
    parameters = QgsRasterDataProvider.VirtualRasterParameters()
    parameters.crs = source.crs()
    parameters.extent = source.extent()
    parameters.width = source.width()
    parameters.height = source.height()
    parameters.formula = '"src@1" * 1'
    layer_input = QgsRasterDataProvider.VirtualRasterInputLayers()
    layer_input.name, layer_input.uri, layer_input.provider = "src", path, "gdal"
    parameters.rInputLayers = [layer_input]
    uri = QgsRasterDataProvider.encodeVirtualRasterProviderUri(parameters)
    layer = QgsRasterLayer(uri, "virtual", "virtualraster")
    assert layer.isValid() and layer.providerType() == "virtualraster"
    return layer


def test_a_non_gdal_raster_is_read_through_its_data_provider(provider, plane_dem):
    through_gdal = run_profile(line_layer([KINKED]), plane_dem)
    through_provider = run_profile(line_layer([KINKED]), virtual_raster(plane_dem))
    a = [f["elev"] for f in through_gdal["OUTPUT"].getFeatures()]
    b = [f["elev"] for f in through_provider["OUTPUT"].getFeatures()]
    np.testing.assert_allclose(b, a, atol=1e-9)


def test_step_zero_on_a_geographic_dem_is_its_cell_size_in_metres(provider, tmp_path):
    # Reference: pyproj's Geod (WGS 84 ellipsoid) for the east-west size of a
    # 0.0001° cell at the DEM's latitude; UTM grid distance differs from the
    # geodesic one by the scale factor (< 0.1 % here).
    from pyproj import Geod

    lon0, lat0 = 14.05, 46.30
    gt = (lon0, 0.0001, 0.0, lat0 + 0.02, 0.0, -0.0001)
    dem = plane_raster(tmp_path / "geo.tif", lambda x, y: 500.0 + 0 * x, gt, (200, 200), 4326)
    to_utm = Transformer.from_crs(4326, 32633, always_xy=True)
    (x0, x1), (y0, y1) = to_utm.transform([lon0 + 0.004, lon0 + 0.014], [lat0 + 0.01] * 2)
    result = run_profile(line_layer([f"LINESTRING({x0} {y0}, {x1} {y1})"]), dem, STEP=0.0)
    chainage = sorted(f["chainage"] for f in result["OUTPUT"].getFeatures())
    east_west = Geod(ellps="WGS84").inv(lon0, lat0 + 0.01, lon0 + 0.0001, lat0 + 0.01)[2]
    assert np.median(np.diff(chainage)) == pytest.approx(east_west, rel=2e-3)
    assert all(f["elev"] == pytest.approx(500.0) for f in result["OUTPUT"].getFeatures())


def test_runs_as_a_step_of_a_graphical_model(provider, plane_dem):
    # The modeler: a model whose only child is sectionwright:profile.
    from qgis.core import (
        QgsProcessingModelAlgorithm,
        QgsProcessingModelChildAlgorithm,
        QgsProcessingModelChildParameterSource,
        QgsProcessingModelOutput,
        QgsProcessingModelParameter,
        QgsProcessingParameterFeatureSource,
        QgsProcessingParameterRasterLayer,
    )

    model = QgsProcessingModelAlgorithm("sections", "tests")
    model.addModelParameter(
        QgsProcessingParameterFeatureSource("lines", "lines"), QgsProcessingModelParameter("lines")
    )
    model.addModelParameter(
        QgsProcessingParameterRasterLayer("dem", "dem"), QgsProcessingModelParameter("dem")
    )
    child = QgsProcessingModelChildAlgorithm("sectionwright:profile")
    child.setChildId("profile")
    child.addParameterSources(
        "INPUT", [QgsProcessingModelChildParameterSource.fromModelParameter("lines")]
    )
    child.addParameterSources(
        "DEM", [QgsProcessingModelChildParameterSource.fromModelParameter("dem")]
    )
    child.addParameterSources(
        "STEP", [QgsProcessingModelChildParameterSource.fromStaticValue(50.0)]
    )
    output = QgsProcessingModelOutput("profile_section")
    output.setChildOutputName("OUTPUT_SECTION")
    child.setModelOutputs({"profile_section": output})
    model.addChildAlgorithm(child)
    result = processing.run(
        model,
        {"lines": line_layer([KINKED]), "dem": plane_dem, "profile:profile_section": "memory:"},
    )
    layer = result["profile:profile_section"]
    layer = QgsVectorLayer(layer) if isinstance(layer, str) else layer
    assert layer.featureCount() == 1


def test_a_vrt_mosaic_of_tiles_is_one_dem(provider, tmp_path):
    # Source: GDAL's BuildVRT mosaics two plane tiles (west and east halves)
    # into one virtual raster; the profile across the seam is the plane.
    west = plane_raster(tmp_path / "west.tif", plane, GT, (200, 100), 32633)
    east_gt = (GT[0] + 1000.0,) + GT[1:]
    east = plane_raster(tmp_path / "east.tif", plane, east_gt, (200, 100), 32633)
    mosaic = str(tmp_path / "mosaic.vrt")
    gdal.BuildVRT(mosaic, [west, east]).FlushCache()
    line = f"LINESTRING({ORIGIN_X + 200} {ORIGIN_Y + 500}, {ORIGIN_X + 1800} {ORIGIN_Y + 900})"
    result = run_profile(line_layer([line]), mosaic, STEP=10.0)
    features = list(result["OUTPUT"].getFeatures())
    assert len(features) > 150
    for feature in features:
        assert feature["elev"] == pytest.approx(plane(feature["x"], feature["y"]), abs=1e-6)


def test_a_striped_untiled_dem_reads_the_same(provider, tmp_path):
    # DEMs arrive tiled or in strips (GDAL blocks of whole rows): the reader
    # follows the raster's own blocks either way.
    striped = plane_raster(tmp_path / "striped.tif", plane, GT, (200, 200), 32633, options=())
    result = run_profile(line_layer([KINKED]), striped)
    for feature in result["OUTPUT"].getFeatures():
        assert feature["elev"] == pytest.approx(plane(feature["x"], feature["y"]), abs=1e-6)
