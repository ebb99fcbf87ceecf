"""The base section of a lug under a lateral (out-of-plane) load: bending about its weak axis with the
in-plane force, checked to the general member clauses of the method's family.

Columns (SI arrays, one entry per row): H (lateral force at the hole centre), N (in-plane force along
the lug axis, tension positive), V (in-plane force across the axis), h (hole centre to the base section),
b, t (width and thickness of the solid rectangular base section), fy.

Moments at the base: weak axis Mz = H h, strong axis (in the plane) My = V h. A padeye base is short and
stocky: no buckling of it is considered (lateral-torsional or under compression); the axial term takes |N|.

References:
    EN 1993-1-1:2005 §6.2.3 eq (6.6), §6.2.5 eq (6.13), §6.2.6 eq (6.18), §6.2.1(7) eq (6.2).
    ANSI/AISC 360-16 §D2(a), §F11.1, §G1, §H1.1 eqs (H1-1a), (H1-1b).
    The equation forms are quoted from memory (not read here): confirm them against your copy.
"""

from __future__ import annotations

import numpy as np

from .base import make_check as _check
from .base import term as _term


def _sections(L):
    b, t = L["b"], L["t"]
    A = b * t
    return A, b * t**2 / 4, b * t**2 / 6, t * b**2 / 4, t * b**2 / 6  # A, Zz, Sz (weak), Zy, Sy (strong)


def _base_terms(L):
    """The terms every base check shows: H, V, h, b, t, fy."""
    return (_term("H", "force", L["H"]), _term("V", "force", L["V"]), _term("h", "length", L["h"]),
            _term("b", "length", L["b"]), _term("t", "length", L["t"]), _term("fy", "stress", L["fy"]))


def en1993_1_1(L, f, variant=None):
    """Base section of a lug: EN 1993-1-1 cross-section resistance, linear interaction §6.2.1(7)."""
    g0 = f["gamma_M0"]
    A, Zz, _, Zy, _ = _sections(L)
    Mz, My, N = L["H"] * L["h"], np.abs(L["V"]) * L["h"], np.abs(L["N"])
    N_Rd = A * L["fy"] / g0  # eq (6.6)
    Mz_Rd = Zz * L["fy"] / g0  # eq (6.13), Wpl of a solid rectangle (class 1)
    My_Rd = Zy * L["fy"] / g0
    V_Rd = A * L["fy"] / (np.sqrt(3) * g0)  # eq (6.18), Av = A for a solid rectangle (common practice)
    ratio = N / N_Rd + My / My_Rd + Mz / Mz_Rd  # eq (6.2)
    fac = f"γM0 = {g0:g}"
    H, V, h, b, t, fy = _base_terms(L)
    t_g0 = _term("γM0", "ratio", g0)
    return [
        _check("base weak-axis bending", "EN 1993-1-1 §6.2.5 eq (6.13): Mz,Rd = Wpl,z fy / γM0, Wpl,z = b t²/4",
               "moment", Mz, Mz_Rd, fac, None, "Mz = H h, the lateral force at the hole centre",
               terms=(H, h, b, t, fy, t_g0),
               worked=("Mz,Ed = {H} × {h}", "Mz,Rd = {b} × ({t})² / 4 × {fy} / {γM0}")),
        _check("base N + M interaction", "EN 1993-1-1 §6.2.1(7) eq (6.2): NEd/NRd + My,Ed/My,Rd + Mz,Ed/Mz,Rd ≤ 1",
               "ratio", ratio, np.ones_like(ratio), fac, None, "no buckling of the short base section considered",
               terms=(_term("NEd", "force", N), _term("NRd", "force", N_Rd), _term("My,Ed", "moment", My),
                      _term("My,Rd", "moment", My_Rd), _term("Mz,Ed", "moment", Mz), _term("Mz,Rd", "moment", Mz_Rd)),
               worked=("{NEd} / {NRd} + {My,Ed} / {My,Rd} + {Mz,Ed} / {Mz,Rd}", "1")),
        _check("base shear", "EN 1993-1-1 §6.2.6 eq (6.18): Vpl,Rd = Av fy / (√3 γM0), Av = b t", "force",
               np.hypot(L["H"], L["V"]), V_Rd, fac, None, "resultant of the lateral and the in-plane shear",
               terms=(H, V, b, t, fy, t_g0),
               worked=("VEd = √(({H})² + ({V})²)", "Vpl,Rd = {b} × {t} × {fy} / (√(3) × {γM0})")),
    ]


def aisc360_16(L, f, variant="ASD"):
    """Base section of a lug: AISC 360-16 §F11.1 yielding of a rectangular bar, §H1.1 interaction."""
    from .aisc360_16 import _avail, _resistance

    A, Zz, Sz, Zy, Sy = _sections(L)
    Mz, My, N = L["H"] * L["h"], np.abs(L["V"]) * L["h"], np.abs(L["N"])
    Pc, fp = _resistance(L["fy"] * A, f, "ty", variant)  # §D2(a)
    Mcz, fm = _resistance(np.minimum(L["fy"] * Zz, 1.6 * L["fy"] * Sz), f, "pb", variant)  # §F11.1
    Mcy, _ = _resistance(np.minimum(L["fy"] * Zy, 1.6 * L["fy"] * Sy), f, "pb", variant)
    Vc, fv = _resistance(0.6 * L["fy"] * A, f, "ty", variant)  # §G1 form 0.6 Fy Aw; factor as §D2(a)
    r = N / Pc
    ratio = np.where(r >= 0.2, r + 8 / 9 * (My / Mcy + Mz / Mcz), r / 2 + My / Mcy + Mz / Mcz)
    H, V, h, b, t, fy = _base_terms(L)
    w_m, t_m = _avail(f, "pb", variant, "Mn", "min({fy} × {b} × ({t})² / 4, 1.6 × {fy} × {b} × ({t})² / 6)")
    w_v, t_v = _avail(f, "ty", variant, "Vn", "0.6 × {fy} × {b} × {t}")
    # (H1-1a) where Pr/Pc ≥ 0.2: 1 × Pr/Pc + 8/9 × (...); (H1-1b) below: 0.5 × Pr/Pc + 1 × (...)
    k_n, k_m = np.where(r >= 0.2, 1.0, 0.5), np.where(r >= 0.2, 8 / 9, 1.0)
    return [
        _check("base weak-axis bending", "AISC 360-16 §F11.1: Mn = Fy Z ≤ 1.6 Fy S about the weak axis", "moment",
               Mz, Mcz, fm, None, "Mz = H h, the lateral force at the hole centre",
               terms=(H, h, b, t, fy, t_m), worked=("Mrz = {H} × {h}", w_m)),
        _check("base N + M interaction", "AISC 360-16 §H1.1 eqs (H1-1a), (H1-1b)", "ratio", ratio,
               np.ones_like(ratio), f"{fp}, {fm}", None,
               "strong-axis Mn by yielding (a short base: no lateral-torsional buckling considered); "
               "kN = 1, kM = 8/9 by (H1-1a) where Pr/Pc ≥ 0.2, else kN = 0.5, kM = 1 by (H1-1b)",
               terms=(_term("kN", "ratio", k_n), _term("Pr", "force", N), _term("Pc", "force", Pc),
                      _term("kM", "ratio", k_m), _term("Mry", "moment", My), _term("Mcy", "moment", Mcy),
                      _term("Mrz", "moment", Mz), _term("Mcz", "moment", Mcz)),
               worked=("{kN} × {Pr} / {Pc} + {kM} × ({Mry} / {Mcy} + {Mrz} / {Mcz})", "1")),
        _check("base shear", "AISC 360-16 §G1 (common practice for a plate): Vn = 0.6 Fy A", "force",
               np.hypot(L["H"], L["V"]), Vc, fv, None, "resultant of the lateral and the in-plane shear",
               terms=(H, V, b, t, fy, t_v), worked=("Vr = √(({H})² + ({V})²)", w_v)),
    ]


#: Base-section checks by the name of the design method in force.
BASE_CHECKS = {"EN 1993-1-8": en1993_1_1, "AISC 360-16": aisc360_16}
