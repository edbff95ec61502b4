"""DEVELOPERS.md's layout names every module of the plugin, file for file."""

import re
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def _layout_block():
    text = (ROOT / "DEVELOPERS.md").read_text(encoding="utf-8")
    section = text.split("## Layout", 1)[1]
    return re.search(r"```\n(.*?)```", section, flags=re.S).group(1)


def _plugin_files():
    for folder in ("algorithms", "plugin"):
        for path in sorted((ROOT / folder).rglob("*")):
            if path.is_file() and "__pycache__" not in path.parts and path.suffix != ".pyc":
                yield path


def test_every_module_and_folder_is_in_the_layout():
    block = _layout_block()
    listed = set(re.findall(r"[\w.-]+", block))
    missing = []
    for path in _plugin_files():
        relative = path.relative_to(ROOT)
        folders = [f"{part}/" for part in relative.parts[:-1]]
        if any(f not in block for f in folders):
            missing.append(str(relative))
        elif path.name == "__init__.py":
            continue
        elif path.parent.name == "algorithms" and path.suffix in (".py", ".html"):
            if path.stem not in listed:  # algorithms are listed by id
                missing.append(str(relative))
        elif path.name not in listed:
            missing.append(str(relative))
    assert missing == []
