"""The exported report: a self-contained HTML page and a PDF with the file's record and choices."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import hashlib  # noqa: E402
import re  # noqa: E402
from datetime import datetime, timezone  # noqa: E402
from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402
import pytest  # noqa: E402

from engine import pipeline, report  # noqa: E402
from engine.spec import AnalysisSpec  # noqa: E402
from engine.errors import FileProblem  # noqa: E402
from engine.session import Session  # noqa: E402
from desktop import export  # noqa: E402
from desktop.findings_panel import FindingsPanel  # noqa: E402


@pytest.fixture
def data_file(tmp_path) -> Path:
    rng = np.random.default_rng(5)
    lines = ["coating,hours"]
    lines += [f"wax,{v:.2f}" for v in rng.normal(140, 12, 18)]
    lines += [f"resin,{v:.2f}" for v in rng.normal(128, 15, 20)]
    lines[4] = "wax,"                # a blank measurement
    lines[9] = "wax,about 150"       # words where a number belongs
    path = tmp_path / "coating_hours.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


@pytest.fixture
def panel(qtbot, data_file):
    spec = AnalysisSpec(source=pipeline.source_for(data_file), group_column="coating", value_columns=("hours",),
                        groups=("wax", "resin"), resamples=300, seed=11)
    session = Session(spec)
    table = pipeline.read(spec)
    set_aside = pipeline.set_aside_cells(table, {(20, "hours"): "gauge dropped before this reading"})
    session.choose(set_aside=set_aside)
    intake = pipeline.form_groups(table, session.spec)
    session.store("table", table)
    session.store("intake", intake)
    session.store("analysis", pipeline.run(intake, session.spec))
    widget = FindingsPanel(session)
    qtbot.addWidget(widget)
    widget.resize(800, 700)
    yield widget
    widget.cleanup()


def test_html_report_is_self_contained_and_records_the_file(panel, data_file, tmp_path):
    path = panel.export_report(tmp_path / "report.html")
    text = path.read_text(encoding="utf-8")
    # reference: hashlib.sha256 of the file's bytes
    assert hashlib.sha256(data_file.read_bytes()).hexdigest() in text
    assert "coating_hours.csv" in text
    assert datetime.now().astimezone().strftime("%Y-%m-%d") in text
    assert "95%" in text and "Welch" in text
    # every picture is inside the page; nothing is fetched from elsewhere
    sources = re.findall(r"src='([^']*)'", text) + re.findall(r'src="([^"]*)"', text)
    assert len(sources) == 2 and all(s.startswith("data:image/png;base64,") for s in sources)
    assert "<table" in text
    assert report.render(panel.session.analysis).html in text


def test_values_set_aside_and_left_out_are_listed(panel, tmp_path):
    screening = panel.session.analysis.screening
    rows = export.set_aside_rows(panel.session.analysis)
    assert len(rows) == sum(screening.excluded_counts.values()) >= 3
    text = panel.export_report(tmp_path / "report.html").read_text(encoding="utf-8")
    assert "gauge dropped before this reading" in text
    assert "about 150" in text
    assert "not a number" in text and "empty or marked as missing" in text


def test_pdf_report_is_written_by_qt(panel, tmp_path):
    path = panel.export_report(tmp_path / "report.pdf")
    data = path.read_bytes()
    # the PDF file structure: a header and an end-of-file marker (ISO 32000-1, 7.5)
    assert data.startswith(b"%PDF-") and data.rstrip().endswith(b"%%EOF")
    assert len(data) > 5_000


def test_refuses_other_suffixes_and_reports_write_failures(panel, tmp_path):
    with pytest.raises(FileProblem, match=r"\.html or \.pdf"):
        panel.export_report(tmp_path / "report.docx")
    with pytest.raises(FileProblem, match="Could not write the report"):
        panel.export_report(tmp_path / "missing folder" / "report.html")
    with pytest.raises(FileProblem, match="Could not write the report"):
        panel.export_report(tmp_path / "missing folder" / "report.pdf")


def test_choice_rows_name_the_decisions(panel):
    analysis = panel.session.analysis
    rows = dict(export.choice_rows(analysis, procedure="pooled_t"))
    assert rows["Confidence level"] == "95%"
    assert "picked by the user" in rows["Procedure followed"]
    assert rows["Question"] == export.direction_text("two-sided")
    assert export.level_text(0.975) == "97.5%"
    # the seed the analysis ran with, so that a reader can repeat the resampled numbers
    assert rows["Random seed"].startswith("11 ") and analysis.spec.seed == 11


def test_report_date_is_the_one_given(panel):
    when = datetime(2026, 3, 4, 5, 6, tzinfo=timezone.utc)
    analysis = panel.session.analysis
    page = export.report_html(analysis, procedure="welch_t",
                              findings_html="<p>x</p>", cautions=["be careful"], when=when)
    assert "2026-03-04 05:06 UTC" in page and "<li>be careful</li>" in page


def test_the_checksum_is_named_and_set_to_copy_back_exactly(panel, data_file, tmp_path):
    text = panel.export_report(tmp_path / "report.html").read_text(encoding="utf-8")
    digest = hashlib.sha256(data_file.read_bytes()).hexdigest()  # reference: hashlib
    cell = re.search(r"<td([^>]*)>" + digest + "</td>", text)
    assert cell is not None
    # one line, monospace (no ligatures such as "ff" to break a copy), the algorithm named
    assert "nowrap" in cell.group(1) and "monospace" in cell.group(1)
    assert "SHA-256" in text


def test_pdf_pictures_fill_the_text_width_and_no_page_is_left_empty(panel, tmp_path, qapp):
    from PySide6.QtGui import QPdfWriter

    analysis = panel.session.analysis
    key = panel.procedure_key()
    from desktop.findings_panel import _report_images

    images = _report_images(analysis, key)
    width = export.pdf_text_width()
    html = export.report_html(analysis, procedure=key,
                              findings_html=report.render(analysis, procedure=key).html,
                              cautions=panel.cautions_list(), images=images, embed_images=False,
                              image_width=width)
    # every picture as wide as the text, its caption in a paragraph of its own
    assert [round(float(w)) for w in re.findall(r"<img [^>]*width='(\d+)'", html)] == [round(width)] * 2
    assert not re.search(r"<img[^>]*><br>", html)
    writer = QPdfWriter(str(tmp_path / "layout.pdf"))
    export._pdf_page_setup(writer)
    document = export.pdf_document(html, images, writer)
    layout = document.documentLayout()
    page = document.pageSize().height()
    last = document.lastBlock()
    while last.isValid() and not last.text().strip():
        last = last.previous()
    bottom = layout.blockBoundingRect(last).bottom()
    # the last page holds the last words (an empty block would have opened a page of its own)
    assert document.pageCount() == int(bottom // page) + 1


@pytest.mark.skipif(not __import__("shutil").which("pdftotext"), reason="needs pdftotext (poppler-utils)")
def test_the_checksum_copied_out_of_the_pdf_is_the_files(panel, data_file, tmp_path):
    import subprocess

    path = panel.export_report(tmp_path / "report.pdf")
    text = subprocess.run(["pdftotext", str(path), "-"], capture_output=True, text=True, check=True).stdout
    # reference: hashlib.sha256 of the file's bytes, found whole on one line of the PDF's text
    assert hashlib.sha256(data_file.read_bytes()).hexdigest() in text.splitlines()
    pages = text.split("\f")[:-1]  # each page ends with a form feed
    assert pages and all(page.strip() for page in pages)  # no blank page


def test_report_table_rows_stay_whole_and_hold_no_stray_text(panel, tmp_path):
    # a word processor opening the page splits a row across pages, and may show text between
    # rows as a row of its own; checked by eye in LibreOffice Writer 7.4 (HTML import, to PDF)
    from html.parser import HTMLParser

    class Rows(HTMLParser):
        def __init__(self):
            super().__init__()
            self.stack, self.rows, self.stray = [], [], []

        def handle_starttag(self, tag, attrs):
            if tag == "tr":
                self.rows.append(dict(attrs).get("style", ""))
            if tag not in ("img", "br"):
                self.stack.append(tag)

        def handle_endtag(self, tag):
            while self.stack and self.stack.pop() != tag:
                pass

        def handle_data(self, data):
            if self.stack and self.stack[-1] in ("table", "tr", "thead", "tbody"):
                self.stray.append(data)

    parser = Rows()
    parser.feed(panel.export_report(tmp_path / "report.html").read_text(encoding="utf-8"))
    assert len(parser.rows) > 20
    assert all("page-break-inside: avoid" in style for style in parser.rows)
    assert not [text for text in parser.stray if text.strip() or text]
