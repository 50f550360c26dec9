"""What a fuzz case's result means: clean, typed error, or a problem (crash, hang, changed file,
a message that breaks the one-line promise, a warning that would reach the terminal).

``KNOWN_ELSEWHERE`` names the problems whose fixes are under way in other changes; each entry
matches its problem narrowly, so that anything else still fails the test. Empty it as those
fixes land.
"""

from __future__ import annotations

import re
import unicodedata
from collections import Counter, defaultdict
from dataclasses import dataclass
from pathlib import Path
from typing import Callable, Iterable

__all__ = ["Problem", "problems_of", "verdict_of", "KNOWN_ELSEWHERE", "known_as", "Tally"]

MESSAGE_LIMIT = 1000  # characters; a longer error line is a problem of its own
_WORKBOOKS = (".xlsx", ".xls", ".ods")


@dataclass(frozen=True)
class Problem:
    kind: str  # "crash", "hang", "changed", "message", "warning"
    key: str  # what groups like problems together
    index: int
    tag: str
    path: str
    detail: str = ""

    @property
    def extension(self) -> str:
        return Path(self.path or "").suffix.lower()


def _normalise(text: str) -> str:
    text = re.sub(r"case-?\d+\.\w+", "FILE", text)
    text = re.sub(r"\d+(\.\d+)?(e[-+]?\d+)?", "N", text)
    return text[:160]


def _message_problems(message: str, path: str) -> list[str]:
    found = []
    if "\n" in message or "\r" in message:
        found.append("error message over more than one line")
    if path and Path(path).name not in message:
        found.append("error message without the file name")
    if len(message) > MESSAGE_LIMIT:
        found.append(f"error message over {MESSAGE_LIMIT} characters")
    if any(unicodedata.category(c) in ("Cc", "Cf", "Zl", "Zp") for c in message):
        found.append("error message with control or bidi characters")
    return found


def problems_of(result: dict) -> list[Problem]:
    """Every problem in one case's result (an empty list for a clean result or a good error)."""
    found: list[Problem] = []
    index, tag, path = result["index"], result["tag"], result["path"] or ""

    def add(kind: str, key: str, detail: str = "") -> None:
        found.append(Problem(kind, key, index, tag, path, detail))

    if result["hung"]:
        add("hang", f"no answer within the time limit ({tag.split(':')[0]})")
    if result["died"]:
        died = result["died"]
        last = [line for line in died["stderr"].splitlines() if line.strip()][-1:] or [""]
        what = f"signal {died['signal']}" if died["signal"] else f"exit code {died['returncode']}"
        add("crash", f"worker died ({what}): {_normalise(last[0])}", died["stderr"])
    if result.get("sha256_after") and result["sha256_after"] != result["sha256_before"]:
        add("changed", "the input file changed")
    if result.get("written_beside"):
        add("changed", "a file was written beside the input", ", ".join(result["written_beside"]))
    for outcome in result["outcomes"] or ():
        if outcome["result"] == "crash":
            add("crash", f"{outcome['type']}: {_normalise(outcome['message'])} [{outcome['where']}]",
                outcome["traceback"])
        elif outcome["result"] == "typed":
            for key in _message_problems(outcome["message"], path):
                add("message", key, outcome["message"][:300])
        for warning in outcome["warnings"]:
            text, _, stack = warning.partition(" [")
            add("warning", _normalise(text) + (f" [{stack}" if stack else ""), warning)
    return found


def verdict_of(result: dict) -> str:
    """clean, typed error, crash or hang: the worst of the case's commands (a refusal the
    command was expected to give, as of a data table read as summaries, is not counted)."""
    if result["hung"]:
        return "hang"
    if result["died"] or any(o["result"] == "crash" for o in result["outcomes"] or ()):
        return "crash"
    if any(o["result"] == "typed" and not o.get("refusal_expected") for o in result["outcomes"] or ()):
        return "typed error"
    return "clean"


@dataclass(frozen=True)
class Known:
    name: str
    matches: Callable[[Problem], bool]


def _crash_in(problem: Problem, types: tuple[str, ...], where: str) -> bool:
    """A crash of one of ``types`` whose innermost frame of ours is in ``where`` (folder/file)."""
    return problem.kind == "crash" and problem.key.split(":")[0] in types and f"[{where}:" in problem.key


def _widest(tag: str) -> int:
    return max((int(n) for n in re.findall(r"cols=(\d+)", tag)), default=0)


KNOWN_ELSEWHERE: tuple[Known, ...] = ()


def known_as(problem: Problem) -> str | None:
    for known in KNOWN_ELSEWHERE:
        if known.matches(problem):
            return known.name
    return None


class Tally:
    """Counts over a run: verdicts, problems grouped by key, peak memory, time."""

    def __init__(self) -> None:
        self.files = 0
        self.verdicts: Counter[str] = Counter()
        self.by_kind: dict[str, Counter[str]] = defaultdict(Counter)
        self.examples: dict[tuple[str, str], Problem] = {}
        self.known: Counter[str] = Counter()
        self.new: list[Problem] = []
        self.peak_kib = 0
        self.peak_case: tuple[int, str] | None = None
        self.slowest: tuple[float, int, str] = (0.0, -1, "")
        self.kinds: Counter[str] = Counter()

    def add(self, result: dict) -> None:
        self.files += 1
        self.verdicts[verdict_of(result)] += 1
        self.kinds[result["tag"].split(":")[0]] += 1
        if result["peak_kib"] and result["peak_kib"] > self.peak_kib:
            self.peak_kib, self.peak_case = result["peak_kib"], (result["index"], result["tag"])
        if result["seconds"] > self.slowest[0] and not result["hung"]:
            self.slowest = (result["seconds"], result["index"], result["tag"])
        for problem in problems_of(result):
            self.by_kind[problem.kind][problem.key] += 1
            self.examples.setdefault((problem.kind, problem.key), problem)
            name = known_as(problem)
            if name:
                self.known[name] += 1
            else:
                self.new.append(problem)

    def count(self, kind: str) -> int:
        return sum(self.by_kind[kind].values())

    def report(self, peak_children_kib: int = 0, seconds: float | None = None) -> str:
        lines = [f"files: {self.files}  ({', '.join(f'{k} {n}' for k, n in sorted(self.kinds.items()))})"]
        for verdict in ("clean", "typed error", "crash", "hang"):
            lines.append(f"{verdict}: {self.verdicts[verdict]}")
        lines.append(f"changed files: {self.count('changed')}")
        lines.append(f"bad error messages: {self.count('message')}   warnings reaching the terminal: "
                     f"{self.count('warning')}")
        peak = max(self.peak_kib, peak_children_kib)
        lines.append(f"peak memory of a worker: {peak / 1024:.0f} MiB"
                     + (f" (case {self.peak_case[0]}: {self.peak_case[1][:90]})" if self.peak_case else ""))
        lines.append(f"slowest finished case: {self.slowest[0]:.1f} s (case {self.slowest[1]}: "
                     f"{self.slowest[2][:90]})")
        if seconds is not None:
            lines.append(f"run time: {seconds:.0f} s")
        for kind in ("crash", "hang", "changed", "message", "warning"):
            if not self.by_kind[kind]:
                continue
            lines.append(f"\n{kind} classes:")
            for key, n in self.by_kind[kind].most_common():
                example = self.examples[(kind, key)]
                known = known_as(example)
                lines.append(f"  {n:6d}  {key}" + (f"   [known: {known}]" if known else ""))
                lines.append(f"          e.g. case {example.index}: {example.tag[:110]}")
        return "\n".join(lines)


def tally(results: Iterable[dict]) -> Tally:
    counts = Tally()
    for result in results:
        counts.add(result)
    return counts
