"""The saved-analysis file: an analysis spec and the numbers it gave, to reopen, audit and repeat.

A ``.twofold`` file is a UTF-8 JSON object of our own design (every member is described in
``engine/schema/SAVED.md`` and the JSON Schema ``engine/schema/twofold.schema.json``)::

    {"format": "twofold-analysis", "version": 1, "program_version": "0.1.0",
     "schema_version": 2, "saved_at": "2026-12-03T15:20:00Z",
     "source_from_here": "data/bolts.csv", "spec": {...}, "numbers": {...}}

:func:`save` writes it (to a temporary file in the same folder, then renamed into place, so a
failed save never leaves half a file); :func:`load` reads it back and refuses a damaged,
truncated, hand-edited, foreign or newer one with one line naming the file; :func:`reopen` reads
the data file again, checks its checksum, runs the analysis again with the recorded seed and
compares its numbers with the saved ones.

Where the data file is looked for (:func:`source_candidates`): the place the user gives; the
recorded path (a relative path is taken from the saved file's folder); the data file's place
relative to the saved file's folder when it was saved (``source_from_here``); last, a file of the
same name next to the saved file, used only when its checksum matches.
"""

from __future__ import annotations

import json
import math
import os
import secrets
from dataclasses import dataclass
from datetime import datetime, timezone
from pathlib import Path
from typing import Any, Callable, Mapping

from .errors import Cancelled, OptionProblem, TwofoldError, quoted
from .spec import AnalysisSpec, Source

__all__ = ["FORMAT", "VERSION", "EXTENSION", "with_extension", "MIME_TYPE", "SIZE_LIMIT", "CLOSE_ENOUGH",
           "SavedFileProblem", "SavedAnalysis", "Reopened", "save", "load", "numbers_of",
           "compare_numbers", "reopen", "source_candidates", "write_atomically", "STATUSES",
           "document_of", "saved_schema", "rerun_summaries"]

FORMAT = "twofold-analysis"  # the "format" member
VERSION = 1                  # the "version" member; a newer one is refused with a message
EXTENSION = ".twofold"
MIME_TYPE = "application/x-twofold+json"
# A saved analysis is a few kilobytes; a file far larger is not one (and is not read whole).
SIZE_LIMIT = 10 * 1024 * 1024
# Figures that differ by at most this much, relative to the larger, are "close": the same
# computation on another processor or with other library versions can differ in the last bits.
CLOSE_ENOUGH = 1e-12
STATUSES = ("same", "close", "numbers_differ", "source_changed", "source_missing")
SAVED_AT_FORMAT = "%Y-%m-%dT%H:%M:%SZ"  # ISO 8601 in UTC, to the second
SAVED_AT_EXAMPLE = "2026-12-03T15:20:00Z"
DIFFERENCES_SHOWN = 5  # differences a one-line message lists before it counts the rest

Progress = Callable[[float, str], None]
CancelCheck = Callable[[], bool]


class SavedFileProblem(TwofoldError):
    """A saved-analysis file that cannot be used: not one, damaged, truncated, hand-edited into
    something invalid, made by a newer Twofold, or naming data that are no longer there."""


@dataclass(frozen=True)
class SavedAnalysis:
    """A saved analysis as read: the spec (concrete: the source with its checksum and the seed),
    the figures it gave (:func:`numbers_of`), the program version that saved it and when (ISO
    8601, UTC). ``location``: the file it was read from (relative data paths start there);
    ``source_from_here``: the data file's path relative to that file's folder when saved."""

    spec: AnalysisSpec
    numbers: Mapping[str, Any]
    program_version: str
    saved_at: str
    location: Path | None = None
    source_from_here: str | None = None
    schema_version: int | None = None
    plan: Mapping[str, Any] | None = None  # the plan of the next study (engine.plan_member), if saved
    # an analysis from summary statistics: the two groups as entered (engine.group_stats.GroupStats)
    summary_statistics: tuple[Any, ...] | None = None
    # several outcomes at once (engine.saved_outcomes), if saved so
    outcomes: Mapping[str, Any] | None = None


@dataclass(frozen=True)
class Reopened:
    """The outcome of :func:`reopen`; ``status`` is one of :data:`STATUSES`:

    "same" (every figure equal, bit for bit), "close" (every figure within :data:`CLOSE_ENOUGH`
    relative), "numbers_differ" (the data file is unchanged but figures differ),
    "source_changed" (the data file's checksum differs: run anyway, never called the same),
    "source_missing" (no data file found: ask where it is). ``message`` is one sentence for the
    user; ``differences`` one line per differing figure; ``prepared`` the re-run (None when the
    source is missing); ``source_used`` the data file read, ``found_elsewhere`` True when it was
    not at the recorded place."""

    saved: SavedAnalysis
    status: str
    message: str
    differences: tuple[str, ...] = ()
    prepared: Any = None  # engine.pipeline.Prepared (engine.outcomes.OutcomesAnalysis for several outcomes)
    source_used: str | None = None
    found_elsewhere: bool = False

    @property
    def confirmed(self) -> bool:
        """The re-run gave the saved numbers (bit for bit or within the tolerance)."""
        return self.status in ("same", "close")


# -- the numbers ---------------------------------------------------------------------------------
def _figure(value: Any) -> float | str | None:
    """A number as the file holds it: a float, or for the non-finite ones a text JSON can hold."""
    if value is None:
        return None
    value = float(value)
    if math.isnan(value):
        return "NaN"
    if math.isinf(value):
        return "Infinity" if value > 0 else "-Infinity"
    return value


def _ends(interval) -> dict[str, Any]:
    if interval is None:
        return {"low": None, "high": None}
    return {"low": _figure(interval.low), "high": _figure(interval.high)}


def _margin_verdicts(analysis) -> dict[str, Any]:
    """For a margin question, each procedure's verdict against the margin: its case, whether it
    answers "yes", and the ends of the (1 - alpha) interval the verdict also reads (the
    (1 - 2 alpha) one is the procedure's own interval)."""
    from .jsonout import margin_answers

    verdicts: dict[str, Any] = {}
    for key, answer in margin_answers(analysis).items():
        ends = _ends(answer.difference_interval)
        verdicts[key] = {"case": answer.case, "yes": bool(answer.yes),
                         "difference_low": ends["low"], "difference_high": ends["high"]}
    return verdicts


def _group_figures(analysis) -> list[dict[str, Any]]:
    if getattr(analysis, "input", None) == "summary":  # from summary statistics: the SD in use
        return [{"label": s.label, "n": int(s.n), "mean": _figure(s.mean),
                 "sd": _figure(s.standard_deviation)} for s in analysis.stats]
    return [{"label": s.label, "n": int(s.n), "mean": _figure(s.mean), "sd": _figure(s.sd)}
            for s in analysis.summaries]


def numbers_of(analysis) -> dict[str, Any]:
    """The figures a saved analysis records and :func:`reopen` compares: for each group its
    label, size, mean and SD; for every procedure its estimate, interval ends, p-value, statistic
    and degrees of freedom; for every effect size its value and interval ends; the key of the
    suggested procedure; for a margin question (only) each procedure's verdict against the
    margin (``margins``). Unrounded; a missing figure is None, a non-finite one a text."""
    analysis = getattr(analysis, "analysis", analysis)  # a pipeline.Prepared is taken too
    numbers = {
        "groups": _group_figures(analysis),
        "procedures": {key: {"estimate": _figure(r.estimate), **_ends(r.interval),
                             "p_value": _figure(r.p_value), "statistic": _figure(r.statistic),
                             "df": _figure(r.df)}
                       for key, r in analysis.procedures.items()},
        "effect_sizes": {key: {"value": _figure(e.value), **_ends(e.interval)}
                         for key, e in analysis.effect_sizes.items()},
        "suggested": analysis.recommendation.key,
    }
    if getattr(analysis, "margin", None) is not None:
        numbers["margins"] = _margin_verdicts(analysis)
    return numbers


def _flat(numbers: Mapping[str, Any]) -> dict[str, Any]:
    """Each figure under a name a reader can find it by: "welch_t p_value", "group 1 mean"."""
    flat: dict[str, Any] = {}
    for number, group in enumerate(numbers.get("groups", ()), start=1):
        for name, value in group.items():
            flat[f"group {number} {name}"] = value
    for member in ("procedures", "effect_sizes"):
        for key, figures in numbers.get(member, {}).items():
            flat[key] = "computed"
            for name, value in figures.items():
                flat[f"{key} {name}"] = value
    flat["suggested procedure"] = numbers.get("suggested")
    for key, verdict in numbers.get("margins", {}).items():
        for name, value in verdict.items():
            flat[f"{key} margin {name}"] = value
    return flat


def _close(saved: Any, now: Any) -> bool:
    numeric = (int, float)
    if (isinstance(saved, numeric) and isinstance(now, numeric)
            and not isinstance(saved, bool) and not isinstance(now, bool)):
        return math.isclose(saved, now, rel_tol=CLOSE_ENOUGH, abs_tol=0.0)
    return saved == now


def _shown(value: Any) -> str:
    if value is None:
        return "none"
    if isinstance(value, float):
        return repr(value)
    return quoted(value)


def compare_numbers(saved: Mapping[str, Any], now: Mapping[str, Any]) -> tuple[str, tuple[str, ...]]:
    """("same" | "close" | "numbers_differ", one line per figure that is not the same)."""
    return _compare_flat(_flat(saved), _flat(now))


def _compare_flat(before: Mapping[str, Any], after: Mapping[str, Any]) -> tuple[str, tuple[str, ...]]:
    differences, beyond = [], False
    for name in [*before, *(n for n in after if n not in before)]:
        old, new = before.get(name), after.get(name)
        if type(old) is type(new) and old == new:
            continue
        if name not in before or name not in after:
            what = "not computed" if name in before else "not in the saved analysis"
            differences.append(f"{name}: saved {_shown(old) if name in before else 'nothing'}, "
                               f"now {_shown(new) if name in after else what}")
            beyond = True
            continue
        differences.append(f"{name}: saved {_shown(old)}, now {_shown(new)}")
        beyond = beyond or not _close(old, new)
    status = "numbers_differ" if beyond else "close" if differences else "same"
    return status, tuple(differences)


# -- writing ---------------------------------------------------------------------------------------
def write_atomically(path: str | Path, text: str) -> None:
    """Write ``text`` (UTF-8) to ``path`` through a temporary file in the same folder renamed into
    place: the old file stays whole until the new one is complete. A new file gets the usual
    permissions (the system applies the umask), a replaced one keeps its own. Raises
    :class:`SavedFileProblem` naming the file when the folder cannot be written."""
    path = Path(path)
    folder = path.parent
    temporary = folder / f".{path.name}.{secrets.token_hex(6)}.part"
    made = False
    try:
        kept = path.stat().st_mode & 0o7777 if path.is_file() else None
        handle = os.open(temporary, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_BINARY", 0), 0o666)
        made = True
        with open(handle, "wb") as stream:
            stream.write(text.encode("utf-8"))
            stream.flush()
            os.fsync(stream.fileno())
        if kept is not None:
            os.chmod(temporary, kept)
        os.replace(temporary, path)
        made = False
    except OSError as error:
        reason = error.strerror or type(error).__name__
        raise SavedFileProblem(f"{path.name} could not be written in {folder}: {reason}.") from error
    finally:
        if made:
            try:
                os.unlink(temporary)
            except OSError:
                pass


def _relative_to_folder(source: str, folder: Path) -> str | None:
    """``source`` (relative to the current folder, or absolute) relative to ``folder``, with
    forward slashes; None where there is no such path (another drive)."""
    try:
        return Path(os.path.relpath(os.path.abspath(source), os.path.abspath(folder))).as_posix()
    except ValueError:
        return None


def document_of(analysis, *, path: str | Path | None = None, now: datetime | None = None,
                plan: Any = None) -> dict[str, Any]:
    """The JSON object :func:`save` writes for ``analysis`` (to be saved at ``path``), with the
    plan of the next study ``plan`` (an ``engine.planning.PlanResult``) when given."""
    from . import __version__
    from .jsonout import SCHEMA_VERSION

    if getattr(analysis, "p_holm", None) is not None:  # several outcomes (engine.outcomes)
        return _outcomes_document(analysis, path=path, now=now)
    analysis = getattr(analysis, "analysis", analysis)
    spec = analysis.spec
    from_summaries = getattr(analysis, "input", None) == "summary"
    if not from_summaries and (spec.source is None or spec.source.sha256 is None or spec.seed is None):
        raise SavedFileProblem("Only an analysis of a data file, with its checksum and seed, can be saved.")
    moment = (now or datetime.now(timezone.utc)).astimezone(timezone.utc)
    folder = Path(path).parent if path is not None else Path(".")
    document = {
        "format": FORMAT,
        "version": VERSION,
        "program_version": __version__,
        "schema_version": SCHEMA_VERSION,
        "saved_at": moment.strftime(SAVED_AT_FORMAT),
        "source_from_here": None if from_summaries else _relative_to_folder(spec.source.path, folder),
        "spec": spec.to_dict(),
        "numbers": numbers_of(analysis),
    }
    if from_summaries:
        document["summary_statistics"] = [s.to_dict() for s in analysis.stats]
    if plan is not None:
        document["plan"] = _plan_member(plan, analysis)
    return document


def _outcomes_document(found, *, path, now) -> dict[str, Any]:
    from .saved_outcomes import outcomes_member

    first = next((d.analysis for d in found.outcomes if d.analysis is not None), None)
    if first is None:
        raise SavedFileProblem("No outcome could be analysed, so there is nothing to save.")
    document = document_of(first, path=path, now=now)
    document["spec"] = found.spec.to_dict()
    document["outcomes"] = outcomes_member(found, _figure)
    return document


def save(path: str | Path, analysis, *, plan: Any = None) -> None:
    """Write ``analysis`` (an ``engine.analysis.Analysis``, or a ``pipeline.Prepared``) to
    ``path``: its spec and :func:`numbers_of` it, members in sorted order, indented, UTF-8.
    The data file is never written to; a path that is the data file itself is refused."""
    path = Path(path)
    document = document_of(analysis, path=path, plan=plan)
    source = document["spec"]["source"] and Path(document["spec"]["source"]["path"])
    try:
        if source and path.exists() and source.exists() and os.path.samefile(path, source):
            raise SavedFileProblem(f"{path.name} is the data file itself; save the analysis to a "
                                   f"file of its own ({EXTENSION}).")
    except OSError:
        pass
    text = json.dumps(document, indent=2, sort_keys=True, ensure_ascii=False, allow_nan=False)
    write_atomically(path, text + "\n")


def with_extension(path: str | Path) -> Path:
    """``path`` with :data:`EXTENSION` added when it has another suffix or none (a save never
    lands on a data file by its name)."""
    path = Path(path)
    return path if path.suffix.lower() == EXTENSION else path.with_name(path.name + EXTENSION)


def saved_schema() -> dict[str, Any]:
    """The JSON Schema of a saved-analysis file, as shipped with the package. Its ``spec`` refers
    to ``analysis.schema.json#/properties/spec`` (:func:`engine.jsonout.analysis_schema`)."""
    from importlib.resources import files

    return json.loads((files(__package__) / "schema" / "twofold.schema.json").read_text(encoding="utf-8"))


# -- reading ---------------------------------------------------------------------------------------
def _refuse(name: str, what: str) -> SavedFileProblem:
    return SavedFileProblem(f"{name} {what}")


def _without_repeats(pairs: list[tuple[str, Any]]) -> dict[str, Any]:
    members: dict[str, Any] = {}
    for key, value in pairs:
        if key in members:
            raise ValueError(f"the member '{quoted(key)}' is given twice")
        members[key] = value
    return members


def _read_bytes(path: Path, name: str) -> bytes:
    from .io import check_regular

    try:
        check_regular(path)
    except TwofoldError as problem:
        raise SavedFileProblem(problem.message) from None
    try:
        with open(path, "rb") as handle:
            data = handle.read(SIZE_LIMIT + 1)
    except OSError as error:
        raise _refuse(name, f"could not be opened: {error.strerror or type(error).__name__}.") from error
    if len(data) > SIZE_LIMIT:
        raise _refuse(name, f"is larger than {SIZE_LIMIT // (1024 * 1024)} MB: not a saved analysis "
                            "(one is a few kilobytes).")
    if not data.strip():
        raise _refuse(name, "is empty: not a saved analysis.")
    return data


def _parse(data: bytes, name: str) -> Any:
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError as error:
        raise _refuse(name, f"is not a saved analysis: byte {error.start + 1} is not UTF-8 text.") from None
    try:
        return json.loads(text, object_pairs_hook=_without_repeats,
                          parse_constant=lambda word: _no_constant(word))
    except json.JSONDecodeError as error:
        # a string still open at the end, or the text over where more was expected: cut short
        ended = error.pos >= len(text.rstrip()) or error.msg.startswith("Unterminated string")
        what = "ends too early (the file is cut short)" if ended else \
            f"is not valid JSON at line {error.lineno}, column {error.colno} ({error.msg})"
        raise _refuse(name, f"is damaged: it {what}.") from None
    except RecursionError:
        raise _refuse(name, "is damaged: it nests too deeply to be a saved analysis.") from None
    except ValueError as error:
        raise _refuse(name, f"is damaged: {error}.") from None


def _no_constant(word: str) -> Any:
    raise ValueError(f"'{word}' is not a JSON number")


def _member(document: Mapping[str, Any], key: str, kind: type | tuple[type, ...], name: str) -> Any:
    if key not in document:
        raise _refuse(name, f"is damaged: the member '{key}' is missing.")
    value = document[key]
    if not isinstance(value, kind) or isinstance(value, bool) and kind is not bool:
        raise _refuse(name, f"is damaged: the member '{key}' has a value of the wrong kind.")
    return value


_FIGURE_TEXTS = ("NaN", "Infinity", "-Infinity")


def _check_figures(figures: Any, names: tuple[str, ...], where: str, name: str) -> None:
    if not isinstance(figures, dict) or set(figures) != set(names):
        raise _refuse(name, f"is damaged: the figures of {where} are not {', '.join(names)}.")
    for key, value in figures.items():
        number = isinstance(value, (int, float)) and not isinstance(value, bool) and math.isfinite(value)
        if not (value is None or number or value in _FIGURE_TEXTS):
            raise _refuse(name, f"is damaged: {where} {key} is not a number.")


_PROCEDURE_FIGURES = ("estimate", "low", "high", "p_value", "statistic", "df")
_EFFECT_FIGURES = ("value", "low", "high")
_NUMBERS = {"groups", "procedures", "effect_sizes", "suggested"}
_MARGIN_MEMBERS = {"case", "yes", "difference_low", "difference_high"}


def _check_margins(margins: Any, name: str) -> None:
    if not isinstance(margins, dict):
        raise _refuse(name, "is damaged: its 'margins' verdicts are not listed by key.")
    for key, verdict in margins.items():
        if not isinstance(verdict, dict) or set(verdict) != _MARGIN_MEMBERS \
                or not isinstance(verdict["case"], str) or not isinstance(verdict["yes"], bool):
            raise _refuse(name, f"is damaged: the verdict of {quoted(key)} against the margin is not "
                                "case, yes, difference_low, difference_high.")
        _check_figures({k: verdict[k] for k in ("difference_low", "difference_high")},
                       ("difference_low", "difference_high"), quoted(key), name)


def _check_numbers(numbers: Any, name: str) -> dict[str, Any]:
    """The "numbers" member, checked to be what :func:`numbers_of` writes."""
    if not isinstance(numbers, dict) or set(numbers) not in (_NUMBERS, _NUMBERS | {"margins"}):
        raise _refuse(name, "is damaged: its 'numbers' are not the figures a saved analysis holds.")
    if "margins" in numbers:
        _check_margins(numbers["margins"], name)
    groups = numbers["groups"]
    if not isinstance(groups, list) or len(groups) != 2:
        raise _refuse(name, "is damaged: its 'numbers' do not hold two groups.")
    for number, group in enumerate(groups, start=1):
        if not isinstance(group, dict) or set(group) != {"label", "n", "mean", "sd"} \
                or not isinstance(group["label"], str) or not isinstance(group["n"], int) \
                or isinstance(group["n"], bool):
            raise _refuse(name, f"is damaged: the figures of group {number} are not label, n, mean, sd.")
        _check_figures({"mean": group["mean"], "sd": group["sd"]}, ("mean", "sd"), f"group {number}", name)
    for member, names in (("procedures", _PROCEDURE_FIGURES), ("effect_sizes", _EFFECT_FIGURES)):
        if not isinstance(numbers[member], dict):
            raise _refuse(name, f"is damaged: its '{member}' figures are not listed by key.")
        for key, figures in numbers[member].items():
            _check_figures(figures, names, quoted(key), name)
    if not isinstance(numbers["suggested"], str):
        raise _refuse(name, "is damaged: the suggested procedure is not named.")
    return numbers


def load(path: str | Path) -> SavedAnalysis:
    """The saved analysis in ``path``; raises :class:`SavedFileProblem` (one line naming the
    file) when it is not one, is damaged, cut short or hand-edited into something invalid, or
    was made by a newer Twofold. Unknown top-level members are ignored (a later Twofold of the
    same file version may add some); the spec and the numbers must be exactly as written."""
    path = Path(path)
    name = path.name or str(path)
    document = _parse(_read_bytes(path, name), name)
    if not isinstance(document, dict):
        raise _refuse(name, "is not a Twofold analysis: it holds no set of named members.")
    if document.get("format") != FORMAT:
        raise _refuse(name, f"is not a Twofold analysis (its 'format' is not '{FORMAT}').")
    version = _member(document, "version", int, name)
    if version > VERSION:
        raise _refuse(name, f"was made by a newer Twofold (file version {version}; this one reads "
                            f"version {VERSION}): update Twofold to open it.")
    if version < 1:
        raise _refuse(name, f"has an unknown file version ({version}).")
    program = _member(document, "program_version", str, name)
    saved_at = _member(document, "saved_at", str, name)
    try:
        datetime.strptime(saved_at, SAVED_AT_FORMAT)
    except ValueError:
        raise _refuse(name, f"is damaged: 'saved_at' is not a time written as {SAVED_AT_EXAMPLE}.") from None
    schema = document.get("schema_version")
    here = document.get("source_from_here")
    if here is not None and not isinstance(here, str) or isinstance(schema, bool) \
            or schema is not None and not isinstance(schema, int):
        raise _refuse(name, "is damaged: 'source_from_here' or 'schema_version' has a value of the wrong kind.")
    try:
        spec = AnalysisSpec.from_dict(_member(document, "spec", dict, name))
    except OptionProblem as problem:
        raise _refuse(name, f"is damaged: its analysis cannot be used. {problem.message}") from None
    stats = _checked_statistics(document.get("summary_statistics"), name)
    outcomes = _checked_member(document.get("outcomes"), name, _check_outcomes)
    if stats is None and (spec.source is None or spec.source.sha256 is None):
        raise _refuse(name, "is damaged: it does not name its data file with the file's checksum.")
    if stats is None and spec.seed is None:
        raise _refuse(name, "is damaged: it does not record the seed of its resampling.")
    numbers = _check_numbers(_member(document, "numbers", dict, name), name)
    plan = _checked_member(document.get("plan"), name, _check_plan)
    return SavedAnalysis(spec=spec, numbers=numbers, program_version=program, saved_at=saved_at,
                         location=path, source_from_here=here, schema_version=schema, plan=plan,
                         summary_statistics=stats, outcomes=outcomes)


def _checked_member(member: Any, name: str, check: Callable[[Any], dict[str, Any]]) -> dict[str, Any] | None:
    """An optional member checked by ``check`` (None when the file has none, as older files); a
    damaged one refuses the file in one line."""
    if member is None:
        return None
    try:
        return check(member)
    except OptionProblem as problem:
        raise _refuse(name, f"is damaged: {problem.message}") from None


def _check_outcomes(member: Any) -> dict[str, Any]:
    """The "outcomes" member checked (a file without it holds one outcome)."""
    from .saved_outcomes import check_outcomes_member

    return check_outcomes_member(member)


# -- an analysis from summary statistics (the optional "summary_statistics" member) ---------------
def _checked_statistics(member: Any, name: str) -> tuple[Any, ...] | None:
    """The two groups as entered (None when the file has none: an analysis of a data file)."""
    if member is None:
        return None
    from .group_stats import GroupStats

    if not isinstance(member, list) or len(member) != 2:
        raise _refuse(name, "is damaged: its 'summary_statistics' do not hold two groups.")
    groups = []
    for number, data in enumerate(member, start=1):
        try:
            groups.append(GroupStats.from_dict(data))
        except (TwofoldError, TypeError, ValueError) as problem:
            why = getattr(problem, "message", None) or "its members are not label, n, mean, sd or se, sd_known"
            raise _refuse(name, f"is damaged: summary statistics group {number}: {why}") from None
    return tuple(groups)


def rerun_summaries(saved: SavedAnalysis):
    """A saved analysis from summary statistics run again from its recorded numbers:
    (the new ``SummaryAnalysis``, "same" | "close" | "numbers_differ", the differences)."""
    from .summary_analysis import analyze_summaries

    if saved.summary_statistics is None:
        raise SavedFileProblem(f"{_saved_name(saved)} is an analysis of a data file, not of summary statistics.")
    analysis = analyze_summaries(saved.summary_statistics, saved.spec)
    status, differences = compare_numbers(saved.numbers, numbers_of(analysis))
    return analysis, status, differences


# -- the plan of the next study (the optional "plan" member, engine.plan_member) -----------------
def _plan_member(result, analysis) -> dict[str, Any]:
    from .plan_member import plan_member

    return plan_member(result, analysis.groups, analysis.spec.design)


def _check_plan(member: Any) -> dict[str, Any]:
    """The "plan" member checked (files saved before plans have none)."""
    from .plan_member import check_plan_member

    return check_plan_member(member)


# -- reopening -------------------------------------------------------------------------------------
def source_candidates(saved: SavedAnalysis, source_path: str | Path | None = None) -> list[tuple[Path, bool]]:
    """Where the data file is looked for, in order, each with "must its checksum match to be
    used": the place given (alone, when given); else an absolute recorded path, the data file's
    path relative to the saved file's folder as recorded at saving (``source_from_here``), the
    recorded path taken from the saved file's folder, and a file of that name next to the saved
    file (used only when its checksum matches)."""
    if source_path is not None:
        return [(Path(source_path), False)]
    folder = saved.location.parent if saved.location is not None else Path(".")
    recorded = Path(saved.spec.source.path)
    found = [recorded] if recorded.is_absolute() else []
    if saved.source_from_here:
        found.append(folder / saved.source_from_here)
    found.append(folder / recorded)
    candidates = [(place, False) for place in found]
    candidates.append((folder / recorded.name, True))
    unique: list[tuple[Path, bool]] = []
    for place, strict in candidates:
        if all(os.path.abspath(place) != os.path.abspath(p) for p, _ in unique):
            unique.append((place, strict))
    return unique


def _locate(saved: SavedAnalysis, source_path) -> tuple[Path | None, str | None, bool]:
    """The data file to read, its checksum now and whether it was found by its name next to the
    saved file; (None, None, False) when there is none."""
    from .io import file_checksum

    for place, strict in source_candidates(saved, source_path):
        if not place.is_file():
            continue
        try:
            checksum = file_checksum(place)
        except TwofoldError:
            continue
        if strict and checksum != saved.spec.source.sha256:
            continue
        return Path(os.path.normpath(place)), checksum, strict
    return None, None, False


def _saved_name(saved: SavedAnalysis) -> str:
    return saved.location.name if saved.location is not None else "The saved analysis"


def reopen(saved: SavedAnalysis, *, source_path: str | Path | None = None,
           progress: Progress | None = None, cancelled: CancelCheck | None = None) -> Reopened:
    """Read the data file again, check its checksum, run the analysis again with the recorded
    seed and compare the numbers (see :class:`Reopened` for the statuses).

    ``source_path``: where the user located a moved data file (its checksum must still match,
    else the status is "source_changed"). A spec that no longer fits the data (a column or group
    that is gone) raises :class:`SavedFileProblem` with the reason in one line."""
    from . import pipeline

    if saved.summary_statistics is not None:
        raise SavedFileProblem(f"{_saved_name(saved)} is an analysis of summary statistics, with no data "
                               "file to read again; run it again with analyze --spec.")
    recorded = saved.spec.source
    place, checksum, beside = _locate(saved, source_path)
    if place is None:
        where = f" (looked at {quoted(str(source_path), 300)})" if source_path is not None else ""
        return Reopened(saved, "source_missing",
                        f"The data file {quoted(Path(recorded.path).name)} was not found{where}; "
                        "say where it is now to run the analysis again.")
    elsewhere = source_path is not None or beside
    spec = saved.spec.replace(source=Source(str(place), recorded.sheet, checksum))
    try:
        if saved.outcomes is not None:
            from .outcomes import outcomes_from_file
            from .saved_outcomes import flat, outcome_figures, outcomes_of

            prepared = outcomes_from_file(spec, outcomes_of(saved.outcomes),
                                          procedure=saved.outcomes["procedure"],
                                          adjustment=saved.outcomes["adjustment"],
                                          progress=progress, cancelled=cancelled)
        else:
            prepared = pipeline.from_file(None, spec, progress=progress, cancelled=cancelled)
    except Cancelled:
        raise
    except TwofoldError as problem:
        raise SavedFileProblem(f"{_saved_name(saved)}: the analysis no longer fits its data: "
                               f"{problem.message}") from problem
    if saved.outcomes is not None:
        status, differences = _compare_flat(flat(saved.outcomes["figures"]), flat(outcome_figures(prepared, _figure)))
    else:
        status, differences = compare_numbers(saved.numbers, numbers_of(prepared.analysis))
    changed = checksum != recorded.sha256
    if changed:
        status = "source_changed"
    message = _message(status, place.name, elsewhere, differences)
    return Reopened(saved, status, message, differences, prepared, str(place), elsewhere)


def _message(status: str, file: str, elsewhere: bool, differences: tuple[str, ...]) -> str:
    found = f"{file}, found at a new place with the same checksum" if elsewhere else file
    if status == "same":
        return f"Run again on {found}, the analysis gave the saved numbers exactly."
    if status == "close":
        return (f"Run again on {found}, the analysis gave the saved numbers to within "
                f"{CLOSE_ENOUGH:g} relative (such last-digit differences come from another computer "
                "or other library versions).")
    if status == "source_changed":
        count = len(differences)
        return (f"{file} has changed since the analysis was saved (its checksum differs), so the "
                "analysis run on it now cannot confirm the saved numbers"
                + (f"; {count} of its figures differ." if count else
                   ", although its figures come out the same."))
    listed = "; ".join(differences[:DIFFERENCES_SHOWN])
    more = len(differences) - DIFFERENCES_SHOWN
    return (f"{file} is unchanged, but the analysis now gives other numbers than it saved: {listed}"
            + (f"; and {more} more." if more > 0 else "."))
