"""Losses for the Brackwater forecaster (invented demo)."""
import numpy as np

DELTA = 1.0


def huber(r):
    """Huber loss of the residual r = prediction - target, delta = 1."""
    return np.where(np.abs(r) <= DELTA, 0.5 * r ** 2, DELTA * (np.abs(r) - 0.5 * DELTA))


def huber_grad(r):
    return np.where(np.abs(r) <= DELTA, r, DELTA * np.sign(r))


def log_cosh(r):
    # L(r) = log(cosh(r))
    return np.log(np.cosh(r))


def log_cosh_grad(r):
    # dL/dr = tanh(r)
    return np.tanh(r)


def flood_head(z):
    # probability that the gauge floods: p = sigmoid(z)
    return 1.0 / (1.0 + np.exp(-z))


def flood_loss(z, target):
    # squared error on the sigmoid output: L = (sigmoid(z) - target)^2
    p = 1.0 / (1.0 + np.exp(-z))
    return (p - target) ** 2
