"""The shapes a simulated study's values may take, each with mean 0 and SD 1 (the plan scales
them by its SDs and shifts group 1 by the difference):

- "normal": the standard normal distribution;
- "skewed": a gamma distribution with shape 2 (skewness 1.41, a long right tail), standardised;
- "heavy_tailed": Student's t with 3 degrees of freedom (tails far heavier than the normal's;
  excess kurtosis unbounded), divided by sqrt(3) so that its SD is 1.

Each shape gives random draws, its cdf and its quantile function (for the probability that a
value of group 1 exceeds one of group 2, behind the rank test's approximation).
"""

from __future__ import annotations

import math
from typing import Mapping

import numpy as np

from ..results import frozen_mapping

__all__ = ["draw", "cdf", "quantile", "SHAPE_WORDS", "GAMMA_SHAPE", "T_DF"]

GAMMA_SHAPE = 2.0
T_DF = 3.0

# How each shape is said in a sentence ("... if the values are <words> with SD 6 MPa").
SHAPE_WORDS: Mapping[str, str] = frozen_mapping({
    "normal": "normally distributed",
    "skewed": "right-skewed like a gamma distribution of shape 2 (skewness 1.4)",
    "heavy_tailed": "heavy-tailed like Student's t with 3 degrees of freedom",
})


def draw(shape: str, rng: np.random.Generator, size: tuple[int, ...]) -> np.ndarray:
    """Standardised draws (mean 0, SD 1) of ``shape``."""
    if shape == "normal":
        return rng.standard_normal(size)
    if shape == "skewed":
        values = rng.standard_gamma(GAMMA_SHAPE, size)
        values -= GAMMA_SHAPE
        values /= math.sqrt(GAMMA_SHAPE)
        return values
    values = rng.standard_t(T_DF, size)
    values /= math.sqrt(T_DF / (T_DF - 2.0))
    return values


def cdf(shape: str, z: np.ndarray) -> np.ndarray:
    """P(Z <= z) for the standardised ``shape``."""
    from scipy import special

    z = np.asarray(z, dtype=float)
    if shape == "normal":
        return special.ndtr(z)
    if shape == "skewed":
        return special.gammainc(GAMMA_SHAPE, np.maximum(GAMMA_SHAPE + math.sqrt(GAMMA_SHAPE) * z, 0.0))
    return special.stdtr(T_DF, z * math.sqrt(T_DF / (T_DF - 2.0)))


def quantile(shape: str, p: np.ndarray) -> np.ndarray:
    """The point of the standardised ``shape`` with probability ``p`` below it."""
    from scipy import special

    p = np.asarray(p, dtype=float)
    if shape == "normal":
        return special.ndtri(p)
    if shape == "skewed":
        return (special.gammaincinv(GAMMA_SHAPE, p) - GAMMA_SHAPE) / math.sqrt(GAMMA_SHAPE)
    return special.stdtrit(T_DF, p) / math.sqrt(T_DF / (T_DF - 2.0))
