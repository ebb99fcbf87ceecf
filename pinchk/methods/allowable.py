"""In-house allowable stresses: a fraction of yield or ultimate divided by the user's factor, per check.

For machine linkages and in-house rules with no published pin method. Every check compares a nominal
stress with an allowable

    allowable = min(k_y · fy / n_y, k_u · fu / n_u)

where fy, fu are the strengths of the part that fails (the pin, or the plate; for bearing the lower
of plate and pin), k the fraction of the strength the check's stress is measured against, and n the
safety factor the user enters. Each check has its own four factors, named ``<check>_ky``,
``<check>_ny``, ``<check>_ku``, ``<check>_nu``; all are set in ``[method.factors]``.

Defaults (all common practice, no standard behind them):
- fractions: shear checks (pin shear, tear-out) k_y = 0.577 (= 1/√3, the von Mises shear yield) and
  k_u = 0.6 (the usual ratio of ultimate shear to tensile strength of steel); normal-stress checks
  (pin bending on the elastic modulus, bearing on the projected area, net tension) k_y = k_u = 1.0.
- safety factors: n_y = 2.0 on yield, n_u = 3.0 on ultimate (common practice for steady loads;
  raise them for shock, fatigue or where a failure would hurt someone).

Stresses: pin shear V/A per plane (a bolt's thread plane on its stress area As), pin bending
M/(π d³/32), bearing F/(d t), net tension F/(t (w − d0)), tear-out F/(2 t (R − d0/2)). Detailing:
pin-to-hole clearance against the user's ``clearance_max`` (Dh ≤ 1.10 Dp by default, common practice)
and the pin secured against working loose.

References:
    None: an in-house method. The stresses are the textbook nominal stresses of a pin joint.
"""

from __future__ import annotations

import numpy as np

from .base import make_check as _check
from .base import secured_check, term

NAME = "allowable stress"
EDITION = "in-house allowable stresses: min(k_y fy / n_y, k_u fu / n_u) per check (defaults common practice)"
VARIANTS: tuple[str, ...] = ()
CHECKS = {
    # check key: (printed name, k_y, k_u, what the stress is)
    "pin_shear": ("pin shear", 0.577, 0.6, "τ = V/A per shear plane"),
    "pin_bending": ("pin bending", 1.0, 1.0, "σ = M/(π d³/32)"),
    "bearing": ("bearing", 1.0, 1.0, "σ = F/(d t)"),
    "net_tension": ("net tension", 1.0, 1.0, "σ = F/(t (w − d0))"),
    "tear_out": ("tear-out", 0.577, 0.6, "τ = F/(2 t (R − d0/2))"),
}
N_Y, N_U = 2.0, 3.0
FACTORS: dict[str, tuple[float, str]] = {}
for _key, (_name, _ky, _ku, _what) in CHECKS.items():
    FACTORS[f"{_key}_ky"] = (_ky, f"{_name}: fraction of yield (common practice)")
    FACTORS[f"{_key}_ny"] = (N_Y, f"{_name}: safety factor on yield (common practice)")
    FACTORS[f"{_key}_ku"] = (_ku, f"{_name}: fraction of ultimate (common practice)")
    FACTORS[f"{_key}_nu"] = (N_U, f"{_name}: safety factor on ultimate (common practice)")
FACTORS["clearance_max"] = (1.10, "largest Dh/Dp (common practice)")



def allowable(key, fy, fu, f):
    """min(k_y fy / n_y, k_u fu / n_u) [Pa] of check ``key``, and the factors as printed."""
    ky, ny, ku, nu = (f[f"{key}_{s}"] for s in ("ky", "ny", "ku", "nu"))
    text = f"k_y = {ky:g}, n_y = {ny:g}, k_u = {ku:g}, n_u = {nu:g}"
    return np.minimum(ky * fy / ny, ku * fu / nu), text



def _allow_terms(key, fy, fu, f):
    """The allowable stress of check ``key`` as a worked expression, and its terms."""
    ky, ny, ku, nu = (f[f"{key}_{s}"] for s in ("ky", "ny", "ku", "nu"))
    return ("σall = min({k_y} × {fy} / {n_y}, {k_u} × {fu} / {n_u})",
            (term("k_y", "ratio", ky), term("fy", "stress", fy), term("n_y", "ratio", ny),
             term("k_u", "ratio", ku), term("fu", "stress", fu), term("n_u", "ratio", nu)))


def _clause(key):
    name, _, _, what = CHECKS[key]
    return f"in-house allowable stress: {what} ≤ min(k_y fy/n_y, k_u fu/n_u)"


def pin_checks(P, f, variant=None):
    d = P["d"]
    n = d.shape[0]
    A = np.pi * d**2 / 4
    Wel = np.pi * d**3 / 32
    bolt = P.get("bolt", np.zeros(n, bool))
    As = P.get("As", A)
    V_sh, V_th = P.get("V_shank", P["V"]), P.get("V_thread", np.zeros(n))
    shank, thread = P.get("shank_planes", np.ones(n, bool)), P.get("thread_planes", np.zeros(n, bool))
    tau, ft = allowable("pin_shear", P["fyp"], P["fup"], f)
    sig, fb = allowable("pin_bending", P["fyp"], P["fup"], f)
    w_s, t_s = _allow_terms("pin_shear", P["fyp"], P["fup"], f)
    w_b, t_b = _allow_terms("pin_bending", P["fyp"], P["fup"], f)
    t_d = term("d", "length", d)
    return [
        _check("pin shear", _clause("pin_shear"), "stress", P["V"] / A, tau, ft, ~bolt,
               terms=(term("V", "force", P["V"]), t_d, *t_s), worked=("τ = {V} / (π × ({d})² / 4)", w_s)),
        _check("bolt shear (shank)", _clause("pin_shear") + " (shank area A)", "stress", V_sh / A, tau, ft,
               bolt & shank, terms=(term("V", "force", V_sh), t_d, *t_s), worked=("τ = {V} / (π × ({d})² / 4)", w_s)),
        _check("bolt shear (thread)", _clause("pin_shear") + " (on the stress area As)", "stress", V_th / As, tau,
               ft, bolt & thread, "a thread lies in this shear plane: rigging practice warns against it",
               terms=(term("V", "force", V_th), term("As", "area", As), *t_s), worked=("τ = {V} / {As}", w_s)),
        _check("pin bending", _clause("pin_bending"), "stress", P["M"] / Wel, sig, fb,
               terms=(term("M", "moment", P["M"]), t_d, *t_b), worked=("σ = {M} / (π × ({d})³ / 32)", w_b)),
        secured_check("common practice: the pin is retained against working loose", P),
    ]


def plate_checks(Q, f, variant=None):
    F, t, d, d0 = Q["F"], Q["t"], Q["d"], Q["d0"]
    fy, fu = Q["fy"], Q["fu"]
    fy_low = np.minimum(fy, Q["fyp"])
    fu_low = np.minimum(fu, Q.get("fup", fu))
    s_br, f_br = allowable("bearing", fy_low, fu_low, f)
    s_nt, f_nt = allowable("net_tension", fy, fu, f)
    s_to, f_to = allowable("tear_out", fy, fu, f)
    t_F, t_t = term("F", "force", F), term("t", "length", t)
    t_d, t_d0 = term("d", "length", d), term("d0", "length", d0)
    w_br, a_br = _allow_terms("bearing", fy_low, fu_low, f)
    w_nt, a_nt = _allow_terms("net_tension", fy, fu, f)
    w_to, a_to = _allow_terms("tear_out", fy, fu, f)
    return [
        _check("bearing", _clause("bearing") + " (fy, fu the lower of plate and pin)", "stress", F / (d * t),
               s_br, f_br, terms=(t_F, t_d, t_t, *a_br), worked=("σ = {F} / ({d} × {t})", w_br)),
        # no free edge across (or ahead of) the force: the plate runs on into its body, no such failure
        _check("net tension", _clause("net_tension"), "stress", F / (t * (Q["width"] - d0)), s_nt, f_nt,
               np.isfinite(Q["width"]),
               terms=(t_F, t_t, term("w", "length", Q["width"]), t_d0, *a_nt),
               worked=("σ = {F} / ({t} × ({w} − {d0}))", w_nt)),
        _check("tear-out", _clause("tear_out"), "stress", F / (2 * t * (Q["a_end"] - d0 / 2)), s_to, f_to,
               np.isfinite(Q["a_end"]),
               terms=(t_F, t_t, term("R", "length", Q["a_end"]), t_d0, *a_to),
               worked=("τ = {F} / (2 × {t} × ({R} − {d0} / 2))", w_to)),
        _check("pin-to-hole clearance", "common practice: Dh − Dp ≤ (clearance_max − 1) Dp", "length", d0 - d,
               (f["clearance_max"] - 1) * d, f"clearance_max = {f['clearance_max']:g}", uses_forces=False,
               terms=(t_d0, t_d, term("cmax", "ratio", f["clearance_max"])),
               worked=("Dh − Dp = {d0} − {d}", "({cmax} − 1) × {d}")),
    ]
