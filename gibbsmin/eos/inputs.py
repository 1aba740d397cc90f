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
        raise InputError(f"{name} must be finite and positive in [{unit}], got {name} = {float(value)!r}")
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
        raise InputError(f"{name} must be finite and positive in [{unit}], got {name} = {float(first)!r}")
    return array


def _mole_fractions(y: ArrayLike, n_species: int | None) -> NDArray[np.float64]:
    try:
        y_array = np.asarray(y, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"y must be an array of mole fractions, got {y!r}") from None
    if (
        y_array.ndim not in (1, 2)
        or y_array.shape[-1] == 0
        or (n_species is not None and y_array.shape[-1] != n_species)
    ):
        expected = "(S,) or (B, S)" if n_species is None else f"({n_species},) or (B, {n_species})"
        raise InputError(
            f"y has shape {y_array.shape} but the model expects {expected}: "
            "give one mole fraction per species, in the model's species order"
        )
    total = y_array.sum(axis=-1, keepdims=True)
    worst = float(total[0]) if y_array.ndim == 1 else float(total[np.argmax(np.abs(total - 1.0)), 0])
    # A NaN or infinity anywhere makes its row sum, and so the worst sum, non-finite.
    if not math.isfinite(worst):
        raise InputError("y contains NaN or infinite mole fractions; give finite values")
    if y_array.min() < 0.0:
        raise InputError(
            f"y contains a negative mole fraction ({y_array.min():.3g}); mole fractions must be >= 0"
        )
    if abs(worst - 1.0) > MOLE_FRACTION_SUM_TOLERANCE:
        raise InputError(
            f"mole fractions sum to {worst:.9g}, not 1 (tolerance {MOLE_FRACTION_SUM_TOLERANCE:g}); "
            "normalise y before calling"
        )
    return y_array / total


def check_conditions(
    T: ArrayLike, P: ArrayLike, y: ArrayLike, n_species: int | None
) -> tuple[float | NDArray[np.float64], float | NDArray[np.float64], NDArray[np.float64], bool]:
    """Validated T [K], P [Pa] and y [-], and whether they are one condition.

    One condition (T and P numbers, y of shape (S,)) comes back as two floats
    and y of shape (S,); anything else as T and P of shape (B, 1) and y of
    shape (B, S), broadcast against each other along the batch axis.  y is
    divided by its sum.

    Raises
    ------
    InputError
        T or P not finite and positive; y of the wrong length, negative, not
        finite or not summing to one within MOLE_FRACTION_SUM_TOLERANCE;
        batch lengths that do not match.
    """
    y_array = _mole_fractions(y, n_species)
    if isinstance(T, float | int) and isinstance(P, float | int) and y_array.ndim == 1:
        return _scalar_condition(T, "T", "K"), _scalar_condition(P, "P", "Pa"), y_array, True
    T_array = _condition_array(T, "T", "K")
    P_array = _condition_array(P, "P", "Pa")
    if T_array.ndim == 0 and P_array.ndim == 0 and y_array.ndim == 1:
        return float(T_array), float(P_array), y_array, True
    try:
        (n_batch,) = np.broadcast_shapes(T_array.shape, P_array.shape, y_array.shape[:-1], (1,))
    except ValueError:
        raise InputError(
            f"T, P and y describe different numbers of conditions (shapes {np.shape(T)}, "
            f"{np.shape(P)}, {y_array.shape}); give equal batch lengths"
        ) from None
    T_b = np.broadcast_to(T_array.reshape(-1, 1), (n_batch, 1))
    P_b = np.broadcast_to(P_array.reshape(-1, 1), (n_batch, 1))
    y_b = np.broadcast_to(y_array.reshape(-1, y_array.shape[-1]), (n_batch, y_array.shape[-1]))
    return T_b, P_b, y_b, False
