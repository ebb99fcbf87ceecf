"""AISC 360-16 §D5 and §J7, pin-connected members, ASD or LRFD.

AISC 360 has no clause for the shear and bending of the pin itself; those checks follow common
practice (shear as 0.6 Fu on each plane; bending per §F11 for solid round bars) and say so.

Columns as in en1993_1_8, plus for plates fu (plate tensile strength) and rot (the pin turns under load).

References:
    ANSI/AISC 360-16 Specification for Structural Steel Buildings: §D5.1 (a)-(d), §D5.2, §D2(a), §J7,
    §F11.1. The 1999 LRFD edition numbered these D3 and J8.
"""

from __future__ import annotations

import numpy as np

from .base import make_check as _check
from .base import term

NAME = "AISC 360-16"
EDITION = "ANSI/AISC 360-16"
VARIANTS = ("ASD", "LRFD")
FACTORS = {
    "phi_tr": (0.75, "φt, tensile rupture, §D5.1(a)"),
    "omega_tr": (2.00, "Ωt, tensile rupture, §D5.1(a)"),
    "phi_sr": (0.75, "φsf, shear rupture, §D5.1(b)"),
    "omega_sr": (2.00, "Ωsf, shear rupture, §D5.1(b)"),
    "phi_ty": (0.90, "φt, tensile yielding on the gross section, §D2(a)"),
    "omega_ty": (1.67, "Ωt, tensile yielding on the gross section, §D2(a)"),
    "phi_br": (0.75, "φ, bearing on pins, §J7"),
    "omega_br": (2.00, "Ω, bearing on pins, §J7"),
    "phi_pv": (0.75, "φ, pin shear (common practice, as shear rupture)"),
    "omega_pv": (2.00, "Ω, pin shear (common practice, as shear rupture)"),
    "phi_pb": (0.90, "φb, pin bending, §F1"),
    "omega_pb": (1.67, "Ωb, pin bending, §F1"),
    "phi_bv": (0.75, "φ, shear of a bolt used as a pin, §J3.6"),
    "omega_bv": (2.00, "Ω, shear of a bolt used as a pin, §J3.6"),
}
KSI = 1000 * 4.4482216152605 / 0.0254**2  # Pa: 1000 lbf/in², exact by definition
#: Table J3.2 Fnv [Pa], (threads included in the plane N, excluded X) [seen for 360-10 and 360-16].
FNV = {"A307": (27 * KSI, 27 * KSI), "A325": (54 * KSI, 68 * KSI), "A490": (68 * KSI, 84 * KSI),
       "A325M": (54 * KSI, 68 * KSI), "A490M": (68 * KSI, 84 * KSI)}
#: Other grades: Fnv = 0.450 Fu (N) and 0.563 Fu (X), the ratios of the Table J3.2 values to Fu
#: (54/120, 67.5/120) [derived]; common practice, AISC covers only the ASTM grades.
FNV_RATIO = (0.450, 0.563)


def fnv(grades, fu):
    """Fnv with the thread included (N) and excluded (X) [Pa] by grade (Table J3.2)."""
    n = np.array([FNV[g][0] if g in FNV else FNV_RATIO[0] * u for g, u in zip(grades, fu, strict=True)], float)
    x = np.array([FNV[g][1] if g in FNV else FNV_RATIO[1] * u for g, u in zip(grades, fu, strict=True)], float)
    return n, x
BE_ADD = 0.016  # §D5.1: be = 2t + 0.63 in (2t + 16 mm); the SI 16 mm is the smaller, used for both
ROT_CLEARANCE = 0.0254 / 32  # §D5.2: hole at most 1/32 in (1 mm) over the pin; the smaller 1/32 in used


def _resistance(Rn, f, key, variant):
    """Available strength: φ Rn (LRFD) or Rn / Ω (ASD), with the factor as printed."""
    if variant == "LRFD":
        phi = f["phi_" + key]
        return phi * Rn, f"φ = {phi:g}"
    om = f["omega_" + key]
    return Rn / om, f"Ω = {om:g}"




def _avail(f, key, variant, lhs, expr):
    """The available strength as a worked expression, with the φ or Ω term it uses."""
    if variant == "LRFD":
        return f"φ{lhs} = {{φ}} × {expr}", term("φ", "ratio", f["phi_" + key])
    return f"{lhs}/Ω = {expr} / {{Ω}}", term("Ω", "ratio", f["omega_" + key])


def pin_checks(P, f, variant="ASD"):
    d = P["d"]
    A = np.pi * d**2 / 4
    Vn = 0.6 * P["fup"] * A
    Z, S = d**3 / 6, np.pi * d**3 / 32  # plastic and elastic section moduli of a solid round
    Mn = np.minimum(P["fyp"] * Z, 1.6 * P["fyp"] * S)  # §F11.1 (Mn = Fy Z ≤ 1.6 Fy S)
    Vc, fv = _resistance(Vn, f, "pv", variant)
    Mc, fb = _resistance(Mn, f, "pb", variant)
    n = d.shape[0]
    bolt = P.get("bolt", np.zeros(n, bool))
    V_sh, V_th = P.get("V_shank", P["V"]), P.get("V_thread", np.zeros(n))
    shank, thread = P.get("shank_planes", np.ones(n, bool)), P.get("thread_planes", np.zeros(n, bool))
    fnv_n, fnv_x = fnv(P.get("grade", [""] * n), P["fup"])
    c_x, f_x = _resistance(fnv_x * A, f, "bv", variant)
    c_n, f_n = _resistance(fnv_n * A, f, "bv", variant)
    t_d, t_fu, t_fy = term("d", "length", d), term("Fu", "stress", P["fup"]), term("Fy", "stress", P["fyp"])
    w_v, t_v = _avail(f, "pv", variant, "Vn", "0.6 × {Fu} × π ({d})² / 4")
    w_m, t_m = _avail(f, "pb", variant, "Mn", "min({Fy} × ({d})³ / 6, 1.6 × {Fy} × π ({d})³ / 32)")
    w_b, t_b = _avail(f, "bv", variant, "Rn", "{Fnv} × π ({d})² / 4")
    return [
        _check("pin shear", "common practice (no AISC 360 clause): Vn = 0.6 Fu A per shear plane", "force",
               P["V"], Vc, fv, ~bolt, terms=(term("V", "force", P["V"]), t_d, t_fu, t_v), worked=("V = {V}", w_v)),
        _check("bolt shear (shank)", "AISC 360-16 §J3.6, Table J3.2: Rn = Fnv Ab, Fnv threads excluded (X)",
               "force", V_sh, c_x, f_x, bolt & shank,
               terms=(term("V", "force", V_sh), term("Fnv", "stress", fnv_x), t_d, t_b), worked=("V = {V}", w_b)),
        _check("bolt shear (thread)", "AISC 360-16 §J3.6, Table J3.2: Rn = Fnv Ab, Fnv threads included (N)",
               "force", V_th, c_n, f_n, bolt & thread,
               "a thread lies in this shear plane: rigging practice warns against it",
               terms=(term("V", "force", V_th), term("Fnv", "stress", fnv_n), t_d, t_b), worked=("V = {V}", w_b)),
        _check("pin bending", "AISC 360-16 §F11.1 (common practice for pins): Mn = Fy Z ≤ 1.6 Fy S", "moment",
               P["M"], Mc, fb, terms=(term("M", "moment", P["M"]), t_d, t_fy, t_m), worked=("M = {M}", w_m)),
    ]


def plate_checks(Q, f, variant="ASD"):
    F, t, d, d0 = Q["F"], Q["t"], Q["d"], Q["d0"]
    side = Q["width"] / 2 - d0 / 2  # hole edge to plate edge, across the force
    be = np.minimum(2 * t + BE_ADD, side)  # §D5.1(a)
    a = Q["a_end"] - d0 / 2  # hole edge to plate end, along the force
    Pn_tr = Q["fu"] * 2 * t * be  # §D5.1(a) tensile rupture on the net effective area
    Pn_sr = 0.6 * Q["fu"] * 2 * t * (a + d / 2)  # §D5.1(b), Asf = 2 t (a + d/2)
    Rn_br = 1.8 * np.minimum(Q["fy"], Q["fyp"]) * t * d  # §J7, Apb = t d
    Pn_ty = Q["fy"] * t * Q["width"]  # §D2(a) on the gross section, Ag = t w
    c_tr, f_tr = _resistance(Pn_tr, f, "tr", variant)
    c_sr, f_sr = _resistance(Pn_sr, f, "sr", variant)
    c_br, f_br = _resistance(Rn_br, f, "br", variant)
    c_ty, f_ty = _resistance(Pn_ty, f, "ty", variant)
    t_P, t_t, t_d, t_d0 = (term("P", "force", F), term("t", "length", t), term("d", "length", d),
                           term("d0", "length", d0))
    t_fu, t_fy, t_w = term("Fu", "stress", Q["fu"]), term("Fy", "stress", Q["fy"]), term("w", "length", Q["width"])
    t_be, t_a = term("be", "length", be), term("a", "length", a)
    w_tr, p_tr = _avail(f, "tr", variant, "Pn", "{Fu} × 2 × {t} × {be}")
    w_sr, p_sr = _avail(f, "sr", variant, "Pn", "0.6 × {Fu} × 2 × {t} × ({a} + {d} / 2)")
    w_br, p_br = _avail(f, "br", variant, "Rn", "1.8 × {Fy} × {t} × {d}")
    w_ty, p_ty = _avail(f, "ty", variant, "Pn", "{Fy} × {t} × {w}")
    t_fyl = term("Fy", "stress", np.minimum(Q["fy"], Q["fyp"]))
    return [
        _check("tensile rupture", "AISC 360-16 §D5.1(a): Pn = Fu (2 t be), be = 2t + 16 mm ≤ edge distance",
               "force", F, c_tr, f_tr, terms=(t_P, t_fu, t_t, t_be, p_tr), worked=("P = {P}", w_tr)),
        _check("shear rupture", "AISC 360-16 §D5.1(b): Pn = 0.6 Fu Asf, Asf = 2t (a + d/2)", "force", F, c_sr,
               f_sr, terms=(t_P, t_fu, t_t, t_a, t_d, p_sr), worked=("P = {P}", w_sr)),
        _check("bearing", "AISC 360-16 §J7: Rn = 1.8 Fy Apb, Apb = t d (Fy the lower of plate and pin)",
               "force", F, c_br, f_br, terms=(t_P, t_fyl, t_t, t_d, p_br), worked=("P = {P}", w_br)),
        _check("gross yielding", "AISC 360-16 §D5.1(d), §D2(a): Pn = Fy Ag, Ag = t w", "force", F, c_ty, f_ty,
               terms=(t_P, t_fy, t_t, t_w, p_ty), worked=("P = {P}", w_ty)),
        _check("end distance", "AISC 360-16 §D5.2: a ≥ 1.33 be", "length", 1.33 * be, a, "", uses_forces=False,
               terms=(t_be, t_a), worked=("1.33 × {be}", "a = {a}")),
        _check("width", "AISC 360-16 §D5.2: w ≥ 2 be + d", "length", 2 * be + d, Q["width"], "", uses_forces=False,
               terms=(t_be, t_d, t_w), worked=("2 × {be} + {d}", "w = {w}")),
        _check("hole clearance (rotating)", "AISC 360-16 §D5.2: d0 ≤ d + 1/32 in (1 mm) where the pin turns "
               "under load", "length", d0 - d, np.full_like(d, ROT_CLEARANCE), "", Q["rot"], uses_forces=False,
               terms=(t_d0, t_d, term("1/32 in", "length", ROT_CLEARANCE)),
               worked=("{d0} − {d}", "{1/32 in}")),
    ]
