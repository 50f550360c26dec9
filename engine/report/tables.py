"""The report's blocks (paragraphs, headings, lists, tables of names and values, grids) written
as an HTML fragment or as plain text.

A block is a tuple: ("p", text), ("small", text), ("h", text), ("list", items),
("pairs", [(name, value), ...]) or ("grid", head, body, text_columns, wrap[, number_columns]).
Text from the file is passed through ``engine.text.visible_html`` or ``visible`` here, once.
"""

from __future__ import annotations

from ..text import visible, visible_html

__all__ = ["html", "plain"]

_CELL = "border: 1px solid #999; padding: 2px 8px; text-align: left;"
_NUMBER_CELL = "border: 1px solid #999; padding: 2px 8px; text-align: right;"
_TABLE = "border-collapse: collapse; margin: 6px 0;"
# Short cells keep to one line and each column asks for the width of its longest text: a word
# processor pasting the table otherwise narrows the columns until "Mean" or "32" breaks in two
# (seen in LibreOffice Writer 7.4, which reads the width attribute but not the nowrap style).
_ONE_LINE = f' nowrap style="white-space: nowrap; {_CELL}"'
_ONE_LINE_NUMBER = f' nowrap style="white-space: nowrap; {_NUMBER_CELL}"'


_BOLD = 1.25  # a bold character is about a quarter wider


def _shares(columns, padding: int = 3) -> list[str]:
    """Width attributes in per cent of the table for columns of (plain texts, bold texts), in
    proportion to each column's longest text (at most 40 characters, as a long text wraps,
    and ``padding`` more for the cell's padding), so that the table fits the page."""
    weights = [min(40, max([len(t) for t in plain] + [_BOLD * len(t) for t in bold])) + padding
               for plain, bold in columns]
    return [f' width="{100 * w / sum(weights):.0f}%"' for w in weights]


# Tables keep their rows whole across pages (a word processor otherwise splits a row and may
# leave an empty one behind).
_KEEP = "page-break-inside: avoid;"


# Room a number is given beyond its characters in a wrapping table (Qt's layout breaks a number
# that does not fit its share, non-breaking spaces or not).
_NUMBER_ROOM = "      "
# Characters of a text column of a wrapping table counted for its width (it wraps beyond).
_WRAP_TEXT = 16
# A name longer than this may wrap in its cell (it would otherwise squeeze the value column).
_ONE_LINE_NAME = 32


def _html_pairs(rows) -> list[str]:
    e = visible_html  # labels from the file are text: no markup, no control or direction characters
    names, values = _shares([((), [name for name, _ in rows]), ([value for _, value in rows], ())])
    out = [f'<table width="100%" style="{_TABLE}">']
    for name, value in rows:
        keep = _ONE_LINE if len(name) <= _ONE_LINE_NAME else f' style="{_CELL}"'
        out.append(f'<tr style="{_KEEP}"><th{names}{keep}>{e(name)}</th>'
                   f'<td{values} style="{_CELL}">{e(value)}</td></tr>')
    out.append("</table>")
    return out


def _html_grid(head, body, text_columns: int, wrap: bool, number_columns: int | None = None) -> list[str]:
    """A table with a heading row: the first ``text_columns`` columns are text (left-aligned),
    the next ``number_columns`` (default: all the rest) numbers, right-aligned on one line, and
    any after them text again. With ``wrap`` the headings and text cells may wrap; without it
    every cell keeps to one line."""
    e = visible_html  # labels from the file are text: no markup, no control or direction characters
    text_cell = f' style="{_CELL}"' if wrap else _ONE_LINE
    numbers = range(text_columns, len(head) if number_columns is None else text_columns + number_columns)
    if wrap:  # a number needs its whole length, a heading its longest word, a text wraps
        widths = _shares([([line[j] + _NUMBER_ROOM for line in body], h.split()) if j in numbers
                          else ([line[j][:_WRAP_TEXT] for line in body], h.split()[:1])
                          for j, h in enumerate(head)], padding=5)
    else:
        widths = _shares([([line[j] for line in body], [h]) for j, h in enumerate(head)])
    out = [f'<table width="100%" style="{_TABLE}">',
           f'<tr style="{_KEEP}">' + "".join(f"<th{w}{text_cell}>{e(h)}</th>"
                                             for w, h in zip(widths, head)) + "</tr>"]
    # Beside cells that wrap, a number keeps to one line by its non-breaking spaces: a nowrap
    # cell there takes the spare width from the text columns in Qt's layout (the PDF).
    number_cell = _ONE_LINE_NUMBER if not wrap else f' style="{_NUMBER_CELL}"'
    for line in body:
        cells = [f"<td{number_cell}>{e(cell).replace(' ', '&nbsp;')}</td>" if j in numbers
                 else f"<td{text_cell}>{e(cell)}</td>" for j, cell in enumerate(line)]
        out.append(f'<tr style="{_KEEP}">' + "".join(cells) + "</tr>")
    out.append("</table>")
    return out


def html(blocks) -> str:
    """The report's blocks as an HTML fragment (paragraphs, headings, lists and tables)."""
    e = visible_html  # labels from the file are text: no markup, no control or direction characters
    out: list[str] = []
    for kind, *content in blocks:
        if kind == "p":
            out.append(f"<p>{e(content[0])}</p>")
        elif kind == "small":
            out.append(f'<p style="font-size: smaller;">{e(content[0])}</p>')
        elif kind == "h":
            out.append(f"<h3>{e(content[0])}</h3>")
        elif kind == "list":
            out.append("<ul>" + "".join(f"<li>{e(item)}</li>" for item in content[0]) + "</ul>")
        elif kind == "pairs":  # no text between a table's rows: a word processor may show it as a row
            out.append("".join(_html_pairs(content[0])))
        elif kind == "grid":
            out.append("".join(_html_grid(*content)))
    return "\n".join(out)


def _plain_grid(head, body, text_columns: int, wrap: bool = False, number_columns: int | None = None
                ) -> list[str]:
    numbers = range(text_columns, len(head) if number_columns is None else text_columns + number_columns)
    widths = [max(len(line[i]) for line in [head, *body]) for i in range(len(head))]
    out = []
    for line in [head, *body]:
        cells = [cell.rjust(w) if j in numbers else cell.ljust(w)
                 for j, (cell, w) in enumerate(zip(line, widths))]
        out.append("  ".join(cells).rstrip())
    return out


def _visible_block(block: tuple) -> tuple:
    """A report block with every text in it passed through :func:`engine.text.visible`."""
    def clean(item):
        if isinstance(item, str):
            return visible(item)
        if isinstance(item, (list, tuple)):
            return type(item)(clean(part) for part in item)
        return item
    kind, *content = block
    return (kind, *(clean(part) for part in content))


def plain(blocks) -> str:
    """The report's blocks as plain text: one line per paragraph (a document or a mail program
    wraps it to its own width) and tables aligned in columns."""
    # labels from the file with their control and direction characters written as escapes
    blocks = [_visible_block(block) for block in blocks]
    out: list[str] = []
    for kind, *content in blocks:
        if kind in ("p", "small"):
            out += [content[0], ""]
        elif kind == "h":
            out += [content[0], ""]
        elif kind == "list":
            out += [f"- {item}" for item in content[0]] + [""]
        elif kind == "pairs":
            width = max(len(name) for name, _ in content[0])
            out += [f"{name.ljust(width)}  {value}" for name, value in content[0]] + [""]
        elif kind == "grid":
            out += _plain_grid(*content) + [""]
    return "\n".join(out).rstrip("\n") + "\n"
