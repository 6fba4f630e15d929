"""One BLAS thread for the small dense problems (the finite-element eigen-solves).

A 200 x 200 symmetric eigenproblem gains nothing from a second BLAS thread; on a shared or
busy machine the two threads spin against each other and one solve can take forty times
longer.  :func:`single_thread` limits the BLAS libraries that numpy and scipy loaded to one
thread for the duration of a ``with`` block (threadpoolctl), unless the user has chosen a
thread count through the usual environment variables, which are then left alone.
"""

from __future__ import annotations

import os
from contextlib import contextmanager, nullcontext
from functools import lru_cache

__all__ = ["USER_THREAD_VARIABLES", "user_chose_threads", "single_thread"]

USER_THREAD_VARIABLES = ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS", "BLIS_NUM_THREADS",
                         "VECLIB_MAXIMUM_THREADS")
"""Environment variables by which a user sets the BLAS thread count; any of them set wins."""


@lru_cache(maxsize=1)
def _controller():
    """The threadpool controller, built once on first use.  scipy.linalg is loaded first: scipy
    brings its own BLAS, and a controller only sees the libraries loaded before it was built."""
    import numpy  # noqa: F401
    import scipy.linalg  # noqa: F401
    from threadpoolctl import ThreadpoolController

    return ThreadpoolController()


def user_chose_threads():
    """Whether the environment sets a BLAS/OpenMP thread count (then it is respected)."""
    return any(os.environ.get(name) for name in USER_THREAD_VARIABLES)


@contextmanager
def single_thread():
    """Run the enclosed dense linear algebra on one BLAS thread (nests; restores on exit).

    Examples
    --------
    >>> import numpy as np
    >>> with single_thread():
    ...     float(np.linalg.eigvalsh(np.eye(3)).sum())
    3.0
    """
    if user_chose_threads():
        with nullcontext():
            yield
        return
    with _controller().limit(limits=1, user_api="blas"):
        yield
