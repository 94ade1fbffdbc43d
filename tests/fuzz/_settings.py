"""The fast fuzzing profile both fuzz test modules use: derandomized, no example database,
no shrinking (a failing example prints its input instead), no deadline."""

from __future__ import annotations

from hypothesis import HealthCheck, Phase, settings


def fast(max_examples: int):
    return settings(max_examples=max_examples, derandomize=True, database=None, deadline=None,
                    phases=(Phase.explicit, Phase.generate), print_blob=False,
                    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large,
                                           HealthCheck.large_base_example])
