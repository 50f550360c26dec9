"""Workbooks (.xlsx, .xls, .ods) read with the calamine reader."""

from __future__ import annotations

import os
import pickle
import re
import subprocess
import sys
import tempfile
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import ColumnProblem, FileProblem, listing, quoted
from ..wording import plural
from ._files import SHEET_KINDS, amount, check_path, one_line, wrap_unexpected
from .bounds import check_sheet, check_workbook
from .build import build_table
from .cells import cell_text
from .sniff import has_header, title_note, title_rows, title_texts

__all__ = ["read_sheet", "sheet_names", "workbook_sheets", "WorkbookSheets"]

_KIND_NAMES = {"xlsx": "a workbook (.xlsx)", "xls": "an older-format workbook (.xls)", "ods": "an OpenDocument spreadsheet (.ods)"}
_HEADER_SAMPLE = 200
_CHILD = Path(__file__).with_name("_workbook_child.py")
# In a bundle (packaging/launch.py) sys.executable is the program itself, not a Python: given
# this first argument it runs the child's script instead of starting the window or the command.
FROZEN_CHILD_FLAG = "--workbook-child"


def child_command(path: Path, limit: int) -> list[str]:
    """The command line of the workbook reader's child process for ``path`` under ``limit`` bytes."""
    if getattr(sys, "frozen", False):
        return [sys.executable, FROZEN_CHILD_FLAG, str(path), str(limit)]
    return [sys.executable, "-I", str(_CHILD), str(path), str(limit)]


def _cells(rows: list) -> pd.DataFrame:
    """The sheet's cells from row 1 down (blank cells as NaN), as calamine gives them."""
    frame = pd.DataFrame(rows, dtype=object) if rows else pd.DataFrame()
    for position in range(frame.shape[1]):
        column = frame.iloc[:, position]
        values = column.to_numpy()
        blank = column.isna().to_numpy() | (values == "")
        if blank.any():
            frame.isetitem(position, column.where(~blank, np.nan))
    return frame


class _Reader:
    """The calamine reader in a child process with a memory limit (see ``_workbook_child``).

    A Rust panic, an abort on a failed allocation or a parse that outgrows the limit ends the
    child only; each comes back here as a :class:`FileProblem` naming the file.
    """

    def __init__(self, path: Path, kind: str, limit: int) -> None:
        self.path, self.kind, self.limit = path, kind, limit
        self._errors = tempfile.TemporaryFile()
        env = dict(os.environ, RUST_BACKTRACE="0")
        try:
            self._child = subprocess.Popen(
                child_command(path, limit),
                stdin=subprocess.PIPE, stdout=subprocess.PIPE, stderr=self._errors, env=env,
                close_fds=True)
        except OSError as error:
            self._errors.close()
            raise FileProblem(f"{path.name} could not be read: the workbook reader did not start "
                              f"({one_line(error, 80)}).") from error
        try:
            answer = self._answer(None)
        except BaseException:  # a refused or damaged workbook: the child and its pipes end here
            self.close(at_once=True)
            raise
        self.sheets: tuple[tuple[str, str], ...] = tuple((str(n), str(v)) for n, v in answer[1])

    def ask(self, command: str, name: str):
        """Send one command about sheet ``name`` and return the child's answer."""
        self.send(command, name)
        return self.receive(name)

    def receive(self, name: str):
        """The child's answer to the command sent last."""
        return self._answer(name)[1]

    def send(self, command: str, name: str) -> None:
        """Send one command about sheet ``name`` (sent as its position: a hostile name may hold
        a line break); the child starts on it at once."""
        try:
            index = next(i for i, (n, _) in enumerate(self.sheets) if n == name)
            self._child.stdin.write(f"{command} {index}\n".encode("ascii"))
            self._child.stdin.flush()
        except OSError:
            pass  # the child ended: its reason is read with the answer

    def _answer(self, sheet: str | None):
        try:
            answer = pickle.load(self._child.stdout)
        except (EOFError, pickle.UnpicklingError, OSError):
            self._child.wait()
            raise self._died(sheet) from None
        if answer[0] == "error":
            raise self._failed(sheet, answer[1], answer[2])
        return answer

    def _where(self, sheet: str | None) -> str:
        return f"Sheet '{quoted(sheet)}' of {self.path.name}" if sheet is not None else self.path.name

    def _failed(self, sheet: str | None, kind: str, text: str) -> FileProblem:
        if kind == "memory":
            return FileProblem(
                f"{self._where(sheet)} could not be read within {amount(self.limit)} of memory, far "
                "more than its size calls for; it may be damaged or built to exhaust memory.")
        detail = one_line(text, 100) or kind
        if sheet is not None:
            return FileProblem(f"{self._where(sheet)} could not be read: {detail}")
        return FileProblem(
            f"{self.path.name} could not be read as {_KIND_NAMES[self.kind]}; it may be damaged or not "
            f"really a .{self.kind} file ({detail}).")

    def _died(self, sheet: str | None) -> FileProblem:
        self._errors.seek(0)
        said = self._errors.read(64 * 1024).decode("utf-8", "replace")
        asked = re.search(r"memory allocation of (\d+) bytes failed", said)
        if asked and int(asked.group(1)) < self.limit // 2:  # the last of many: the reader grew too large
            return self._failed(sheet, "memory", "")
        if asked:
            return FileProblem(
                f"{self._where(sheet)} asks for {amount(int(asked.group(1)))} of memory to be read "
                f"(at most {amount(self.limit)} can be given to it); it may be damaged or declare "
                "a far larger sheet than it holds.")
        if "PermissionError" in said or "Permission denied" in said:
            return FileProblem(
                f"{self.path.name} cannot be opened: permission denied (it may be locked by another "
                "program or need different access rights).")
        last = [line for line in said.splitlines() if line.strip()]
        detail = one_line(last[-1], 100) if last else f"the reader stopped with code {self._child.returncode}"
        return self._failed(sheet, "stopped", detail)

    def close(self, *, at_once: bool = False) -> None:
        child = self._child
        if at_once and child.poll() is None:
            child.kill()
        try:
            if child.stdin:
                child.stdin.close()
        except OSError:
            pass
        try:
            child.wait(timeout=5)
        except subprocess.TimeoutExpired:
            child.kill()
            child.wait()
        if child.stdout:
            child.stdout.close()
        self._errors.close()

    def __enter__(self) -> "_Reader":
        return self

    def __exit__(self, kind, *exc) -> None:
        self.close(at_once=kind is not None)  # an error here: the child's work is not wanted


def _reader(path: Path, kind: str) -> _Reader:
    """Check the workbook's declared sizes, then start its reader with a memory limit."""
    limit = check_workbook(path, kind)
    return _Reader(path, kind, limit)


def sheet_names(path: Path, kind: str) -> tuple[str, ...]:
    """The workbook's sheet names in order (hidden ones too)."""
    with _reader(path, kind) as reader:
        return tuple(name for name, _ in reader.sheets)


@dataclass(frozen=True)
class WorkbookSheets:
    """What a workbook holds before any sheet is read: every sheet name in order, the hidden
    ones, and the first visible sheet that holds numbers (None if none does)."""

    names: tuple[str, ...]
    hidden: tuple[str, ...]
    first_with_numbers: str | None

    @property
    def visible(self) -> tuple[str, ...]:
        return tuple(n for n in self.names if n not in self.hidden)


def workbook_sheets(path: str | Path) -> WorkbookSheets:
    """The sheets of a workbook, for a chooser: names, hidden ones, the first with numbers.

    With several visible sheets, they are looked through in order until one holds at least two
    numbers (a lone visible sheet is taken as it is, unread).
    """
    path, kind = check_path(path)
    if kind not in SHEET_KINDS:
        raise FileProblem(f"{path.name} is not a workbook; it has no sheets.")
    with wrap_unexpected(path.name, "read"):
        with _reader(path, kind) as reader:
            names = tuple(name for name, _ in reader.sheets)
            hidden = tuple(name for name, seen in reader.sheets if seen != "visible")
            visible = [name for name in names if name not in hidden]
            first = visible[0] if len(visible) == 1 else None
            for name in visible if len(visible) > 1 else ():
                if reader.ask("numbers", name) >= 2:
                    first = name
                    break
    return WorkbookSheets(names, hidden, first)


def _pick_sheet(path: Path, names: tuple[str, ...], hidden: tuple[str, ...], sheet: str | None) -> str:
    if not names:
        raise FileProblem(f"{path.name} holds no sheets.")
    if sheet is None:
        visible = [n for n in names if n not in hidden]
        return visible[0] if visible else names[0]
    if sheet in names:
        return sheet
    loose = [n for n in names if n.strip().lower() == str(sheet).strip().lower()]
    if len(loose) == 1:
        return loose[0]
    raise ColumnProblem(f"{path.name} has no sheet '{quoted(sheet)}'; its sheets are {listing(names)}.")


def _sheet_notes(kind: str, names: tuple[str, ...], hidden: tuple[str, ...], chosen: str,
                 asked: str | None) -> list[str]:
    notes = [f"Read {_KIND_NAMES[kind]}, sheet '{quoted(chosen)}'"
             + (f" (of {len(names)}: {listing(names)})." if len(names) > 1 else ".")]
    if chosen in hidden:
        notes.append(f"Sheet '{quoted(chosen)}' is hidden in the workbook; it was read because "
                     + ("it was asked for by name." if asked is not None else "no sheet is visible."))
    passed = [n for n in hidden if n != chosen]
    if passed:
        notes.append(f"Hidden sheet(s) {listing(passed)} were passed over; name one to read it.")
    return notes


def read_sheet(path: Path, kind: str, sheet: str | None):
    """Read one sheet into a :class:`engine.io.Table` (the first sheet by default).

    The cells come straight from python-calamine (the reader behind pandas' "calamine"
    engine): pandas' own per-cell conversion would double the time on large sheets.

    Leading blank rows are kept in the count so that ``Table.file_row`` gives the row number the
    spreadsheet shows; fully blank columns without a name are dropped.
    """
    with _reader(path, kind) as reader:
        names = tuple(name for name, _ in reader.sheets)
        hidden = tuple(name for name, seen in reader.sheets if seen != "visible")
        chosen = _pick_sheet(path, names, hidden, sheet)
        reader.send("read", chosen)  # the child parses while the sheet's extent is checked here;
        check_sheet(path, kind, chosen, reader.limit)  # a refusal ends the child unanswered
        raw = _cells(reader.receive(chosen))
    others = [n for n in names if n != chosen]
    if raw.empty or raw.isna().all().all():
        hint = f"; the other sheets are {listing(others)}" if others else ""
        raise FileProblem(f"Sheet '{quoted(chosen)}' of {path.name} is empty{hint}.")
    raw = raw.loc[:, raw.notna().any()]  # blank columns (calamine keeps the empty area)
    filled = raw.notna().any(axis=1).to_numpy()
    top = int(filled.argmax())
    body = raw.iloc[top:]
    sample = [[cell_text(v) for v in row] for row in body.head(_HEADER_SAMPLE).itertuples(index=False)]
    header, why = has_header(sample, ".", None)
    notes = _sheet_notes(kind, names, hidden, chosen, sheet)
    if top:
        notes.append(f"The first {plural(top, 'row')} of the sheet {plural(top, 'is', number=False)} blank "
                     f"and {plural(top, 'was', number=False)} passed over.")
    titles = title_rows(sample, body.shape[1])
    if titles:
        below = has_header(sample[titles:], ".", None)
        if below[0]:  # titles sit above column names; above bare data, every row is kept
            notes.append(title_note(title_texts(sample[:titles]), titles, "row"))
            header, why = below
            body, sample, top = body.iloc[titles:], sample[titles:], top + titles
    first = f"Row {top + 1}" if top else "The first row"
    notes.append((f"{first} holds column names: " if header else
                  f"{first} is data, not column names: ") + why + ".")
    if header:
        columns = list(body.iloc[0])
        body = body.iloc[1:]
    else:
        columns = list(range(body.shape[1]))
    frame = body.reset_index(drop=True).infer_objects()  # the header row made every column object
    frame.columns = columns if header else range(frame.shape[1])
    return build_table(path, kind, frame, notes=notes, rows_above=top + (1 if header else 0),
                       sheet=chosen, sheet_names=names, header=header)
