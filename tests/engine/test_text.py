"""Text from a file is data: control and direction characters never reach a terminal or a page raw."""

from __future__ import annotations

import os
import subprocess
import sys
import unicodedata
from pathlib import Path

import numpy as np
import pytest

from engine import io
from engine.spec import AnalysisSpec
from engine.analysis import analyze
from engine.errors import DataProblem
from engine.report import render
from engine.text import visible, visible_html

ROOT = Path(__file__).resolve().parents[2]

# reference: Unicode Standard Annex #9 (Bidirectional Algorithm), table 4 "Explicit directional
# formatting characters" and the implicit marks ALM, LRM, RLM; ECMA-48 for the C0 and C1 controls
# (ESC ] ... BEL sets a terminal's title, CSI 2 K erases its line; 0x9b is CSI as one C1 byte);
# the Unicode Standard, chapter 5.8, for the line-breaking characters NEL, LS and PS.
BIDI = ["\u061c", "\u200e", "\u200f", "\u202a", "\u202b", "\u202c", "\u202d", "\u202e",
        "\u2066", "\u2067", "\u2068", "\u2069"]
LINE_BREAKS = ["\n", "\r", "\x0b", "\x0c", "\x85", "\u2028", "\u2029"]
TERMINAL = ["\x1b]0;taken over\x07", "\x1b[2K", "\x9b2K", "\x08", "\x7f", "\x00"]
HOSTILE = BIDI + LINE_BREAKS + TERMINAL


def raw_controls(text: str) -> list[str]:
    """Every character of ``text``, other than the line feeds between its lines, that a terminal
    or a renderer would act on rather than show (C0/C1 controls, DEL, line and paragraph
    separators, and the bidirectional formatting characters listed above)."""
    return [f"U+{ord(ch):04X}" for ch in text
            if ch != "\n" and (unicodedata.category(ch) in ("Cc", "Zl", "Zp") or ch in BIDI)]


@pytest.mark.parametrize("hostile", HOSTILE, ids=[f"U+{ord(h[0]):04X}" for h in HOSTILE])
def test_visible_writes_every_control_and_direction_character_as_an_escape(hostile):
    text = visible(f"north{hostile}side")
    assert raw_controls(text) == [] and "\n" not in text
    assert text.startswith("north") and text.endswith("side")
    assert "\\" in text  # shown as an escape, not dropped


def test_visible_names_the_usual_escapes():
    assert visible("a\nb\r\nc\td") == "a\\nb\\nc\\td"
    assert visible("\x1b[2K") == "\\x1b[2K"
    assert visible("r\u202eo") == "r\\u202eo"
    assert visible("n\x85l") == "n\\x85l"
    assert visible("\U000e0041") == "\\U000e0041"  # a tag character, invisible in most fonts


def test_visible_leaves_the_letters_of_every_script_alone():
    # Arabic and Hebrew letters carry their own direction; the joiners shape Indic and Persian
    # words and emoji sequences; none of them can reorder the text around them.
    for text in ("مزرعة شمالية", "שדה צפוני", "北の畑", "क्षेत्र", "می\u200cخواهم", "👩\u200d🔬", "Ärger, Øre"):
        assert visible(text) == text
    assert visible(visible("a\x1bb\u202ec")) == visible("a\x1bb\u202ec")


def test_visible_html_is_text_not_markup():
    assert visible_html("<b>x</b> & \u202e") == "&lt;b&gt;x&lt;/b&gt; &amp; \\u202e"


def test_error_messages_escape_what_they_quote():
    problem = DataProblem("Group 'a\x1b]0;x\x07\u2028b\u202e' has 1 usable value.")
    assert raw_controls(problem.message) == [] and "\n" not in problem.message
    assert "a\\x1b]0;x\\x07\\u2028b\\u202e" in problem.message


def _label(stem: str, pieces: list[str]) -> str:
    return stem + "".join(pieces)


def _wide_file(path: Path, rng) -> tuple[str, str]:
    """Two columns named with every hostile character (a header holds few of them, so the
    file still reads as text); the names are the group labels of a wide layout."""
    pieces = [h for h in HOSTILE if h != "\x00"]  # a zero byte marks a binary file
    first, second = _label("north", pieces), _label("south", pieces[::-1])
    lines = ['"' + first + '","' + second + '"']
    lines += [f"{a:.3f},{b:.3f}" for a, b in zip(rng.normal(10, 1, 40), rng.normal(11, 1, 40))]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8", newline="")
    return first, second


def _long_file(path: Path, rng, *, lone: bool = False) -> tuple[str, str]:
    """Group labels in the cells with the line-breaking, C1 and direction characters (the C0 ones
    are in the header: many of them in the rows would make the file read as binary)."""
    cells = BIDI + ["\x85", "\u2028", "\u2029", "\x9b2K"]
    first, second = _label("east", cells), _label("west", cells[::-1])
    lines = ['"plot\x1b]0;taken over\x07\x0b\x0c","yield\x1b[2K\u202e"']
    lines += [f'"{first}",{v:.3f}' for v in rng.normal(10, 1, 1 if lone else 30)]
    lines += [f'"{second}",{v:.3f}' for v in rng.normal(11, 1, 30)]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8", newline="")
    return first, second


def _read_labels(path: Path) -> tuple[str, ...]:
    """The group labels as the reader takes them from ``path`` (it tidies a header's breaks)."""
    table = io.read_table(path)
    proposal = io.propose_layout(table)
    values = proposal.value_columns[0] if proposal.layout == "long" else tuple(proposal.value_columns[:2])
    return io.make_groups(table, values=values, group=proposal.group_column).groups.labels


def _command(*argv: str) -> subprocess.CompletedProcess:
    environment = dict(os.environ, PYTHONIOENCODING="utf-8")
    return subprocess.run([sys.executable, "-m", "engine", *argv], cwd=ROOT, capture_output=True,
                          timeout=300, env=environment)


def _decoded(stream: bytes) -> str:
    return stream.decode("utf-8")  # a lone surrogate or a broken byte would fail here


def test_the_command_prints_no_raw_control_character(tmp_path):
    rng = np.random.default_rng(8)
    wide, long_ = tmp_path / "wide.csv", tmp_path / "long.csv"
    _wide_file(wide, rng)
    _long_file(long_, rng)
    wide_labels, long_labels = _read_labels(wide), _read_labels(long_)
    assert all("\u202e" in label and "\x1b" in label for label in wide_labels)
    assert all("\u202e" in label and "\u2028" in label for label in long_labels)
    runs = {
        "wide": (_command("analyze", str(wide), "--resamples", "200", "--seed", "1"), wide_labels),
        "long": (_command("analyze", str(long_), "--resamples", "200", "--seed", "1"), long_labels),
        "columns": (_command("columns", str(long_)), ()),
    }
    for name, (done, labels) in runs.items():
        out, err = _decoded(done.stdout), _decoded(done.stderr)
        assert done.returncode == 0, (name, err)
        assert err == ""
        assert raw_controls(out) == [], name
        for label in labels:
            assert visible(label) in out  # every label is there, escaped, not dropped
    listed = _decoded(runs["columns"][0].stdout)
    assert "plot\\x1b]0;taken over\\x07" in listed and "yield\\x1b[2K\\u202e" in listed


def test_an_error_that_quotes_a_label_is_one_clean_line(tmp_path):
    path = tmp_path / "lone.csv"
    first, _ = _long_file(path, np.random.default_rng(9), lone=True)
    done = _command("analyze", str(path))
    err = _decoded(done.stderr)
    assert done.returncode == 2 and done.stdout == b""
    assert err.endswith("\n") and err.count("\n") == 1
    assert raw_controls(err) == []
    assert visible(first) in err  # the group that has too few values is named


def test_the_report_escapes_labels_in_plain_text_and_html(tmp_path):
    path = tmp_path / "long.csv"
    first, second = _long_file(path, np.random.default_rng(10))
    table = io.read_table(path)
    proposal = io.propose_layout(table)
    intake = io.make_groups(table, values=proposal.value_columns[0], group=proposal.group_column)
    assert set(intake.groups.labels) == {first, second}  # the data keep the labels as they are
    analysis = analyze(intake.groups, AnalysisSpec(resamples=200, seed=1), screening=intake.screening,
                       source={"file": path.name, "group_column": proposal.group_column,
                               "value_columns": list(proposal.value_columns[:1])})
    text = render(analysis)
    for version in (text.paragraph, text.plain, text.html):
        assert raw_controls(version) == []
    assert visible(first) in text.plain and visible(second) in text.plain
    assert visible(first) in text.html
    assert "\n" not in text.paragraph
