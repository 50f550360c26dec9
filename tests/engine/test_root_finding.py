"""Brent's root finder against scipy.optimize.brentq and roots known in closed form."""

import math

import numpy as np
import pytest
from scipy import optimize

from engine.root_finding import brent_root

FUNCTIONS = [
    (lambda x: x**3 - 2 * x - 5, 2.0945514815423265),  # Wallis's cubic (Brent 1973, chapter 4)
    (lambda x: math.cos(x) - x, 0.7390851332151607),    # the Dottie number
    (lambda x: math.exp(x) - 10, math.log(10)),
    (lambda x: (x - 1.5) ** 5, 1.5),                    # a flat, many-fold root
]


@pytest.mark.parametrize("f, root", FUNCTIONS)
def test_roots_match_scipys_brentq_and_the_closed_form(f, root):
    # reference: scipy.optimize.brentq with the same tolerances (the same algorithm: found to
    # the bit here), and the roots above (Wallis's cubic and the Dottie number recalled from memory)
    rng = np.random.default_rng(11)
    for _ in range(50):
        a, b = rng.uniform(-1.0, 1.2), rng.uniform(2.5, 6.0)
        if f(a) * f(b) > 0:
            continue
        ours = brent_root(f, a, b, xtol=1e-14, maxiter=500)
        assert ours == optimize.brentq(f, a, b, xtol=1e-14, rtol=4 * np.finfo(float).eps, maxiter=500)
        assert ours == pytest.approx(root, abs=1e-13)


def test_a_bracket_without_a_sign_change_is_refused():
    with pytest.raises(ValueError, match="same sign"):
        brent_root(lambda x: x * x + 1, -1.0, 1.0)
