"""An installed wheel carries the files the program reads at run time (icons, the JSON Schema)
and finds them where it is installed, not in the project folder."""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
import textwrap
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
# the files a wheel is built from (the tests, the demo data and the README pictures stay out)
_BUILD_FROM = ("pyproject.toml", "README.md", "engine", "desktop")
# a message of pip's when the build requirements cannot be fetched (no network, no index)
_CANNOT_FETCH = ("No matching distribution found", "Could not find a version that satisfies")


def _local_setuptools_builds() -> bool:
    """The interpreter's own setuptools meets the build requirement (so no download is needed)."""
    import tomllib

    from packaging.requirements import Requirement

    try:
        from importlib.metadata import version

        installed = version("setuptools")
    except Exception:  # noqa: BLE001 - not installed
        return False
    requires = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))["build-system"]["requires"]
    return all(Requirement(r).name != "setuptools" or Requirement(r).specifier.contains(installed)
               for r in requires)


@pytest.fixture(scope="module")
def wheel(tmp_path_factory) -> Path:
    """A wheel built from a copy of the project's sources."""
    work = tmp_path_factory.mktemp("wheel")
    source = work / "source"
    source.mkdir()
    for name in _BUILD_FROM:
        origin = ROOT / name
        if origin.is_dir():
            shutil.copytree(origin, source / name, ignore=shutil.ignore_patterns("__pycache__", "*.pyc"))
        else:
            shutil.copy2(origin, source / name)
    command = [sys.executable, "-m", "pip", "wheel", "--no-deps", "--no-cache-dir", "--quiet",
               str(source), "-w", str(work / "dist")]
    if _local_setuptools_builds():
        command.insert(4, "--no-build-isolation")  # builds offline with what is installed
    done = subprocess.run(command, capture_output=True, text=True, timeout=300)
    if done.returncode != 0:
        if any(sign in done.stderr for sign in _CANNOT_FETCH):
            pytest.skip("the build requirement (setuptools>=77) is not installed here and pip "
                        "could not fetch it: " + done.stderr.strip().splitlines()[-1])
        pytest.fail(f"the wheel did not build:\n{done.stdout}\n{done.stderr}")
    (built,) = (work / "dist").glob("twofold-*.whl")
    return built


def test_the_wheel_holds_every_icon_and_the_json_schema(wheel):
    from desktop.artwork import NAMES

    names = set(zipfile.ZipFile(wheel).namelist())
    for name in NAMES:
        assert f"desktop/artwork/{name}.svg" in names
    assert "engine/schema/analysis.schema.json" in names


def test_an_installed_wheel_finds_its_icons_and_schema_where_it_is_installed(wheel, tmp_path):
    site = tmp_path / "site"
    subprocess.run([sys.executable, "-m", "pip", "install", "--no-deps", "--no-index", "--quiet",
                    "--target", str(site), str(wheel)], check=True, capture_output=True, timeout=300)
    probe = textwrap.dedent("""
        import sys
        from pathlib import Path
        from PySide6.QtGui import QGuiApplication
        import desktop, engine
        from desktop.artwork import NAMES, svg_file
        from desktop.desktop_entry import linux_files
        from desktop.icons import icon
        from engine.jsonout import analysis_schema

        site = Path(sys.argv[1]).resolve()
        for package in (desktop, engine):
            assert Path(package.__file__).resolve().is_relative_to(site), package.__file__
        app = QGuiApplication([])
        for name in NAMES:
            path = Path(str(svg_file(name)))
            assert path.resolve().is_relative_to(site) and path.is_file(), path
            assert not icon(name).pixmap(32, 32).isNull(), name
        shipped = svg_file("app").read_text(encoding="utf-8")
        assert linux_files(["twofold"])["icons/hicolor/scalable/apps/twofold.svg"] == shipped
        assert "schema_version" in analysis_schema()["required"]
        print("found")
    """)
    # the installed copy comes first on the path, and the project folder is not the working folder
    env = dict(os.environ, PYTHONPATH=str(site), QT_QPA_PLATFORM="offscreen")
    done = subprocess.run([sys.executable, "-c", probe, str(site)], cwd=tmp_path, env=env,
                          capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == "found"
