"""Scenario blocks: a large vectorized solve taken one block of scenarios at a time.

A solve of N scenarios works on arrays of (rows x N) numbers, rows being the line's lumens.
Taken whole, a solve of 10^7 scenarios would hold dozens of such arrays at once (gigabytes)
and every one of its numpy operations would stream them through main memory.  Taken in
blocks of about :data:`BLOCK_ELEMENTS` numbers, every temporary array of a block fits in the
processor's cache, the solve runs two to four times faster, and its working memory is a few
megabytes whatever N is; only the answers (a few numbers per scenario and part) are held for
all N.

:class:`Blocks` splits a scenario shape into blocks of its flat (C-order) index;
:meth:`Block.take` reads the block's values of any input that broadcasts to the scenario
shape (a part's bore, a fluid's density, a drive) without copying more than the block;
:meth:`Block.take_rheology` does the same for a rheology model's parameters.

Examples
--------
>>> import numpy as np
>>> blocks = Blocks((5, 3), rows=1, size=4)
>>> [(b.start, b.stop) for b in blocks]
[(0, 4), (4, 8), (8, 12), (12, 15)]
>>> column = np.arange(5.0).reshape(5, 1)          # one value per row of the 5 x 3 grid
>>> [b.take(column).tolist() for b in blocks][1]   # flat points 4..7 lie in rows 1 and 2
[1.0, 1.0, 2.0, 2.0]
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

__all__ = ["BLOCK_ELEMENTS", "Block", "Blocks", "flat_rows"]

#: Numbers (lumen rows x scenarios) of one block: some 64 kB per temporary array, so that the
#: few dozen temporaries of a residual pass stay in a core's L2 cache (measured on the
#: benchmark machine: 8192 runs the friction chain 3.5 times faster than 200,000 at once).
BLOCK_ELEMENTS = 8192
#: Fewest scenarios in a block (a line of many lumens still gets blocks worth a numpy call).
MIN_BLOCK_SCENARIOS = 256


class Blocks:
    """The blocks of a scenario shape for a solve over ``rows`` lumen rows.

    Parameters
    ----------
    shape : tuple of int
        The scenario shape.
    rows : int
        Lumen rows of the line (sets the block size: about :data:`BLOCK_ELEMENTS` numbers).
    size : int, optional
        Scenarios per block (default from ``rows``).
    """

    def __init__(self, shape, rows=1, size=None):
        self.shape = tuple(int(s) for s in shape)
        self.count = math.prod(self.shape)
        if size is None:
            size = max(MIN_BLOCK_SCENARIOS, BLOCK_ELEMENTS // max(1, int(rows)))
        self.size = int(size)

    @property
    def single(self) -> bool:
        """True when one block holds every scenario (the solve then needs no blocks)."""
        return self.count <= self.size

    def __len__(self):
        return -(-self.count // self.size)

    def __iter__(self):
        for start in range(0, self.count, self.size):
            yield Block(self.shape, start, min(start + self.size, self.count))


class Block:
    """Scenarios ``start`` to ``stop`` (flat C-order index) of ``shape``."""

    def __init__(self, shape, start, stop):
        self.full_shape = shape
        self.start, self.stop = start, stop
        self.shape = (stop - start,)
        self._index = None

    def _multi_index(self):
        if self._index is None:
            self._index = np.unravel_index(np.arange(self.start, self.stop), self.full_shape)
        return self._index

    def take(self, value):
        """The block's values of ``value`` (broadcastable to the scenario shape).

        A value the same in every scenario (a scalar, or size 1) is returned as it is; an
        array gives a 1-D array of the block's scenarios (a view where the layout allows).
        """
        if value is None or np.ndim(value) == 0:
            return value
        v = np.asarray(value)
        if v.size == 1:
            return v.reshape(())
        ndim = len(self.full_shape)
        vshape = (1,) * (ndim - v.ndim) + v.shape
        if vshape == self.full_shape and v.flags.c_contiguous:
            return v.reshape(-1)[self.start : self.stop]
        index = self._multi_index()
        picked = tuple(index[k] if vshape[k] > 1 else 0 for k in range(ndim))
        return v.reshape(vshape)[picked]

    def take_rheology(self, rheology):
        """The rheology model with its array parameters taken for the block (dataclass
        models); a model with no array parameters is returned as it is."""
        if not dataclasses.is_dataclass(rheology):
            return rheology
        changes = {
            f.name: self.take(getattr(rheology, f.name))
            for f in dataclasses.fields(rheology)
            if np.ndim(getattr(rheology, f.name)) > 0
        }
        return dataclasses.replace(rheology, **changes) if changes else rheology


def flat_rows(array, rows):
    """``array`` of shape ``(rows, *shape)`` (C-contiguous) seen as ``(rows, n)``."""
    return array.reshape(rows, -1)


def blockable(rheology) -> bool:
    """Whether a rheology model's array parameters can be taken per block (dataclasses)."""
    return dataclasses.is_dataclass(rheology) or not any(
        np.ndim(v) > 0 for v in vars(rheology).values()
    )
