"""The README's example of ``python -m engine plan`` runs and prints the sentence the README quotes."""

import io
import math
import re
import shlex
from pathlib import Path

from statsmodels.stats.power import TTestIndPower

from engine.cli import main

README = Path(__file__).resolve().parents[2] / "README.md"


def test_the_readme_plan_example_prints_what_the_readme_says():
    section = README.read_text(encoding="utf-8").split("### Planning the next study", 1)[1].split("\n## ", 1)[0]
    command = re.search(r"```\n\.venv/bin/python -m engine (plan [^\n]+)\n```", section).group(1)
    quoted = re.search(r'prints "(.+?)", then', section, re.S).group(1)
    out = io.StringIO()
    assert main(shlex.split(command), out=out, err=io.StringIO()) == 0
    assert out.getvalue().splitlines()[0] == " ".join(quoted.split())
    # the size it quotes is the pooled t-test's from statsmodels TTestIndPower().solve_power(5/6,
    # alpha=0.05, power=0.8) rounded up (23.6 -> 24); Welch's needs the same here (equal SDs and sizes)
    assert "With 24 units per group" in quoted
    assert math.ceil(TTestIndPower().solve_power(5 / 6, alpha=0.05, power=0.8)) == 24
