"""A pin as a short beam through its stack of plates.

Each plate pushes on the pin with the force its member receives there (the opposite of it), spread
uniformly over the plate's thickness, at the plate's place along the pin. Shear at each plane between
plates and the bending moment along the pin follow, as vectors in the frame's plane; their magnitudes
are checked. For a symmetric clevis this gives the EN 1993-1-8 Fig. 3.11 moment F (b + 4c + 2a) / 8.

An unsymmetric stack (a single lap) leaves the plate forces with a net couple about the pin's length.
The plates react it by uneven bearing; here it is taken as two equal end couples at the outer faces
of the stack, which for a lap of two plates gives the familiar M = F (t1 + 2 g + t2) / 4.

Two bearing models (the pin's ``pin_model``): "uniform" (above, the default) and "point", each plate's
force taken as a point load at its centre, the conservative alternative (for a clevis it gives
F (2a + 4c + 2b) / 8, a quarter of the outer plates' thickness more lever arm than Fig. 3.11).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from .frame import PinForces
from .model import Pin


@dataclass(frozen=True)
class StackResult:
    """Shear and moment of one pin for every case. Forces [N], moments [N*m], positions [m].

    Positions z run along the pin from the first face of the first plate. Plane k lies between plate k
    and plate k + 1 (0-based). Vectors have their two components in the frame's plane.
    """

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
    model: str  # "uniform" bearing over each plate, or "point" loads at plate centres
    parts: tuple[str, ...]  # name of each plate, in stack order
    share: npt.NDArray[np.float64]  # (n_plate,) share of its member's force
    z0: npt.NDArray[np.float64]  # (n_plate,) first face of each plate
    thickness: npt.NDArray[np.float64]  # (n_plate,)
    plane_shear_vec: npt.NDArray[np.float64]  # (n_case, n_plane, 2): V at each plane
    plane_z: npt.NDArray[np.float64]  # (n_plane,) middle of the gap of each plane
    moment_vec: npt.NDArray[np.float64]  # (n_case, 2): M at the governing section
    end_couple: npt.NDArray[np.float64]  # (n_case, 2): net couple held at the outer faces

    @property
    def length(self) -> float:
        """Length of the stack, first face to last face [m]."""
        return float(self.z0[-1] + self.thickness[-1])

    def moment_along(self, z) -> npt.NDArray[np.float64]:
        """Bending moment vectors (n_case, n_z, 2) at positions ``z`` [m] along the pin."""
        z = np.atleast_1d(np.asarray(z, float))
        f = -self.plate_force  # force each plate puts on the pin
        t, z0 = self.thickness, self.z0
        if self.model == "point":
            # a point load at each centre: lever arm max(z - zc, 0)
            arm = np.maximum(z[:, None] - (z0 + t / 2)[None, :], 0.0)
        else:
            # uniform over [z0, z0 + t]: the part of the plate before z acts at its own centre
            cover = np.clip(z[:, None] - z0[None, :], 0.0, t[None, :])
            arm = cover * (z[:, None] - z0[None, :] - cover / 2) / t[None, :]
        return np.einsum("cpk,zp->czk", f, arm) + self.end_couple[:, None, :] / 2

    def shear_cause(self, j: int) -> str:
        """Which plates make the governing shear of case ``j``: those on the side of its plane."""
        k = int(self.shear_plane[j])
        left, right = self.parts[:k + 1], self.parts[k + 1:]
        side = left if len(left) <= len(right) else right
        return f"plane {k + 1}-{k + 2}, between {self.parts[k]} and {self.parts[k + 1]}: the resultant of " \
               f"{_listing(side)} (the rest of the stack balances it)"

    def moment_cause(self, j: int) -> str:
        """Where the governing moment of case ``j`` lies and which plates' loads make it."""
        i = int(self.moment_plate[j])
        left = [p for p, z in zip(self.parts, self.z0 + self.thickness / 2, strict=True) if z < self.moment_at[j]]
        right = [p for p, z in zip(self.parts, self.z0 + self.thickness / 2, strict=True) if z >= self.moment_at[j]]
        side = left if len(left) <= len(right) else right
        where = f"in {self.parts[i]}" if i >= 0 else "at the stack's end"
        return f"{where}, {self.moment_at[j] * 1e3:.1f} mm from the first face: the loads of " \
               f"{_listing(side) or 'no plate (end couples only)'} about it"


def _listing(names) -> str:
    return ", ".join(names)


def part_names(pin: Pin) -> list[str]:
    """A name for each plate of the stack: its member, numbered "k/n" where a member has several."""
    names = []
    for i, p in enumerate(pin.stack):
        same = [j for j, q in enumerate(pin.stack) if q.member == p.member]
        names.append(p.member if len(same) == 1 else f"{p.member} {same.index(i) + 1}/{len(same)}")
    return names


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


def solve_stack(pin: Pin, pf: PinForces, model: str | None = None) -> StackResult:
    """Shear planes and bending moment of ``pin`` under the member forces ``pf``.

    ``model``: "uniform" bearing over each plate's thickness or "point" loads at the plate centres;
    None takes the pin's own ``pin_model``.
    """
    model = model or getattr(pin, "pin_model", "uniform")
    if model not in ("uniform", "point"):
        raise ValueError(f"pin model must be 'uniform' or 'point', got {model!r}")
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

    if model == "point":
        # point loads at the centres: |M| is the norm of an affine function between centres, so its
        # largest value lies at a centre (or at the first face, where only the end couple acts)
        zs = np.concatenate([[0.0], zc])
        cover = (zs[:, None] > zc[None, :]) * (zs[:, None] - zc[None, :])
        Mz = np.einsum("cpk,zp->czk", f, cover) + couple[:, None, :] / 2
        Mabs = np.linalg.norm(Mz, axis=-1)
        k = Mabs.argmax(axis=1)
        moment = Mabs[np.arange(len(k)), k]
        at = zs[k]
        plate_ix = np.where(k > 0, k - 1, 0)
        m_vec = Mz[np.arange(len(k)), k]
    else:
        moment, at, plate_ix, m_vec = _uniform_max(f, t, z0, V_in, M_in)

    V_planes = V_in[:, 1:]  # plane k lies between plate k and k+1
    plane_shear = np.linalg.norm(V_planes, axis=-1)
    # the first plane of a tie (a symmetric stack has two), not whichever round-off favours
    top = plane_shear.max(axis=1, keepdims=True)
    plane = np.argmax(plane_shear >= top * (1 - 1e-9), axis=1)
    shear = top[:, 0]
    plane_z = z0[1:] - np.array([p.gap for p in stack[1:]]) / 2
    return StackResult(pin.name, note, got, plane_shear, shear, plane, moment, at, plate_ix, imbalance,
                       model=model, parts=tuple(part_names(pin)), share=share, z0=z0, thickness=t,
                       plane_shear_vec=V_planes, plane_z=plane_z, moment_vec=m_vec, end_couple=couple)


def _uniform_max(f, t, z0, V_in, M_in):
    """Largest |M| under uniform bearing: in plate i, M(s) = M_in + V_in s + q s²/2; the stationary
    points of |M|² are the real roots of a cubic in s, found as eigenvalues of its companion matrix."""
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
    rows = np.arange(flat.shape[0])
    at = z0[plate_ix] + s_eval[rows, plate_ix, cand_ix]
    m_vec = M[rows, plate_ix, cand_ix]
    return moment, at, plate_ix, m_vec

