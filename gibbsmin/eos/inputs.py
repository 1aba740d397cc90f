"""Checking and shaping the (T, P, y) arguments of a gas-model evaluation."""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ..errors import InputError

#: Largest accepted |sum(y) - 1|; y is renormalised within it.
MOLE_FRACTION_SUM_TOLERANCE = 1e-6


def _scalar_condition(value: float, name: str, unit: str) -> float:
    if not (math.isfinite(value) and value > 0.0):
        raise InputError(f"{name} must be finite and positive in [{unit}], got {name} = {value!r}")
    return float(value)


def _condition_array(value: ArrayLike, name: str, unit: str) -> NDArray[np.float64]:
    try:
        array = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"{name} must be a number or an array of numbers in [{unit}], got {value!r}") from None
    if array.ndim > 1:
        raise InputError(f"{name} must be a number or a 1-D array of conditions, got shape {array.shape}")
    bad = ~(np.isfinite(array) & (array > 0.0))
    if bad.any():
        first = array.reshape(-1)[np.argmax(bad.reshape(-1))]
        raise InputError(f"{name} must be finite and positive in [{unit}], got {name} = {first!r}")
    return array


def _mole_fractions(y: ArrayLike, n_species: int | None) -> NDArray[np.float64]:
    try:
        y_array = np.asarray(y, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"y must be an array of mole fractions, got {y!r}") from None
    if y_array.ndim not in (1, 2) or (n_species is not None and y_array.shape[-1] != n_species):
        expected = "(S,) or (B, S)" if n_species is None else f"({n_species},) or (B, {n_species})"
        raise InputError(
            f"y has shape {y_array.shape} but the model expects {expected}: "
            "give one mole fraction per species, in the model's species order"
        )
    if not np.isfinite(y_array).all():
        raise InputError("y contains NaN or infinite mole fractions; give finite values")
    if (y_array < 0.0).any():
        raise InputError(
            f"y contains a negative mole fraction ({y_array.min():.3g}); mole fractions must be >= 0"
        )
    total = y_array.sum(axis=-1, keepdims=True)
    deviation = np.abs(total - 1.0)
    if (deviation > MOLE_FRACTION_SUM_TOLERANCE).any():
        worst = total.reshape(-1)[np.argmax(deviation.reshape(-1))]
        raise InputError(
            f"mole fractions sum to {worst:.9g}, not 1 (tolerance {MOLE_FRACTION_SUM_TOLERANCE:g}); "
            "normalise y before calling"
        )
    return y_array / total


def check_conditions(
    T: ArrayLike, P: ArrayLike, y: ArrayLike, n_species: int | None
) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64], bool]:
    """Validated T [K] and P [Pa] with shape (B, 1), y with shape (B, S), and whether it was one condition.

    T and P are numbers or 1-D arrays, y is (S,) or (B, S); they broadcast
    against each other along the batch axis.  y is divided by its sum.

    Raises
    ------
    InputError
        T or P not finite and positive; y of the wrong length, negative, not
        finite or not summing to one within MOLE_FRACTION_SUM_TOLERANCE;
        batch lengths that do not match.
    """
    if isinstance(T, float | int) and isinstance(P, float | int):
        # The single condition of an iterative solver: skip the array checks.
        T_array = np.array([_scalar_condition(T, "T", "K")])
        P_array = np.array([_scalar_condition(P, "P", "Pa")])
    else:
        T_array = _condition_array(T, "T", "K")
        P_array = _condition_array(P, "P", "Pa")
    y_array = _mole_fractions(y, n_species)
    single = np.ndim(T) == 0 and np.ndim(P) == 0 and y_array.ndim == 1
    try:
        batch = np.broadcast_shapes(T_array.shape, P_array.shape, y_array.shape[:-1], (1,))
    except ValueError:
        raise InputError(
            f"T, P and y describe different numbers of conditions (shapes {np.shape(T)}, "
            f"{np.shape(P)}, {y_array.shape}); give equal batch lengths"
        ) from None
    n_batch = batch[0]
    T_b = np.broadcast_to(T_array.reshape(-1, 1), (n_batch, 1))
    P_b = np.broadcast_to(P_array.reshape(-1, 1), (n_batch, 1))
    y_b = np.broadcast_to(y_array.reshape(-1, y_array.shape[-1]), (n_batch, y_array.shape[-1]))
    return T_b, P_b, y_b, single
