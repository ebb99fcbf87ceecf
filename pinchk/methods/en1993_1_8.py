"""EN 1993-1-8:2005 §3.13, pin connections.

Columns (SI arrays, one entry per row):
  pins:   d (pin diameter), fup, fyp (pin ultimate and yield strengths), V (largest shear at a plane
          between plates), M (largest bending moment), uls (row is an ultimate case), ser (row is
          a replaceable pin under a serviceability case)
  plates: F (force on the plate), t, d, d0 (hole), fy (plate yield), fyp (pin yield), E, a_end (hole
          centre to plate end), width, type_b (Table 3.9 type B), uls, ser

References:
    EN 1993-1-8:2005 Eurocode 3, Design of steel structures, Part 1-8: Design of joints, §3.13,
    Table 3.9, Table 3.10, eqs (3.14)-(3.16), Fig. 3.11; partial factors §2.2 and EN 1993-1-1 §6.1.
"""

from __future__ import annotations

import numpy as np

from .base import make_check as _check
from .base import term

NAME = "EN 1993-1-8"
EDITION = "EN 1993-1-8:2005 (with EN 1993-1-1:2005 for γM0), recommended partial factors"
VARIANTS: tuple[str, ...] = ()
FACTORS = {
    "gamma_M0": (1.00, "γM0, resistance of cross-sections: EN 1993-1-1 §6.1(1) recommended value"),
    "gamma_M2": (1.25, "γM2, resistance in shear of pins and bolts: EN 1993-1-8 §2.2(2) Table 2.1"),
    "gamma_M6_ser": (1.00, "γM6,ser, serviceability of pins: EN 1993-1-8 §2.2(2) Table 2.1"),
}




#: Table 3.4: αv for a shear plane through the thread, by property class (0.6 through the shank).
#: [seen for 4.6, 8.8, 10.9; from memory for 4.8, 5.6, 5.8, 6.8]. Other grades: 0.5, the lower value
#: (common practice: EN 1993-1-8 gives αv only for these classes).
ALPHA_V_THREAD = {"4.6": 0.6, "5.6": 0.6, "8.8": 0.6, "4.8": 0.5, "5.8": 0.5, "6.8": 0.5, "10.9": 0.5}


def alpha_v_thread(grades):
    return np.array([ALPHA_V_THREAD.get(g, 0.5) for g in grades], float)


def pin_checks(P, f, variant=None):
    """Pin shear, bending and their interaction (Table 3.10), and bending under serviceability loads.

    A bolt used as a pin takes shear per Table 3.4 (Fv,Rd = αv fub A / γM2, A the shank area or the
    stress area As where the plane cuts the thread), bending as a pin (§3.13.1(4)).
    """
    g0, g2, g6 = f["gamma_M0"], f["gamma_M2"], f["gamma_M6_ser"]
    d = P["d"]
    n = d.shape[0]
    A = np.pi * d**2 / 4
    Wel = np.pi * d**3 / 32
    Fv_Rd = 0.6 * A * P["fup"] / g2  # Table 3.10, shear resistance per shear plane
    M_Rd = 1.5 * Wel * P["fyp"] / g0  # Table 3.10, bending resistance of the pin
    M_Rd_ser = 0.8 * Wel * P["fyp"] / g6  # Table 3.10, replaceable pin
    uls = P["uls"]
    bolt = P.get("bolt", np.zeros(n, bool))
    V_sh, V_th = P.get("V_shank", P["V"]), P.get("V_thread", np.zeros(n))
    shank, thread = P.get("shank_planes", np.ones(n, bool)), P.get("thread_planes", np.zeros(n, bool))
    Fv_sh = 0.6 * P["fup"] * A / g2  # Table 3.4, shank in the shear plane
    av_th = alpha_v_thread(P.get("grade", [""] * n))
    As = P.get("As", A)
    Fv_th = av_th * P["fup"] * As / g2  # Table 3.4, thread in the shear plane
    shear_ratio = np.where(bolt, np.maximum(V_sh / Fv_sh, V_th / Fv_th), P["V"] / Fv_Rd)
    inter = (P["M"] / M_Rd) ** 2 + shear_ratio ** 2
    V, M = P["V"], P["M"]
    # the shear and resistance the interaction uses: a bolt's worse of shank and thread
    by_thread = bolt & (V_th / Fv_th > V_sh / Fv_sh)
    V_int = np.where(bolt, np.where(by_thread, V_th, V_sh), V)
    Fv_int = np.where(bolt, np.where(by_thread, Fv_th, Fv_sh), Fv_Rd)
    t_d = term("d", "length", d)
    t_V, t_M = term("Fv,Ed", "force", V), term("MEd", "moment", M)
    t_fup, t_fyp = term("fup", "stress", P["fup"]), term("fyp", "stress", P["fyp"])
    t_g0, t_g2, t_g6 = term("γM0", "ratio", g0), term("γM2", "ratio", g2), term("γM6,ser", "ratio", g6)
    return [
        _check("pin shear", "EN 1993-1-8 Table 3.10: Fv,Rd = 0.6 A fup / γM2", "force", V, Fv_Rd,
               f"γM2 = {g2:g}", uls & ~bolt, terms=(t_V, t_d, t_fup, t_g2),
               worked=("Fv,Ed = {Fv,Ed}", "Fv,Rd = 0.6 × π ({d})² / 4 × {fup} / {γM2}")),
        _check("bolt shear (shank)", "EN 1993-1-8 Table 3.4: Fv,Rd = αv fub A / γM2, αv = 0.6 (shank)", "force",
               V_sh, Fv_sh, f"γM2 = {g2:g}, αv = 0.6", uls & bolt & shank,
               terms=(term("Fv,Ed", "force", V_sh), term("fub", "stress", P["fup"]), t_d, t_g2),
               worked=("Fv,Ed = {Fv,Ed}", "Fv,Rd = 0.6 × {fub} × π ({d})² / 4 / {γM2}")),
        _check("bolt shear (thread)", "EN 1993-1-8 Table 3.4: Fv,Rd = αv fub As / γM2 (thread in the plane)",
               "force", V_th, Fv_th, f"γM2 = {g2:g}, αv by class (0.6 for 4.6, 5.6, 8.8; 0.5 otherwise)",
               uls & bolt & thread, "a thread lies in this shear plane: rigging practice warns against it",
               terms=(term("Fv,Ed", "force", V_th), term("αv", "ratio", av_th), term("fub", "stress", P["fup"]),
                      term("As", "area", As), t_g2),
               worked=("Fv,Ed = {Fv,Ed}", "Fv,Rd = {αv} × {fub} × {As} / {γM2}")),
        _check("pin bending", "EN 1993-1-8 Table 3.10: MRd = 1.5 Wel fyp / γM0 (MEd per Fig. 3.11 model)",
               "moment", M, M_Rd, f"γM0 = {g0:g}", uls, terms=(t_M, t_d, t_fyp, t_g0),
               worked=("MEd = {MEd}", "MRd = 1.5 × π ({d})³ / 32 × {fyp} / {γM0}")),
        _check("pin shear + bending", "EN 1993-1-8 Table 3.10: (MEd/MRd)² + (Fv,Ed/Fv,Rd)² ≤ 1", "ratio",
               inter, np.ones_like(inter), f"γM0 = {g0:g}, γM2 = {g2:g}", uls,
               "largest moment and largest shear combined, wherever they occur (conservative)",
               terms=(t_M, term("MRd", "moment", M_Rd), term("Fv,Ed", "force", V_int), term("Fv,Rd", "force", Fv_int)),
               worked=("({MEd} / {MRd})² + ({Fv,Ed} / {Fv,Rd})²", "1")),
        _check("pin bending (serviceability)", "EN 1993-1-8 Table 3.10: MRd,ser = 0.8 Wel fyp / γM6,ser",
               "moment", M, M_Rd_ser, f"γM6,ser = {g6:g}", P["ser"], terms=(t_M, t_d, t_fyp, t_g6),
               worked=("MEd,ser = {MEd}", "MRd,ser = 0.8 × π ({d})³ / 32 × {fyp} / {γM6,ser}")),
    ]


def plate_checks(Q, f, variant=None):
    """Bearing (Table 3.10), contact stress (eqs 3.14-3.16) and the Table 3.9 geometry rules."""
    g0, g6 = f["gamma_M0"], f["gamma_M6_ser"]
    F, t, d, d0 = Q["F"], Q["t"], Q["d"], Q["d0"]
    fy_low = np.minimum(Q["fy"], Q["fyp"])  # Table 3.10: fy is the lower of pin and plate
    uls, ser = Q["uls"], Q["ser"]
    type_a, type_b = uls & ~Q["type_b"], uls & Q["type_b"]
    Fb_Rd = 1.5 * t * d * fy_low / g0
    Fb_Rd_ser = 0.6 * t * d * fy_low / g6
    sigma_h = 0.591 * np.sqrt(Q["E"] * F * (d0 - d) / (d**2 * t))  # eq (3.15)
    fh_Rd = 2.5 * fy_low / g6  # eq (3.16)
    a_have = Q["a_end"] - d0 / 2  # Table 3.9: a from the hole edge to the plate end, along the force
    c_have = Q["width"] / 2 - d0 / 2  # Table 3.9: c from the hole edge to the side edge
    base = F * g0 / (2 * t * Q["fy"])
    t_min_b = 0.7 * np.sqrt(F * g0 / Q["fy"])
    t_F, t_t, t_d, t_d0 = (term("FEd", "force", F), term("t", "length", t), term("d", "length", d),
                           term("d0", "length", d0))
    t_fyl, t_fy = term("fy", "stress", fy_low), term("fy", "stress", Q["fy"])
    t_g0, t_g6 = term("γM0", "ratio", g0), term("γM6,ser", "ratio", g6)
    req_a = "{FEd} × {γM0} / (2 × {t} × {fy})"
    return [
        _check("bearing", "EN 1993-1-8 Table 3.10: Fb,Rd = 1.5 t d fy / γM0", "force", F, Fb_Rd,
               f"γM0 = {g0:g}", uls, terms=(t_F, t_t, t_d, t_fyl, t_g0),
               worked=("FEd = {FEd}", "Fb,Rd = 1.5 × {t} × {d} × {fy} / {γM0}")),
        _check("bearing (serviceability)", "EN 1993-1-8 Table 3.10: Fb,Rd,ser = 0.6 t d fy / γM6,ser",
               "force", F, Fb_Rd_ser, f"γM6,ser = {g6:g}", ser, terms=(t_F, t_t, t_d, t_fyl, t_g6),
               worked=("FEd,ser = {FEd}", "Fb,Rd,ser = 0.6 × {t} × {d} × {fy} / {γM6,ser}")),
        _check("contact stress", "EN 1993-1-8 eqs (3.14)-(3.16): σh,Ed = 0.591 √(E F (d0-d)/(d² t)) ≤ 2.5 fy / γM6,ser",
               "stress", sigma_h, fh_Rd, f"γM6,ser = {g6:g}", ser,
               terms=(term("E", "stress", Q["E"]), t_F, t_d0, t_d, t_t, t_fyl, t_g6),
               worked=("σh,Ed = 0.591 × √({E} × {FEd} × ({d0} − {d}) / (({d})² × {t}))",
                       "fh,Rd = 2.5 × {fy} / {γM6,ser}")),
        _check("end distance (type A)", "EN 1993-1-8 Table 3.9 A: a ≥ FEd γM0/(2 t fy) + 2 d0/3", "length",
               base + 2 * d0 / 3, a_have, f"γM0 = {g0:g}", type_a,
               terms=(t_F, t_g0, t_t, t_fy, t_d0, term("e", "length", Q["a_end"])),
               worked=("a,req = " + req_a + " + 2 × {d0} / 3", "a = {e} − {d0} / 2")),
        _check("edge distance (type A)", "EN 1993-1-8 Table 3.9 A: c ≥ FEd γM0/(2 t fy) + d0/3", "length",
               base + d0 / 3, c_have, f"γM0 = {g0:g}", type_a,
               terms=(t_F, t_g0, t_t, t_fy, t_d0, term("w", "length", Q["width"])),
               worked=("c,req = " + req_a + " + {d0} / 3", "c = {w} / 2 − {d0} / 2")),
        _check("thickness (type B)", "EN 1993-1-8 Table 3.9 B: t ≥ 0.7 √(FEd γM0 / fy)", "length",
               t_min_b, t, f"γM0 = {g0:g}", type_b, "outline of the Table 3.9 B figure assumed",
               terms=(t_F, t_g0, t_fy, t_t), worked=("t,req = 0.7 × √({FEd} × {γM0} / {fy})", "t = {t}")),
        _check("hole to thickness (type B)", "EN 1993-1-8 Table 3.9 B: d0 ≤ 2.5 t", "length", d0, 2.5 * t,
               "", type_b, uses_forces=False, terms=(t_d0, t_t), worked=("d0 = {d0}", "2.5 × {t}")),
    ]
