"""Planning the next study: the sample size for a power, the power of given sizes, or the
smallest difference detectable, for the questions and designs the analysis answers; from
assumed SDs (exact normal theory, or simulation under a chosen shape) or from pilot values
(resampled) or from a pilot's summary statistics (normal theory). GUI-free; results are frozen.

Public names: :class:`Plan`, :class:`Pilot`, :class:`SummaryPilot`, :func:`plan_study` -> :class:`PlanResult`,
:func:`power_curve` -> :class:`PowerCurve`, and the choices ``FINDS``, ``PROCEDURES``,
``DESIGNS``, ``SHAPES``, ``METHODS``, ``CURVE_AXES``.
"""

from .plan import DESIGNS, FINDS, METHODS, PROCEDURES, SHAPES, Pilot, Plan
from .planner import CURVE_POINTS, plan_study, power_curve
from .result import CURVE_AXES, PlanResult, PowerCurve
from .summary_pilot import SummaryPilot, towards

__all__ = ["Plan", "Pilot", "SummaryPilot", "towards", "PlanResult", "PowerCurve", "plan_study", "power_curve", "FINDS",
           "PROCEDURES", "DESIGNS", "SHAPES", "METHODS", "CURVE_AXES", "CURVE_POINTS"]
