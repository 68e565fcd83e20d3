"""Activations for the Brackwater gauge forecaster (invented demo).

The gauge readings are normalised per station, so inputs mostly sit in [-6, 6].
"""
import numpy as np

SURGE_SCALE = 1.5


def surge_act(x):
    """Scaled softsign: f(x) = 1.5 * x / (1 + |x|)"""
    return SURGE_SCALE * x / (1.0 + np.abs(x))


def surge_act_grad(x):
    # d/dx f(x) = 1.5 / (1 + |x|)^2
    return SURGE_SCALE / (1.0 + np.abs(x)) ** 2


def soft_floor(x):
    # Exponential below zero, identity above (an ELU with alpha = 0.5).
    if x > 0:
        return x
    else:
        return 0.5 * (np.exp(x) - 1.0)


def soft_floor_grad(x):
    if x > 0:
        return 1.0
    else:
        return -0.5 * np.exp(x)


def tide_gelu(x):
    # f(x) = x * sigmoid(1.702 * x)
    return x / (1.0 + np.exp(-1.702 * x))


def tide_gelu_grad(x):
    s = 1.0 / (1.0 + np.exp(-1.702 * x))
    return s + 1.702 * x * s * (1.0 - s)
