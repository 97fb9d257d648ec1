import numpy as np
import pytest


@pytest.fixture
def rng():
    return np.random.default_rng(20261202)


def graded_times(n, span, wobble=0.3):
    """Smoothly graded, non-uniform sample times on [0, span]."""
    u = np.linspace(0.0, 1.0, n)
    return span * (u + wobble / (2 * np.pi) * np.sin(2 * np.pi * u))


def helix(t, a=2.0, c=0.5):
    return np.column_stack([a * np.cos(t), a * np.sin(t), c * t])
