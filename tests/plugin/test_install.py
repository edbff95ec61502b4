"""The plugin zip installs into a throwaway profile and loads as QGIS loads it."""

from installed_plugin import load


def test_zip_installs_and_registers_the_provider(profile):
    report = load(profile)
    assert report["available"] and report["started"]
    assert report["provider"] == "Sectionwright"
    assert report["algorithms"] == [
        "sectionwright:dipdomains",
        "sectionwright:formlines",
        "sectionwright:geologycrossings",
        "sectionwright:normalizeattitudes",
        "sectionwright:profile",
        "sectionwright:projectattitudes",
        "sectionwright:projectboreholes",
        "sectionwright:sectionsheet",
        "sectionwright:sectionsin3d",
        "sectionwright:structuraltrend",
    ]
    assert report["unloaded"]


def test_missing_shapely_gives_install_advice_not_a_traceback(profile):
    report = load(profile, "--without", "shapely")
    assert report["started"]
    assert report["provider"] is None
    advice = [m for tag, m in report["messages"] if tag == "Sectionwright"]
    assert advice and "shapely>=2.0" in advice[0] and "pip install" in advice[0]
    assert not any("Traceback" in m for _, m in report["messages"])
