import pytest
from installed_plugin import install_into_profile


@pytest.fixture(scope="module")
def profile(tmp_path_factory):
    """A throwaway QGIS profile with the zip unpacked into its plugins folder,
    as "Install from ZIP" does."""
    return install_into_profile(tmp_path_factory.mktemp("profile"))
