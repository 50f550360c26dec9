"""The workbook reader's child process: python-calamine behind a memory limit.

Run by :mod:`engine.io.sheets` as ``python -I _workbook_child.py PATH LIMIT``; it imports
nothing of Twofold, so that a damaged or hostile workbook that makes the Rust reader panic or
abort ("memory allocation of ... bytes failed") ends this process only, never the window or the
command. The address space is capped at LIMIT bytes before the reader is loaded.

The conversation runs over stdin and stdout; every answer is one pickled tuple:

1. the child opens the workbook and answers ``("sheets", [(name, visibility), ...])``;
2. it then reads commands, one a line, until an empty line or the end of stdin:
   ``read INDEX`` answers ``("rows", rows)`` with the sheet's cells row by row (blank cells "")
   and ends the child;
   ``numbers INDEX`` answers ``("numbers", count)``, how many cells of the sheet hold a number,
   counted up to 2.

Any failure is answered ``("error", kind, text)`` and ends the conversation; a panic or an abort
of the reader leaves its text on stderr, which the parent keeps for the message.
"""

import os
import pickle
import sys


def _limit_memory(limit: int) -> None:
    try:
        import resource
    except ImportError:  # not on this system: the parent's checks before reading still apply
        return
    if limit > 0:
        resource.setrlimit(resource.RLIMIT_AS, (limit, limit))


def _send(out, message) -> None:
    pickle.dump(message, out, protocol=pickle.HIGHEST_PROTOCOL)
    out.flush()


def _count_numbers(rows, enough: int = 2) -> int:
    found = 0
    for row in rows:
        for cell in row:
            if type(cell) in (int, float):
                found += 1
                if found >= enough:
                    return found
    return found


def main() -> None:
    path, limit = sys.argv[1], int(sys.argv[2])
    out = sys.stdout.buffer
    try:
        _limit_memory(limit)
        from python_calamine import CalamineWorkbook

        book = CalamineWorkbook.from_path(path)
        sheets = []
        for meta in book.sheets_metadata:
            visible = str(meta.visible).rsplit(".", 1)[-1].lower()
            sheets.append((str(meta.name), visible))
        _send(out, ("sheets", sheets))
        for line in sys.stdin:
            command, _, index = line.strip().partition(" ")
            if not command:
                break
            rows = book.get_sheet_by_index(int(index)).to_python(skip_empty_area=False)
            if command == "numbers":
                _send(out, ("numbers", _count_numbers(rows)))
            else:
                _send(out, ("rows", rows))
                os._exit(0)  # a read is the last command: leave without freeing every cell
            del rows
    except MemoryError:
        _send(out, ("error", "memory", ""))
    except BaseException as error:  # a Rust panic is a BaseException: answer it, do not die of it
        _send(out, ("error", type(error).__name__, " ".join(str(error).split())[:300]))


if __name__ == "__main__":
    main()
