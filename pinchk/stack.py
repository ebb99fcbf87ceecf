"""A pin as a short beam through its stack of plates.

Each plate pushes on the pin with the force its member receives there (the opposite of it), spread
uniformly over the plate's thickness, at the plate's place along the pin. Shear at each plane between
plates and the bending moment along the pin follow, as vectors in the frame's plane; their magnitudes
are checked. For a symmetric clevis this gives the EN 1993-1-8 Fig. 3.11 moment F (b + 4c + 2a) / 8.

An unsymmetric stack (a single lap) leaves the plate forces with a net couple about the pin's length.
The plates react it by uneven bearing; here it is taken as two equal end couples at the outer faces
of the stack, which for a lap of two plates gives the familiar M = F (t1 + 2 g + t2) / 4.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from .frame import PinForces
from .model import Pin


@dataclass(frozen=True)
class StackResult:
    """Shear and moment of one pin for every case. Forces [N], moments [N*m], positions [m]."""

    pin: str
    share_note: str
    plate_force: npt.NDArray[np.float64]  # (n_case, n_plate, 2): force each plate receives
    plane_shear: npt.NDArray[np.float64]  # (n_case, n_plane): |V| at each plane between plates
    shear: npt.NDArray[np.float64]  # (n_case,) largest |V|
    shear_plane: npt.NDArray[np.intp]  # (n_case,) plane index of it (plane k lies after plate k)
    moment: npt.NDArray[np.float64]  # (n_case,) largest |M|
    moment_at: npt.NDArray[np.float64]  # (n_case,) where along the pin [m from the first face]
    moment_plate: npt.NDArray[np.intp]  # (n_case,) plate in which it occurs (-1: in a gap)
    imbalance: npt.NDArray[np.float64]  # (n_case,) |sum of plate forces| (0 for a pin in equilibrium)


def shares(pin: Pin) -> tuple[npt.NDArray[np.float64], str]:
    """Share of its member's force each plate carries, and how it was set."""
    th = np.array([p.thickness for p in pin.stack])
    s = np.zeros(len(pin.stack))
    given = False
    for m in {p.member for p in pin.stack}:
        ix = [i for i, p in enumerate(pin.stack) if p.member == m]
        if len(ix) == 1 and pin.stack[ix[0]].share is None:
            s[ix[0]] = 1.0
            continue
        user = [pin.stack[i].share for i in ix]
        if all(u is not None for u in user):
            s[ix] = user
            given = True
        else:
            s[ix] = th[ix] / th[ix].sum()
    note = "load share as given" if given else "load share in proportion to plate thickness"
    return s, note


def solve_stack(pin: Pin, pf: PinForces) -> StackResult:
    """Shear planes and bending moment of ``pin`` under the member forces ``pf``."""
    stack = pin.stack
    n = len(stack)
    col = np.array([pf.members.index(p.member) for p in stack])
    share, note = shares(pin)
    got = pf.force[:, col, :] * share[None, :, None]  # (n_case, n_plate, 2) force each plate receives
    f = -got  # force each plate puts on the pin
    t = np.array([p.thickness for p in stack])
    z0 = np.zeros(n)
    for i in range(1, n):
        z0[i] = z0[i - 1] + t[i - 1] + stack[i].gap
    zc = z0 + t / 2

    imbalance = np.linalg.norm(f.sum(axis=1), axis=-1)
    couple = np.einsum("cpk,p->ck", f, zc)  # net couple of the plate forces about z = 0
    # shear entering each plate and moment at each plate's first face
    V_in = np.concatenate([np.zeros_like(f[:, :1]), np.cumsum(f, axis=1)[:, :-1]], axis=1)
    M_in = np.empty_like(f)
    for i in range(n):
        # plates wholly before z0[i] act as resultants at their centres; the out-of-balance couple C
        # is held by equal end couples, so M(0) = C/2 and M(end) = -C/2 (zero for a symmetric stack)
        M_in[:, i] = np.einsum("cpk,p->ck", f[:, :i], z0[i] - zc[:i]) + couple / 2

    q = f / t[None, :, None]
    # |M(s)|^2 stationary points inside each plate: M = M_in + V_in s + q s^2 / 2
    a3 = 0.5 * np.einsum("cpk,cpk->cp", q, q)
    a2 = 1.5 * np.einsum("cpk,cpk->cp", V_in, q)
    a1 = np.einsum("cpk,cpk->cp", V_in, V_in) + np.einsum("cpk,cpk->cp", M_in, q)
    a0 = np.einsum("cpk,cpk->cp", M_in, V_in)
    cand = [np.zeros_like(a3), np.broadcast_to(t, a3.shape).copy()]
    ok = a3 > 1e-30 * np.maximum(1.0, np.abs(a1))
    roots = np.full(a3.shape + (3,), np.nan)
    if ok.any():
        A3 = a3[ok]
        comp = np.zeros((A3.size, 3, 3))
        comp[:, 0, 0] = -a2[ok] / A3
        comp[:, 0, 1] = -a1[ok] / A3
        comp[:, 0, 2] = -a0[ok] / A3
        comp[:, 1, 0] = 1.0
        comp[:, 2, 1] = 1.0
        ev = np.linalg.eigvals(comp)
        r = np.where(np.abs(ev.imag) <= 1e-9 * np.maximum(1.0, np.abs(ev.real)), ev.real, np.nan)
        roots[ok] = r
    tt = np.broadcast_to(t, a3.shape)[..., None]
    roots = np.where((roots > 0) & (roots < tt), roots, np.nan)
    s_all = np.concatenate([np.stack(cand, axis=-1), roots], axis=-1)  # (n_case, n_plate, 5)
    s_eval = np.nan_to_num(s_all, nan=0.0)
    M = (M_in[..., None, :] + V_in[..., None, :] * s_eval[..., None]
         + 0.5 * q[..., None, :] * s_eval[..., None] ** 2)
    Mabs = np.where(np.isnan(s_all), -1.0, np.linalg.norm(M, axis=-1))  # (n_case, n_plate, 5)
    flat = Mabs.reshape(Mabs.shape[0], -1)
    k = flat.argmax(axis=1)
    plate_ix, cand_ix = np.divmod(k, Mabs.shape[2])
    moment = flat[np.arange(flat.shape[0]), k]
    at = z0[plate_ix] + s_eval[np.arange(flat.shape[0]), plate_ix, cand_ix]

    plane_shear = np.linalg.norm(V_in[:, 1:], axis=-1)  # plane k lies between plate k and k+1
    plane = plane_shear.argmax(axis=1)
    shear = plane_shear[np.arange(plane_shear.shape[0]), plane]
    return StackResult(pin.name, note, got, plane_shear, shear, plane, moment, at, plate_ix, imbalance)
