import processing
from qgis.core import QgsVectorLayer

def test_demo(provider, demo_dir, tmp_path):
    out = processing.run("sectionwright:profile", {
        "INPUT": f"{demo_dir}/tarrowgill.gpkg|layername=sections", "LINE_ID_FIELD": "name",
        "DEM": f"{demo_dir}/dem.tif", "STEP": 0, "OUTPUT": "memory:", "OUTPUT_SECTION": str(tmp_path/"s.gpkg"),
        "SKIPPED": "memory:"})
    l = QgsVectorLayer(out["OUTPUT_SECTION"])
    print(l.crs().isValid(), l.crs().toWkt())
    print(out["OUTPUT"].crs().authid())
