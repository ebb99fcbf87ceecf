"""Table look-ups by a text column (a bolt grade per row), vectorized: one look-up per distinct text."""

from __future__ import annotations

import numpy as np
import numpy.typing as npt


def per_text(texts, table: dict[str, float], default) -> npt.NDArray[np.float64]:
    """``table[t]`` for the text ``t`` of each row; ``default`` (a number or one per row) where ``t`` is
    not in the table. No Python loop over rows: the rows are grouped by their text first."""
    t = np.asarray(texts, dtype=object)
    out = np.array(np.broadcast_to(np.asarray(default, dtype=float), t.shape), dtype=float)
    if t.size == 0:
        return out
    if (t == t[0]).all():  # the common case: every row the same (e.g. no bolts: all "")
        if t[0] in table:
            out[:] = table[t[0]]
        return out
    uniq, inv = np.unique(t.astype(str), return_inverse=True)
    for k, name in enumerate(uniq.tolist()):
        if name in table:
            out[inv.reshape(t.shape) == k] = table[name]
    return out
