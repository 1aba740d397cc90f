"""The compiler decorator of the kernels: numba's on-disk cache where it can be written, none where not.

numba looks for a cache folder beside the source (``__pycache__``), then under
the user's cache directory (``$NUMBA_CACHE_DIR`` first when set), and refuses
to decorate a function with ``cache=True`` when none of them can be written
(a read-only install with no writable home).  Then the kernels are compiled
in memory for this process only: the same answers, a few more seconds at the
first solve of every session.
"""

from __future__ import annotations

import warnings

from numba import njit

_warned = False


def compiled(**options):
    """``numba.njit(cache=True, **options)``, or without the cache (and one warning) where no cache can be written."""
    def decorate(function):
        global _warned
        try:
            return njit(cache=True, **options)(function)
        except RuntimeError as exc:
            if "cannot cache" not in str(exc):
                raise
        if not _warned:
            _warned = True
            warnings.warn(
                "gibbsmin: no writable folder for numba's compiled-kernel cache (beside the installed package, "
                "in $NUMBA_CACHE_DIR or under the home directory); kernels are compiled afresh in every "
                "process. Set NUMBA_CACHE_DIR to a writable folder to keep them.",
                RuntimeWarning, stacklevel=2)
        return njit(**options)(function)
    return decorate
