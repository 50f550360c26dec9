"""The procedures that compare two groups, one module per family.

``t`` holds the z-test with known SDs, the pooled t-test and the Welch t-test; ``ranks`` holds the
Mann-Whitney U test with the Hodges-Lehmann shift and its interval; ``brunner_munzel``
holds the Brunner-Munzel test with its interval for P(X > Y) + P(X = Y) / 2; ``resampling`` holds the
permutation tests and bootstrap intervals. Each public function takes the two samples first
(group 1, then group 2) and its options as keywords, and returns an
:class:`engine.results.ProcedureResult`. ``_checks`` holds the input checks they share.
``registry`` holds one record per procedure: what the analysis runs and everything else reads.
"""

__all__ = ["t", "ranks", "brunner_munzel", "resampling"]
