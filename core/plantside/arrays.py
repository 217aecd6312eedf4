"""Array conventions shared by every layer: scalar in, scalar out; array in, array out."""

import numpy as np

__all__ = ["scalar_or_array"]


def scalar_or_array(value):
    """``value`` as a float array, or as a numpy scalar when it is 0-d.

    The core's functions take a scalar, an ndarray or a Series and return the same
    shape; this is the last step of each.

    Examples
    --------
    >>> scalar_or_array(2)
    np.float64(2.0)
    >>> scalar_or_array([1, 2])
    array([1., 2.])
    """
    value = np.asarray(value, dtype=float)
    return value[()] if value.ndim == 0 else value
