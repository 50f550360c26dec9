"""The exported report: a self-contained HTML page and a PDF with the file's record and choices."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import hashlib  # noqa: E402
import html  # noqa: E402
import re  # noqa: E402
from datetime import datetime, timezone  # noqa: E402
from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402
import pytest  # noqa: E402

from engine import pipeline, report  # noqa: E402
from engine.report import document, tables  # noqa: E402
from engine.report.findings import findings_blocks  # noqa: E402
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
    # the findings as the report words them, then the cautions
    findings = tables.html(findings_blocks(panel.session.analysis))
    assert findings in text
    assert text.index(findings) < text.index(html.escape(report.cautions(panel.session.analysis)[0], quote=False))


def test_values_set_aside_and_left_out_are_listed(panel, tmp_path):
    screening = panel.session.analysis.screening
    rows = document.set_aside_rows(panel.session.analysis)
    assert len(rows) == sum(screening.excluded_counts.values()) >= 3
    text = panel.export_report(tmp_path / "report.html").read_text(encoding="utf-8")
    assert "gauge dropped before this reading" in text
    assert "about 150" in text
    assert "not a number" in text and "blank or marked as missing" in text


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
    rows = dict(document.choice_rows(analysis, procedure="pooled_t"))
    assert rows["Confidence level"] == "95%"
    assert "picked by the user" in rows["Procedure followed"]
    assert rows["Question"] == "Do wax and resin differ?"
    assert report.level_text(0.975) == "97.5%"


def test_report_date_is_the_one_given(panel):
    when = datetime(2026, 3, 4, 5, 6, tzinfo=timezone.utc)
    analysis = panel.session.analysis
    page = export.report_html(analysis, procedure="welch_t", when=when)
    assert "2026-03-04 05:06 UTC" in page
    assert f"<li>{html.escape(report.cautions(analysis)[-1], quote=False)}</li>" in page


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
    page = export.report_html(analysis, procedure=key, images=images, embed_images=False, image_width=width)
    # every picture as wide as the text, its caption in a paragraph of its own
    assert [round(float(w)) for w in re.findall(r"<img [^>]*width='(\d+)'", page)] == [round(width)] * 2
    assert not re.search(r"<img[^>]*><br>", page)
    writer = QPdfWriter(str(tmp_path / "layout.pdf"))
    export._pdf_page_setup(writer)
    pdf = export.pdf_document(page, images, writer)
    layout = pdf.documentLayout()
    height = pdf.pageSize().height()
    last = pdf.lastBlock()
    while last.isValid() and not last.text().strip():
        last = last.previous()
    bottom = layout.blockBoundingRect(last).bottom()
    # the last page holds the last words (an empty block would have opened a page of its own)
    assert pdf.pageCount() == int(bottom // height) + 1


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


def test_the_window_writes_the_engines_page(panel, tmp_path):
    analysis = panel.session.analysis
    written = panel.export_report(tmp_path / "report.html").read_text(encoding="utf-8")
    # the two plots are the window's own; everything else is the engine's page, word for word
    pictures = re.findall(r"<p style='line-height: 100%; [^']*'><img .*?</i></p>", written)
    assert len(pictures) == 2
    for picture in pictures:
        written = written.replace(picture, "")
    stamp = re.compile(r"<p>Written on [^<]*</p>")  # the minute it was written
    assert stamp.sub("", written) == stamp.sub("", document.html(analysis, panel.procedure_key()))


def test_the_window_shows_the_cautions_and_the_question_of_the_report(panel, qtbot):
    from desktop.setup_panel import SetupPanel

    from engine.text import visible_html

    analysis = panel.session.analysis
    panel.refresh()
    shown = panel.cautions.text()
    assert panel.cautions_list() == report.cautions(analysis)
    assert all(f"<li>{visible_html(caution)}</li>" in shown for caution in report.cautions(analysis))
    setup = SetupPanel(panel.session)
    qtbot.addWidget(setup)
    asked = [setup.question.itemText(i) for i in range(setup.question.count())]
    assert dict(document.choice_rows(analysis))["Question"] in asked
    assert report.level_text(analysis.spec.level) in panel.table.horizontalHeaderItem(2).text()
    setup.cleanup()


@pytest.mark.parametrize("key", ["welch_t", "permutation_mean"])
def test_the_window_names_a_result_as_the_report_does(panel, key):
    analysis = panel.session.analysis
    panel.session.choose(procedure=key)
    panel.refresh()
    names = [panel.table.item(r, 0).text() for r in range(panel.table.rowCount())]
    plain = report.render(analysis, procedure=key).plain.splitlines()
    shown = report.display_numbers(analysis, key)
    # each row the window shows is a row of the report's table, by the same name and value
    expected = [(report.estimate_label(analysis.procedures[key], analysis.groups.labels), shown.estimate),
                (report.p_label(analysis.spec.alternative), shown.p)]
    expected += [(report.DF_ROW, shown.df)] if shown.df is not None else []
    expected += [(report.MC_SE_ROW, shown.mc_se)] if shown.mc_se is not None else []
    assert (shown.mc_se is not None) == (key == "permutation_mean")
    for name, value in expected:
        assert name in names
        assert any(line.startswith(name) and line.endswith(f"  {value}") for line in plain), name
