"""The sign-flip permutation test of paired differences: is their mean zero?

Under the null hypothesis each difference is as likely to have come out with the other sign
(the pair's two measurements are exchangeable), so every one of the 2^n sign patterns is equally
likely. With T the observed mean difference and T* its value under a pattern, b counts patterns
at least as extreme: T* >= T ("greater"), T* <= T ("less") or |T*| >= |T| ("two-sided"); values
within 1e-12 of the data's scale of the boundary count as ties and hence as extreme. Up to
``n_resamples`` patterns every one is counted (exact); beyond, m random patterns give
p = (b + 1) / (m + 1) (Phipson and Smyth 2010), standard error sqrt(p (1 - p) / m).

Random patterns are drawn as random bytes, eight pairs to a byte. For each block of eight pairs
a table of 256 sums gives the total of the differences whose sign a byte flips, so a pattern's
statistic is one table look-up per eight pairs: sum(s d) = sum(d) - 2 sum(flipped d).
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from ..errors import OptionProblem
from ..results import ProcedureResult
from ..tasks import CancelCheck, Progress, Task
from ._checks import check_alternative, check_sample
from .resampling import EXTREME_WORDS, TIE_TOLERANCE, _check_rng, byte_sums, count_extreme, marked_sums

__all__ = ["sign_flip_test", "flip_means"]

# Patterns per batch: the bytes of a batch and its look-ups stay within a few tens of MB.
_BATCH_LOOKUPS = 4_000_000


def flip_means(d: np.ndarray, patterns: np.ndarray, tables: np.ndarray) -> np.ndarray:
    """Mean of s * d for each row of ``patterns`` (bytes; a set bit flips that pair's sign);
    ``tables`` is :func:`engine.procedures.resampling.byte_sums` of ``d``."""
    return (d.sum() - 2.0 * marked_sums(tables, patterns)) / d.size


def _every_pattern(n: int, batch: int):
    """All 2^n sign patterns as bytes, in batches."""
    blocks = -(-n // 8)
    total = 1 << n
    for start in range(0, total, batch):
        codes = np.arange(start, min(start + batch, total), dtype=np.uint64)
        shifts = (8 * np.arange(blocks)).astype(np.uint64)
        yield ((codes[:, None] >> shifts[None, :]) & np.uint64(255)).astype(np.uint8)


def _random_patterns(rng: np.random.Generator, n: int, total: int, batch: int):
    blocks = -(-n // 8)
    tail_mask = np.uint8((1 << (n - 8 * (blocks - 1))) - 1) if n % 8 else np.uint8(255)
    for start in range(0, total, batch):
        rows = min(batch, total - start)
        patterns = rng.integers(0, 256, size=(rows, blocks), dtype=np.uint8)
        patterns[:, -1] &= tail_mask  # the padding pairs are zeros: their bits change nothing
        yield patterns


def sign_flip_test(differences: Any, *, alternative: str = "two-sided", n_resamples: int = 10_000,
                   rng: np.random.Generator | None = None, progress: Progress | None = None,
                   cancelled: CancelCheck | None = None) -> ProcedureResult:
    """The sign-flip permutation test of the mean of paired differences (group 1 minus group 2).

    Memory stays within a few tens of MB at any size: patterns are drawn, looked up and counted
    in batches, and only the count of extreme ones is kept.
    """
    d = check_sample(differences, name="the differences", minimum=1)
    alternative = check_alternative(alternative)
    if not (isinstance(n_resamples, int) and n_resamples >= 100):
        raise OptionProblem(f"Use at least 100 resamples, not {n_resamples!r}.")
    rng = _check_rng(rng)
    task = Task.of(progress, cancelled)
    n = d.size
    unit = float(np.max(np.abs(d))) or 1.0
    scaled = d / unit
    tables = byte_sums(scaled)
    observed = float(scaled.mean())
    tolerance = TIE_TOLERANCE * max(1.0, abs(observed))
    exact = n < 63 and (1 << n) <= n_resamples
    total = (1 << n) if exact else n_resamples
    batch = max(1, _BATCH_LOOKUPS // tables.shape[0])
    patterns = _every_pattern(n, batch) if exact else _random_patterns(rng, n, total, batch)
    extreme, done = 0, 0
    for chunk in patterns:
        task.check()
        extreme += count_extreme(flip_means(scaled, chunk, tables), observed, alternative, tolerance)
        done += chunk.shape[0]
        task.report(done / total, "sign-flip permutation test")
    extra, denominator = (0, total) if exact else (1, total + 1)
    p_value = (extreme + extra) / denominator
    tail = EXTREME_WORDS[alternative]
    method = (f"exact: all {total:,} sign patterns of the differences; p counts patterns with {tail}"
              if exact else
              f"{total:,} random sign patterns; p = (b + 1) / (m + 1) with b the patterns with {tail}")
    return ProcedureResult(
        key="sign_flip_mean",
        name="sign-flip permutation test, mean difference",
        estimate=float(d.mean()), estimate_name="mean of the pair differences", statistic=float(d.mean()),
        statistic_name="mean difference", df=None, p_value=float(p_value), interval=None,
        alternative=alternative, method=method,
        details=dict(n_pairs=n, exact=exact, n_extreme=extreme, n_resamples=total),
        mc_standard_error=None if exact else math.sqrt(p_value * (1 - p_value) / total),
    )

