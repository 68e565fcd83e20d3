"""Smooth rectifier used in the mixed-precision (float16) training run (invented demo)."""
import numpy as np


def smooth_rect(x):
    # softplus, written the obvious way: f(x) = log(1 + exp(x))
    return np.log(1.0 + np.exp(x))


def smooth_rect_grad(x):
    return 1.0 / (1.0 + np.exp(-x))
