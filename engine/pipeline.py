"""One path from a file and a spec to an analysis, for the headless command, the window and the
pictures alike: read the table, complete the spec from the layout proposal, form the two groups,
run the analysis.

Each step is a function of its own, so the window can run each one in a worker as the user
changes a choice; :func:`from_file` runs them all in order.
"""

from __future__ import annotations

import bisect
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Mapping

from .errors import ColumnProblem, TwofoldError, quoted
from .spec import AnalysisSpec, SetAside, Source
from .tasks import CancelCheck, Progress

__all__ = ["Prepared", "read", "source_for", "complete", "form_groups", "source_mapping", "run",
           "from_file", "set_aside_keys", "set_aside_cells"]



@dataclass(frozen=True, eq=False)
class Prepared:
    """What the pipeline made: the completed spec (source with its checksum, columns, groups and
    seed filled in), the table, the groups with their screening, and the analysis."""

    spec: AnalysisSpec
    table: Any     # engine.io.Table
    intake: Any    # engine.io.Intake
    analysis: Any  # engine.analysis.Analysis


def source_for(path: str | Path, sheet: str | None = None) -> Source:
    """The spec's source for ``path``: the path as given, the sheet, the sha256 of the bytes."""
    from .io import file_checksum

    return Source(path=str(path), sheet=sheet, sha256=file_checksum(path))


def read(spec: AnalysisSpec):
    """The table of the spec's source file (and sheet)."""
    from .io import read_table

    if spec.source is None:
        raise TwofoldError("No data file was named.")
    return read_table(spec.source.path, sheet=spec.source.sheet)


def complete(table, spec: AnalysisSpec) -> AnalysisSpec:
    """``spec`` with the layout and columns it leaves open filled in from the layout proposal
    (long layout: the proposed group column and the first value column; wide: the first two
    columns), and the sheet that was read."""
    from .io import propose_layout

    name = table.path.name
    values, group, layout = spec.value_columns, spec.group_column, spec.layout
    if not values:
        proposal = propose_layout(table)
        if group is None:
            group = proposal.group_column
        values = tuple(proposal.value_columns[:1] if group is not None else proposal.value_columns[:2])
    if len(values) == 1 and group is None:
        group = propose_layout(table).group_column
        if group is None:
            raise ColumnProblem(f"{name}: name the column that says which group each row is in, "
                                "or give two value columns, one per group.")
    if len(values) > 2 and group is None:
        raise ColumnProblem(f"{name}: give exactly two value columns for one column per group.")
    if len(values) > 1 and group is not None:
        raise ColumnProblem(f"{name}: with a group column, give one value column, not {len(values)}.")
    layout = "long" if group is not None else "wide"
    changes: dict[str, Any] = dict(layout=layout, group_column=group, value_columns=tuple(values))
    if spec.source is not None and spec.source.sheet != table.sheet:
        changes["source"] = Source(spec.source.path, table.sheet, spec.source.sha256)
    return spec.replace(**changes)


def set_aside_keys(table, cells: tuple[SetAside, ...]) -> dict[tuple[int, str], str]:
    """The cells set aside as ``engine.io.make_groups`` takes them: (frame row, column) -> reason.

    A cell is found by its file row and column, and must still hold the text recorded: a cell
    that is gone or changed raises :class:`ColumnProblem` saying which, never a silent skip.
    """
    from .io.cells import cell_text

    frame = table.frame
    rows = len(frame)
    found: dict[tuple[int, str], str] = {}
    for cell in cells:
        if cell.column not in frame.columns:
            raise ColumnProblem(f"{table.path.name}: the column '{quoted(cell.column)}' of a value set "
                                "aside is not in the file any more.")
        frame_row = bisect.bisect_left(range(rows), cell.row, key=table.file_row)
        if frame_row >= rows or table.file_row(frame_row) != cell.row:
            raise ColumnProblem(f"{table.path.name}: row {cell.row} of a value set aside is not in "
                                "the file any more.")
        now = cell_text(frame[cell.column].iat[frame_row])
        if now != cell.text:
            raise ColumnProblem(
                f"{table.path.name}: the value set aside in row {cell.row}, column "
                f"'{quoted(cell.column)}', was '{quoted(cell.text)}' and is now '{quoted(now)}'.")
        found[(frame_row, cell.column)] = cell.reason
    return found


def set_aside_cells(table, keys: Mapping[tuple[int, str], str]) -> tuple[SetAside, ...]:
    """The spec's record of cells set aside in the grid, given as (frame row, column) -> reason."""
    from .io.cells import cell_text

    frame = table.frame
    return tuple(SetAside(row=table.file_row(row), column=column,
                          text=cell_text(frame[column].iat[row]), reason=reason)
                 for (row, column), reason in sorted(keys.items()))


def form_groups(table, spec: AnalysisSpec):
    """The two groups and their screening report, as the (completed) spec says.

    In a paired design the groups are the matched pairs: by the pair ID column in the long
    layout (``spec.pair_column``, each ID once in each group), row by row in the wide layout;
    the intake's ``pairs`` says what was matched and what was left out. Data that cannot be
    paired raise an error; a paired spec never falls back to independent groups.
    """
    from .io import make_groups

    long = spec.layout == "long"
    if spec.design == "paired" and long and spec.pair_column is None:
        raise ColumnProblem(
            f"{table.path.name}: a paired design in the long layout needs the column of pair IDs "
            "(the unit each row belongs to); name it, or give two value columns with one row "
            "per unit.")
    set_aside = set_aside_keys(table, spec.set_aside) or None
    intake = make_groups(table, values=spec.values_argument, group=spec.group_column if long else None,
                         pick=spec.groups if long else None, set_aside=set_aside)
    if spec.design != "paired":
        return intake
    return _paired(table, spec, intake, set_aside)


def _paired(table, spec: AnalysisSpec, intake, set_aside):
    """The intake of matched pairs from the same columns as ``intake``'s groups."""
    from .io.pairs import paired_intake, pairs_by_id, pairs_by_row

    if spec.layout == "long":
        pairs = pairs_by_id(table, values=spec.values_argument, group=spec.group_column,
                            pair_id=spec.pair_column, pick=tuple(intake.groups.labels),
                            set_aside=set_aside)
        how = f"by the pair IDs in '{quoted(spec.pair_column)}'"
    else:
        pairs = pairs_by_row(table, columns=spec.value_columns, set_aside=set_aside)
        how = "row by row"
    return paired_intake(intake, pairs, file_name=table.path.name, how=how)


def source_mapping(spec: AnalysisSpec) -> dict[str, Any]:
    """The ``source`` an analysis carries: the file's name, the sheet and the columns used."""
    columns = list(spec.value_columns) if spec.layout == "wide" else [spec.group_column, *spec.value_columns]
    source = {"file": Path(spec.source.path).name if spec.source else None,
              "sheet": spec.source.sheet if spec.source else None,
              "columns": columns, "group_column": spec.group_column,
              "value_columns": list(spec.value_columns)}
    if spec.pair_column is not None:
        source.update(columns=columns + [spec.pair_column], pair_column=spec.pair_column)
    return source


def run(intake, spec: AnalysisSpec, *, progress: Progress | None = None,
        cancelled: CancelCheck | None = None, rng=None):
    """The analysis of the groups ``intake`` holds, as the spec asks (``rng``: see
    :func:`engine.analysis.analyze`)."""
    from .analysis import analyze

    return analyze(intake.groups, spec, screening=intake.screening, source=source_mapping(spec),
                   pairs=getattr(intake, "pairs", None), progress=progress, cancelled=cancelled,
                   rng=rng)


def from_file(path: str | Path | None = None, spec: AnalysisSpec = AnalysisSpec(), *,
              sheet: str | None = None, progress: Progress | None = None,
              cancelled: CancelCheck | None = None) -> Prepared:
    """Every step: read ``path`` (or the spec's source), complete the spec, form the groups and
    analyse them. The spec returned records the file's checksum, the groups in order and the
    seed drawn, so that running it again gives the same numbers."""
    if path is not None:
        spec = spec.replace(source=Source(str(path), sheet if sheet is not None else
                                          (spec.source.sheet if spec.source else None)))
    table = read(spec)  # first: it refuses what is not a regular, readable data file
    if spec.source.sha256 is None:
        spec = spec.replace(source=source_for(spec.source.path, spec.source.sheet))
    spec = complete(table, spec).with_seed()
    intake = form_groups(table, spec)
    if spec.layout == "long":
        spec = spec.replace(groups=tuple(intake.groups.labels))
    analysis = run(intake, spec, progress=progress, cancelled=cancelled)
    return Prepared(spec=spec, table=table, intake=intake, analysis=analysis)
