"""One fuzz worker process: writes cases, runs the headless commands on each, reports outcomes.

Started by ``pool.FuzzPool`` as ``python tests/fuzz/worker.py SEED FOLDER MEMORY_BYTES``. It reads
one JSON request per line on stdin (``{"index": N, "max_columns": M}`` to write case N, or
``{"index": N, "path": P}`` to run an existing file; ``"fault"`` makes it fail on purpose) and
answers on stdout with two JSON lines per case: ``ready`` (the file and its SHA-256, before
anything reads it) and ``done`` (the outcome of each command). Whatever the engine might print
goes to stderr, which the pool keeps in a file to read after a crash.
"""

from __future__ import annotations

import contextlib
import hashlib
import io
import json
import os
import resource
import sys
import time
import traceback
import warnings
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parents[1]
for folder in (str(ROOT), str(HERE)):
    if folder not in sys.path:
        sys.path.insert(0, folder)

PATH = "{path}"  # where the case's path goes in a command; else right after the command's name
COMMANDS = (("columns",), ("analyze", "--json", "--seed", "1"),
            # the same file read as two groups' summary statistics: nearly always refused, and
            # each refusal must still be one line naming the file
            ("analyze", "--summary-file", PATH, "--json"))


def sha256(path: Path) -> str:
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


def _where(error: BaseException) -> str:
    """The innermost frame of the project (engine/ or desktop/) and the innermost frame overall."""
    frames = traceback.extract_tb(error.__traceback__)
    ours = [f for f in frames if "/engine/" in f.filename or "/desktop/" in f.filename]
    parts = []
    if ours:
        f = ours[-1]
        parts.append(f"{Path(f.filename).parent.name}/{Path(f.filename).name}:{f.lineno} {f.name}")
    if frames and (not ours or frames[-1] is not ours[-1]):
        f = frames[-1]
        parts.append(f"{Path(f.filename).name}:{f.lineno} {f.name}")
    return " <- ".join(parts)


def _crash(error: BaseException) -> dict:
    return {"result": "crash", "type": f"{type(error).__module__}.{type(error).__qualname__}",
            "message": str(error)[:2000], "where": _where(error),
            "traceback": "".join(traceback.format_exception(error))[-6000:]}


@contextlib.contextmanager
def _unforeseen_kept(kept: list[BaseException]):
    """Keep each error the command turns into its one line for an unforeseen error (exit code
    1): the line is the command's behaviour, but the error is a bug a fuzz run counts as a crash,
    grouped by its type and the frame of ours it came from."""
    import engine.cli

    said = engine.cli._unexpected

    def noted(args, problem):
        kept.append(problem)
        return said(args, problem)

    engine.cli._unexpected = noted
    try:
        yield
    finally:
        engine.cli._unexpected = said


def run_command(command: tuple[str, ...], path: Path) -> dict:
    """Run ``python -m engine COMMAND PATH ...`` in this process, as engine.cli.main does.

    Exit code 2 with one line is a typed error (bad input said plainly); exit code 1, the
    command's line for an error it did not foresee, is a crash, as is any other code."""
    from engine.cli import EXIT_BAD_INPUT, main

    out, err = io.StringIO(), io.StringIO()
    unforeseen: list[BaseException] = []
    argv = ([str(path) if part == PATH else part for part in command] if PATH in command
            else [command[0], str(path), *command[1:]])
    caught: set[str] = set()

    def record(message, category, filename, lineno, file=None, line=None):
        # the engine's frames at the moment of the warning say which part of ours let it out
        ours = [f"{Path(f.filename).name}:{f.name}" for f in traceback.extract_stack()
                if "/engine/" in f.filename]
        caught.add(f"{category.__name__}: {message} ({Path(filename).name}) [{' > '.join(ours[1:])}]")

    with warnings.catch_warnings():
        warnings.simplefilter("always")
        warnings.showwarning = record
        try:
            with _unforeseen_kept(unforeseen):
                code = main(argv, out=out, err=err)
        except KeyboardInterrupt:
            raise
        except BaseException as error:  # noqa: BLE001 - a fuzz run records everything that escapes
            outcome = _crash(error)
        else:
            message = err.getvalue()
            message = message[:-1] if message.endswith("\n") else message
            if code == 0:
                outcome = {"result": "clean"}
            elif code == EXIT_BAD_INPUT:
                outcome = {"result": "typed", "code": code, "message": message}
            elif unforeseen:
                outcome = _crash(unforeseen[-1])
            else:
                outcome = {"result": "crash", "type": f"exit code {code}", "message": message[:2000],
                           "where": "", "traceback": message[-6000:]}
            outcome["code"] = code
            if code == 0 and command[0] == "analyze":
                try:
                    json.loads(out.getvalue())
                except ValueError as error:
                    outcome = {"result": "crash", "type": "invalid JSON output", "message": str(error),
                               "where": "", "traceback": out.getvalue()[:2000]}
    outcome["command"] = command[0] if PATH not in command else f"{command[0]} {command[1]}"
    # a generated table read as summaries is refused almost always: its one line is checked,
    # but it does not make the case's verdict a typed error
    outcome["refusal_expected"] = PATH in command
    outcome["warnings"] = sorted(caught)
    return outcome


@contextlib.contextmanager
def _fault(fault: str | None, path: Path):
    """Faults on purpose, so that a test can check the guard sees each kind of failure."""
    if fault == "abort":
        os.abort()
    elif fault == "hang":
        while True:
            time.sleep(60)
    elif fault == "change":
        with open(path, "ab") as handle:
            handle.write(b"\n")
    elif fault == "raise":
        import engine.cli

        def broken(args, out):
            raise RuntimeError("a fault on purpose")

        kept = engine.cli._columns, engine.cli._analyze
        engine.cli._columns = engine.cli._analyze = broken
        try:
            yield
        finally:
            engine.cli._columns, engine.cli._analyze = kept
        return
    yield


def _serve(seed: int, folder: Path, memory: int) -> None:
    protocol = os.fdopen(os.dup(1), "w", buffering=1)
    os.dup2(2, 1)  # anything printed lands in the stderr file, not in the protocol
    sys.stdout = sys.stderr
    import cases  # noqa: F401 - imported before the memory limit, like the engine below
    import engine.analysis  # noqa: F401
    import engine.cli  # noqa: F401
    import engine.io  # noqa: F401
    import engine.jsonout  # noqa: F401
    import engine.report  # noqa: F401

    if memory:
        resource.setrlimit(resource.RLIMIT_AS, (memory, memory))
    for line in sys.stdin:
        request = json.loads(line)
        index = request["index"]
        if request.get("path"):
            path, tag = Path(request["path"]), "given file"
        else:
            for old in folder.iterdir():
                old.unlink()
            path, tag = cases.write_case(seed, index, folder, max_columns=request.get("max_columns"))
        protocol.write(json.dumps({"event": "ready", "index": index, "path": str(path), "tag": tag,
                                   "sha256": sha256(path)}) + "\n")
        with _fault(request.get("fault"), path):
            outcomes = [run_command(command, path) for command in COMMANDS]
        peak_kib = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
        written = sorted(p.name for p in path.parent.iterdir() if p != path) if path.parent == folder else []
        protocol.write(json.dumps({"event": "done", "index": index, "outcomes": outcomes,
                                   "peak_kib": peak_kib, "written_beside": written}) + "\n")


if __name__ == "__main__":
    _serve(int(sys.argv[1]), Path(sys.argv[2]), int(sys.argv[3]))
