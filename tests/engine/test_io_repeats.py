"""engine.io.repeats: rows that repeat an earlier row, checked against pandas.DataFrame.duplicated.

The reference everywhere is pandas' own ``DataFrame.duplicated(keep="first")`` on the file as
written (it compares every cell and takes -0.0 as 0.0 and NaN as equal to NaN).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from engine.io import read_table
from engine.io import repeats

pytestmark = pytest.mark.slow  # every table here is above the 50,000 rows compared directly


def _written(tmp_path, frame: pd.DataFrame, name: str = "rows.csv"):
    path = tmp_path / name
    frame.to_csv(path, index=False)
    reference = np.flatnonzero(pd.read_csv(path).duplicated(keep="first").to_numpy())
    return read_table(path), reference


def _rounded(n: int, seed: int) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    return pd.DataFrame({"batch": rng.choice(["B1", "B2", "B3"], n),
                         "load": np.round(rng.normal(50, 5, n), 1),
                         "bin": rng.integers(0, 5, n).astype(float)})


def test_many_real_repeats_match_pandas(tmp_path):
    # few distinct rows, so most rows repeat one: the sieve stops early and the hash table decides
    frame = _rounded(120_000, 21)
    frame["load"] = np.round(frame["load"] / 5) * 5
    frame.loc[3, "bin"], frame.loc[4, "bin"] = -0.0, np.nan
    table, reference = _written(tmp_path, frame)
    found = repeats.duplicate_rows(table)
    assert reference.size > 100_000
    np.testing.assert_array_equal(found, reference)


def test_rows_that_share_a_hash_but_differ_are_told_apart(tmp_path, monkeypatch):
    # a hash that keeps only 8 bits makes thousands of different rows collide; the answer must
    # still be exact
    frame = _rounded(80_000, 22)
    frame.loc[[500, 60_000], ["batch", "load", "bin"]] = frame.loc[[7, 8], ["batch", "load", "bin"]].to_numpy()
    table, reference = _written(tmp_path, frame)
    exact = repeats.row_hashes
    monkeypatch.setattr(repeats, "row_hashes", lambda t: exact(t) & np.uint64(0xFF))
    found = repeats.duplicate_rows(table)
    np.testing.assert_array_equal(found, reference)
    assert {500, 60_000} <= set(found.tolist())


def test_every_row_sharing_one_hash_is_still_exact(tmp_path, monkeypatch):
    frame = _rounded(60_000, 23)
    table, reference = _written(tmp_path, frame)
    monkeypatch.setattr(repeats, "row_hashes", lambda t: np.zeros(len(t.frame), dtype=np.uint64))
    np.testing.assert_array_equal(repeats.duplicate_rows(table), reference)


def test_equal_rows_get_equal_hashes_whatever_the_zero_sign_or_missing_cell(tmp_path):
    n = 60_000
    frame = _rounded(n, 24)
    frame.loc[10, ["batch", "load", "bin"]] = ["B1", 0.0, np.nan]
    frame.loc[20, ["batch", "load", "bin"]] = ["B1", -0.0, np.nan]
    frame.loc[30, "batch"] = np.nan
    frame.loc[40, ["batch", "load", "bin"]] = frame.loc[30, ["batch", "load", "bin"]].to_numpy()
    table, reference = _written(tmp_path, frame)
    hashes = repeats.row_hashes(table)
    assert hashes[10] == hashes[20] and hashes[30] == hashes[40]
    assert {20, 40} <= set(reference.tolist())
    np.testing.assert_array_equal(repeats.duplicate_rows(table), reference)


def test_a_running_number_settles_it_without_hashing(tmp_path, monkeypatch):
    n = 60_000
    frame = _rounded(n, 25)
    frame.insert(0, "piece", np.arange(1, n + 1))
    table, reference = _written(tmp_path, frame)
    assert reference.size == 0

    def refuse(_table):
        raise AssertionError("a running number should settle it")

    monkeypatch.setattr(repeats, "row_hashes", refuse)
    assert repeats.duplicate_rows(table).size == 0
