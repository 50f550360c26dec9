"""A pool of guarded fuzz workers: each a process with a memory limit and a per-case time limit.

A worker that dies (a signal, an abort, an exit) or overruns its time is recorded against the
case it was running and replaced by a fresh one; the run goes on.
"""

from __future__ import annotations

import os
import select
import shutil
import signal
import subprocess
import sys
import tempfile
import time
from collections import deque
from pathlib import Path
from typing import Iterable, Iterator

from worker import sha256

__all__ = ["FuzzPool"]

WORKER = Path(__file__).resolve().parent / "worker.py"
ROOT = WORKER.parents[2]
_STARTUP_GRACE = 60.0  # seconds a fresh worker may spend importing pandas and scipy
_STDERR_TAIL = 4000


class _Worker:
    def __init__(self, pool: "FuzzPool", number: int) -> None:
        self.folder = pool.folder / f"worker{number}"
        self.folder.mkdir(exist_ok=True)
        self.stderr = open(pool.folder / f"worker{number}.err", "w+b")
        env = dict(os.environ, PYTHONPATH=str(ROOT), OPENBLAS_NUM_THREADS="1", OMP_NUM_THREADS="1",
                   MKL_NUM_THREADS="1", PYTHONHASHSEED="0")
        self.process = subprocess.Popen(
            [sys.executable, str(WORKER), str(pool.seed), str(self.folder), str(pool.memory)],
            stdin=subprocess.PIPE, stdout=subprocess.PIPE, stderr=self.stderr, cwd=ROOT, env=env,
            start_new_session=True)
        self.fresh = True
        self.buffer = b""
        self.request: dict | None = None
        self.ready: dict | None = None
        self.deadline = 0.0
        self.started = 0.0
        self.err_offset = 0

    def send(self, request: dict, timeout: float) -> None:
        import json

        self.request, self.ready = request, None
        self.started = time.monotonic()
        self.deadline = self.started + timeout + (_STARTUP_GRACE if self.fresh else 0.0)
        self.err_offset = self.stderr.seek(0, os.SEEK_END)
        self.process.stdin.write((json.dumps(request) + "\n").encode())
        self.process.stdin.flush()

    def stderr_tail(self) -> str:
        self.stderr.flush()
        self.stderr.seek(self.err_offset)
        return self.stderr.read()[-_STDERR_TAIL:].decode("utf-8", "replace")

    def stop(self) -> None:
        if self.process.poll() is None:
            try:
                os.killpg(self.process.pid, signal.SIGKILL)
            except ProcessLookupError:
                pass
        self.process.wait()
        for stream in (self.process.stdin, self.process.stdout):
            try:
                stream.close()
            except OSError:
                pass
        self.stderr.close()


class FuzzPool:
    """Run cases ``indices`` of the run ``seed`` on ``workers`` guarded processes.

    ``memory`` is each worker's address-space limit in bytes (0: none), ``timeout`` the seconds a
    case may take. ``keep``, if given, is a folder that receives a copy of every file that
    crashed, hung or changed. ``max_columns`` caps the width of generated tables (see
    ``cases.write_case``).
    """

    def __init__(self, seed: int, *, workers: int = 2, memory: int = 3 << 30, timeout: float = 30.0,
                 keep: Path | None = None, max_columns: int | None = None) -> None:
        self.seed, self.memory, self.timeout, self.keep = seed, memory, timeout, keep
        self.max_columns = max_columns
        self.n_workers = workers
        self.folder = Path(tempfile.mkdtemp(prefix="twofold-fuzz-"))
        self.workers: list[_Worker] = []
        self.started_workers = 0

    def _spawn(self) -> _Worker:
        self.started_workers += 1
        return _Worker(self, self.started_workers)

    def run(self, indices: Iterable[int] = (), files: Iterable[Path] = (),
            faults: Iterable[tuple[Path, str]] = ()) -> Iterator[dict]:
        """Yield one result per case as it finishes (not in order).

        ``files`` are run as cases too; ``faults`` pairs a file with a failure made on purpose
        ("abort", "hang", "change", "raise"), to check the guard itself.
        """
        import json

        given = [(path, None) for path in files] + list(faults)
        pending = deque([{"index": i, "max_columns": self.max_columns} for i in indices] +
                        [{"index": -1 - n, "path": str(Path(p).resolve()), "fault": fault}
                         for n, (p, fault) in enumerate(given)])
        self.workers = [self._spawn() for _ in range(min(self.n_workers, max(len(pending), 1)))]
        try:
            while pending or any(w.request for w in self.workers):
                for worker in self.workers:
                    if worker.request is None and pending:
                        worker.send(pending.popleft(), self.timeout)
                busy = [w for w in self.workers if w.request is not None]
                wait = max(0.0, min(w.deadline for w in busy) - time.monotonic())
                readable, _, _ = select.select([w.process.stdout for w in busy], [], [], wait)
                for worker in busy:
                    if worker.process.stdout in readable:
                        chunk = os.read(worker.process.stdout.fileno(), 1 << 16)
                        if not chunk:
                            yield self._finish(worker, died=True)
                            continue
                        worker.buffer += chunk
                        while b"\n" in worker.buffer and worker.request is not None:
                            line, worker.buffer = worker.buffer.split(b"\n", 1)
                            message = json.loads(line)
                            if message["event"] == "ready":  # the time limit counts from here
                                worker.ready = message
                                worker.deadline = time.monotonic() + self.timeout
                            else:
                                yield self._finish(worker, done=message)
                    elif time.monotonic() > worker.deadline:
                        yield self._finish(worker, hung=True)
        finally:
            for worker in self.workers:
                worker.stop()
            shutil.rmtree(self.folder, ignore_errors=True)

    def _finish(self, worker: _Worker, *, done: dict | None = None, died: bool = False,
                hung: bool = False) -> dict:
        request, ready = worker.request, worker.ready or {}
        result = {"index": request["index"], "path": ready.get("path", request.get("path")),
                  "tag": ready.get("tag", "(not written yet)"), "sha256_before": ready.get("sha256"),
                  "seconds": time.monotonic() - worker.started, "outcomes": None, "died": None,
                  "hung": hung, "peak_kib": None}
        if done is not None:
            result["outcomes"], result["peak_kib"] = done["outcomes"], done["peak_kib"]
            result["written_beside"] = done.get("written_beside", [])
        if died or hung:
            if hung:
                os.killpg(worker.process.pid, signal.SIGKILL)
            code = worker.process.wait()
            if died:
                result["died"] = {"returncode": code,
                                  "signal": signal.Signals(-code).name if code < 0 else None,
                                  "stderr": worker.stderr_tail()}
        path = Path(result["path"]) if result["path"] else None
        if path is not None and path.exists() and ready:
            result["sha256_after"] = sha256(path)
            changed = result["sha256_after"] != result["sha256_before"]
            if self.keep is not None and (changed or died or hung or _crashed(result)):
                self.keep.mkdir(parents=True, exist_ok=True)
                shutil.copy(path, self.keep / path.name)
        if died or hung:
            number = self.workers.index(worker)
            worker.stop()
            self.workers[number] = self._spawn()
        else:
            worker.request, worker.fresh = None, False
        return result


def _crashed(result: dict) -> bool:
    return any(o["result"] == "crash" for o in result["outcomes"] or ())
