"""The compatibility module picks each spelling by the release, both ways."""

import importlib.util
from pathlib import Path

import pytest
from qgis.core import Qgis, QgsField
from qgis_names import patched_aliases

from sectionwright.algorithms.compat import qgis_compat
from sectionwright.algorithms.compat.qgis_compat import _scoped as scoped
from sectionwright.algorithms.compat.qgis_compat import field_types

COMPAT_FILE = Path(qgis_compat.__file__)


def test_field_types_are_qvariant_before_3_38_and_qmetatype_from_it():
    # Qt documentation, QMetaType::Type: Double = 6, LongLong = 4, QString = 10
    # (QVariant::Type uses the same numbers).
    old, new = field_types(32200), field_types(33800)
    assert [int(t) for t in old] == [int(t) for t in new] == [6, 4, 10]
    assert {type(t).__qualname__ for t in old} == {"QVariant.Type"}
    assert {type(t).__qualname__ for t in new} == {"QMetaType.Type"}


def test_this_release_gets_field_types_it_takes():
    # On 3.38+ a QVariant type is a deprecated constructor: the 3.44 leg fails on it.
    assert QgsField("dip", qgis_compat.DOUBLE).isNumeric()
    assert QgsField("fid", qgis_compat.LONG).isNumeric()
    assert not QgsField("unit", qgis_compat.STRING).isNumeric()
    assert (qgis_compat.DOUBLE, qgis_compat.LONG, qgis_compat.STRING) == field_types()


def test_qaction_comes_from_where_this_qgis_has_it(qgis_app):
    action = qgis_compat.QAction("Sections")
    assert action.text() == "Sections"
    assert type(action).__module__.rsplit(".", 1)[-1] in ("QtGui", "QtWidgets")


class _Scope:
    PointZ = "scoped PointZ"


class _WithScope:
    WkbType = _Scope


class _WithoutScope:
    pass


def test_scoped_takes_the_new_spelling_without_looking_up_the_old_one():
    assert scoped("WkbType", "PointZ", "NoSuchClass.PointZ", _WithScope) == "scoped PointZ"


def test_scoped_falls_back_to_the_old_spelling_where_qgis_lacks_the_scope():
    old_spelling = scoped("WkbType", "PointZ", "QgsWkbTypes.PointZ", _WithoutScope)
    assert old_spelling == qgis_compat.POINT_Z


@pytest.mark.skipif(
    Qgis.QGIS_VERSION_INT < 33000, reason="QGIS patches the old names in from 3.30 on"
)
def test_compat_loads_without_the_old_names_qgis_patches_in(monkeypatch):
    aliases = patched_aliases()
    assert aliases, "found none of the aliases QGIS 3.30+ patches in"
    for owner, name in aliases:
        monkeypatch.delattr(owner, name)
    assert all(not hasattr(owner, name) for owner, name in aliases)
    spec = importlib.util.spec_from_file_location("compat_without_aliases", COMPAT_FILE)
    fresh = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(fresh)
    names = [n for n in vars(qgis_compat) if n.isupper()]
    assert {n: getattr(fresh, n) for n in names} == {n: getattr(qgis_compat, n) for n in names}
