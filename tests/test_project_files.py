"""The project's own files agree with the program: package metadata, the README's promises."""

from __future__ import annotations

import re
import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def _pyproject() -> dict:
    return tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))


def test_the_licence_is_an_spdx_expression_the_build_tool_reads_without_a_warning():
    project = _pyproject()
    # reference: PEP 639 and the Python Packaging User Guide ("Writing your pyproject.toml",
    # license): a string holding an SPDX expression; the table form is deprecated and setuptools
    # prints a page about it on every build. setuptools reads the string form from 77.0.
    assert project["project"]["license"] == "MIT"
    requires = project["build-system"]["requires"]
    setuptools = [r for r in requires if re.match(r"setuptools\b", r)]
    assert len(setuptools) == 1
    from packaging.requirements import Requirement

    assert "76.9" not in Requirement(setuptools[0]).specifier
    assert "77.0" in Requirement(setuptools[0]).specifier


def test_the_readme_names_every_file_type_the_desktop_entry_offers():
    from desktop.desktop_entry import FILE_TYPES

    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    section = readme.split("## Opening data files with a double-click", 1)[1].split("\n## ", 1)[0]
    linux = section.split("- **Windows**", 1)[0]
    named = set(re.findall(r"\.(?:csv|tsv|txt|xlsx|xls|ods|twofold)\b", linux))
    assert named == set(FILE_TYPES)
    assert "xdg-utils" in section and "mimeapps.list" in section  # the way without xdg-mime
