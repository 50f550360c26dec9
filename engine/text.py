"""Text from a file made safe to show: control and direction characters written as escapes.

A label, a column name or a cell may hold anything the file holds: line breaks, a vertical tab,
an escape sequence that retitles a terminal or erases its line, or a right-to-left override that
makes "north minus south" read backwards. Every message, printed line and report that quotes
such text passes it through :func:`visible` first, which writes each of those characters as a
visible escape (``\\n``, ``\\x1b``, ``\\u202e``) and leaves every other character, letters of any
script included, as it is.

References
----------
Unicode Standard Annex #9, "Unicode Bidirectional Algorithm" (the explicit directional
formatting characters). Unicode Technical Standard #39 and CVE-2021-42574 ("Trojan Source"), on
text whose shown order differs from its stored order.
"""

from __future__ import annotations

import html
import unicodedata

__all__ = ["visible", "visible_html", "needs_escape"]

# Letters of some scripts and emoji sequences need these two format characters to join or
# part; they move nothing and hide nothing, so they stay.
_KEPT_FORMAT = frozenset("\u200c\u200d")
_NAMED = {"\n": "\\n", "\r": "\\r", "\t": "\\t"}


def needs_escape(character: str) -> bool:
    """Whether ``character`` is a control, separator or format character that ``visible`` escapes.

    That is every C0 and C1 control and DEL (category Cc), the line and paragraph separators
    U+2028 and U+2029 (Zl, Zp), every format character (Cf: the bidirectional marks, embeddings,
    overrides and isolates U+200E/U+200F, U+202A-U+202E, U+2066-U+2069, U+061C; zero-width
    spaces; the byte-order mark) except the zero-width joiner and non-joiner, and lone surrogates
    (Cs), which a terminal cannot print.
    """
    category = unicodedata.category(character)
    if category in ("Cc", "Zl", "Zp", "Cs"):
        return True
    return category == "Cf" and character not in _KEPT_FORMAT


def _escape(character: str) -> str:
    named = _NAMED.get(character)
    if named is not None:
        return named
    code = ord(character)
    if code <= 0xFF:
        return f"\\x{code:02x}"
    if code <= 0xFFFF:
        return f"\\u{code:04x}"
    return f"\\U{code:08x}"


def visible(text: object) -> str:
    """``text`` as one line with each control or direction character written as an escape.

    ``"a\\x1b]0;x\\x07"`` becomes ``a\\x1b]0;x\\x07`` with the backslashes shown, a line break
    ``\\n``, U+202E ``\\u202e``. Text without such characters comes back unchanged (and fast).
    A carriage return and line feed together become one ``\\n``.
    """
    text = str(text)
    if text.isprintable():  # no character of the categories escaped here
        return text
    text = text.replace("\r\n", "\n")
    return "".join(_escape(ch) if needs_escape(ch) else ch for ch in text)


def visible_html(text: object) -> str:
    """:func:`visible`, then escaped for HTML: file text that is shown as text, never as markup."""
    return html.escape(visible(text), quote=True)
