"""Pre-white-dwarf lifetimes from the analytic formulae of Hurley, Pols & Tout (2000, MNRAS 315, 543).

Every coefficient depends on the metallicity through a polynomial in zeta = log10(Z / 0.02)
(the paper's Appendix A); the formulae were fitted to the models of Pols et al. (1998) over
Z = 1e-4 to 0.03. The times computed here, all in Myr and vectorised over the initial mass:

``t_ms``
    End of the main sequence, t_MS = max(mu, x) t_BGB (eqs. 4-7).
``t_bgb``
    Base of the giant branch (eq. 4); for masses above M_FGB (eq. 3) helium ignition.
``t_hei``
    Helium ignition: the giant-branch core-mass-luminosity relation L = min(B Mc^q, D Mc^p)
    (eqs. 37-38) grown at the hydrogen-burning rate A_H (eq. 43) from L_BGB (eq. 10) up to
    L_HeI (eq. 49), in the closed form of the paper's eqs. 39-40.
``t_bagb``
    Base of the asymptotic giant branch, t_HeI + t_He, with the core-helium-burning lifetime of
    eq. 57 (low-mass stars through the naked-helium-star lifetime of eq. 79).
``t_agb_end``
    End of the AGB: the same core-mass-luminosity relation on the early AGB (rate A_He, from
    L_BAGB of eq. 56 and Mc,BAGB of eq. 66, second dredge-up eq. 69) and the thermally pulsing
    AGB (rate A_H,He with third dredge-up lambda, eqs. 70-73), until the core has grown to the
    white dwarf's mass. The formulae alone would let the core grow until the envelope is gone;
    mass loss ends the AGB, and the white dwarf's mass (from the initial-final mass relation)
    says when, so this lifetime takes the final mass as an input.

Coefficients: Appendix A of the paper as reproduced in two independent public implementations
(they agree digit for digit; the paper's own appendix text could not be read here), so they are
marked "verified through secondary sources" in the relation's metadata. Where the public
implementation of the authors differs from the paper's printed equation, we follow the paper:
x of eq. 6.
"""

from __future__ import annotations

import numpy as np

from ..errors import ConfigError

#: Metallicity range of the formulae (Hurley et al. 2000, abstract and section 1: Z = 1e-4 to 0.03).
Z_RANGE = (1.0e-4, 0.03)

# ------------------------------------------------------------------ Appendix A coefficients
# Each entry: coefficients (alpha, beta, gamma, eta, mu) of alpha + beta zeta + gamma zeta^2 + ...
# a1..a10: t_BGB and t_hook (eqs. 4, 7)
_A = {
    1: (1.593890e3, 2.053038e3, 1.231226e3, 2.327785e2),
    2: (2.706708e3, 1.483131e3, 5.772723e2, 7.411230e1),
    3: (1.466143e2, -1.048442e2, -6.795374e1, -1.391127e1),
    4: (4.141960e-2, 4.564888e-2, 2.958542e-2, 5.571483e-3),
    5: (3.426349e-1,),
    6: (1.949814e1, 1.758178e0, -6.008212e0, -4.470533e0),
    7: (4.903830e0,),
    8: (5.212154e-2, 3.166411e-2, -2.750074e-3, -2.271549e-3),
    9: (1.312179e0, -3.294936e-1, 9.231860e-2, 2.610989e-2),
    10: (8.073972e-1,),
}
# L_BGB (eq. 10): a27..a32 and the constants c2, c3
_LBGB = {
    27: (9.511033e1, 6.819618e1, -1.045625e1, -1.474939e1),
    28: (3.113458e1, 1.012033e1, -4.650511e0, -2.463185e0),
    29: (1.413057e0, 4.578814e-1, -6.850581e-2, -5.588658e-2),
    30: (3.910862e1, 5.196646e1, 2.264970e1, 2.873680e0),
    31: (4.597479e0, -2.855179e-1, 2.709724e-1),
    32: (6.682518e0, 2.827718e-1, -7.294429e-2),
}
_C2, _C3 = 9.301992e0, 4.637345e0
# L_BAGB (eq. 56): b-coefficients of the low-mass and intermediate-mass branches
_LBAGB = {
    "low_scale": (1.626062e2, -1.168838e1, -5.498343e0),
    "low_power": (3.336833e-1, -1.458043e-1, -2.011751e-2),
    "num0": (7.425137e1, 1.790236e1, 3.033910e1, 1.018259e1),       # raised to `power`
    "num1": (9.268325e2, -9.739859e1, -7.702152e1, -3.158268e1),
    "den0": (1.127018e1, 1.622158e0, -1.443664e0, -9.474699e-1),     # raised to `power`
    "power": (2.474401e0, 3.892972e-1),
}
# Mc,BAGB (eq. 66)
_MCBAGB = {
    "b36": (1.445216e-1, -6.180219e-2, 3.093878e-2, 1.567090e-2),
    "b37": (1.304129e0, 1.395919e-1, 4.142455e-3, -9.732503e-3),
    "b38": (5.114149e-1, -1.160850e-2),
}
# L_HeI (eq. 49)
_LHEI = {
    "b9": (2.751631e3, 3.557098e2),
    "b10": (-3.820831e-2, 5.872664e-2),
    "b11": (1.071738e2, -8.970339e1, -3.949739e1),
    "b12": (7.348793e2, -1.531020e2, -3.793700e1),
    "b13": (9.219293e0, -2.005865e0, -5.561309e-1),
}
_LHEI_EXP = 15.0
# t_He (eq. 57)
_THE = {
    "b39": (1.314955e2, 2.009258e1, -5.143082e-1, -1.379140e0),
    "b40": (1.823973e1, -3.074559e0, -4.307878e0),
    "b41": (2.327037e0, 2.403445e0, 1.208407e0, 2.087263e-1),
    "b42": (1.997378e0, -8.126205e-1),
    "b43": (1.079113e-1, 1.762409e-2, 1.096601e-2, 3.058818e-3),
    "b44": (2.327409e0, 6.901582e-1, -2.158431e-1, -1.084117e-1),
}
_THE_EXP = 15.0


def _poly(c, zeta):
    return sum(ci * zeta**i for i, ci in enumerate(c))


class HurleyFormulae:
    """The Hurley et al. (2000) lifetimes at one metallicity.

    Parameters
    ----------
    metallicity : float
        Z, inside :data:`Z_RANGE` (raises ConfigError otherwise).
    """

    def __init__(self, metallicity=0.02):
        z = float(metallicity)
        if not (Z_RANGE[0] <= z <= Z_RANGE[1]):
            raise ConfigError(f"progenitor.metallicity: Z = {z} is outside the range of the Hurley et al. (2000) "
                              f"formulae, {Z_RANGE[0]} to {Z_RANGE[1]}")
        self.metallicity = z
        zeta = np.log10(z / 0.02)
        self.zeta = zeta
        self.a = {k: _poly(c, zeta) for k, c in _A.items()}
        # eq. 6 as printed
        self.x = max(0.95, min(0.95 - 0.03 * (zeta + 0.30103), 0.99))
        # eqs. 2-3: helium-flash and first-giant-branch mass limits
        self.m_hef = 1.995 + 0.25 * zeta + 0.087 * zeta**2
        self.m_fgb = 13.048 * (z / 0.02) ** 0.06 / (1.0 + 0.0012 * (0.02 / z) ** 1.27)
        # log D for M <= M_HeF (eq. 38)
        self.log_d0 = 5.37 + 0.135 * zeta
        lb = {k: _poly(c, zeta) for k, c in _LBGB.items()}
        self._lbgb = (lb[27], lb[28], lb[29] ** lb[32], lb[30], lb[31], lb[32])
        b = {k: _poly(c, zeta) for k, c in _LBAGB.items()}
        self._lbagb = dict(low_scale=b["low_scale"], low_power=b["low_power"], num0=b["num0"] ** b["power"],
                           num1=b["num1"], den0=b["den0"] ** b["power"], power=b["power"])
        m = {k: _poly(c, zeta) for k, c in _MCBAGB.items()}
        self._mcbagb = (m["b36"] ** 4, 4.0 * m["b37"], m["b38"] ** 4)
        h = {k: _poly(c, zeta) for k, c in _LHEI.items()}
        self._lhei = dict(b9=h["b9"], b10=h["b10"], b11=h["b11"] ** 2, b12=h["b12"], b13=h["b13"] ** 2)
        t = {k: _poly(c, zeta) for k, c in _THE.items()}
        # eq. 57: b41 = b41'^b42, b44 = b44'^5
        self._the = dict(b39=t["b39"], b40=max(t["b40"], 1.0), b41=t["b41"] ** t["b42"], b42=t["b42"],
                         b43=t["b43"], b44=t["b44"] ** 5)
        # continuity constants at M_HeF (the low-mass branches join the intermediate-mass ones)
        mh = self.m_hef
        lb_hi = self._lbagb_high(mh)
        self._lbagb["join"] = (self._lbagb["low_scale"] * mh ** self._lbagb["low_power"] - lb_hi) / (
            np.exp(mh * _LHEI_EXP) * lb_hi)
        lh_hi = self._lhei_high(mh)
        self._lhei["b14"] = (self._lhei["b9"] * mh ** self._lhei["b10"] - lh_hi) / (np.exp(mh * _LHEI_EXP) * lh_hi)
        the_hi = self._the_high_ratio(mh) * self.t_bgb(mh)
        self._the["b45"] = (the_hi - self._the["b39"]) / (self._the["b39"] * np.exp(_THE_EXP * mh))

    # -------------------------------------------------------------- main sequence
    def t_bgb(self, m):
        """Time to the base of the giant branch (Myr), eq. 4."""
        a = self.a
        return (a[1] + a[2] * m**4 + a[3] * m**5.5 + m**7) / (a[4] * m**2 + a[5] * m**7)

    def t_ms(self, m):
        """Main-sequence lifetime (Myr), eqs. 5-7."""
        a = self.a
        mu = np.maximum(0.5, 1.0 - 0.01 * np.maximum(a[6] / m ** a[7], a[8] + a[9] / m ** a[10]))
        return np.maximum(mu, self.x) * self.t_bgb(m)

    # -------------------------------------------------------------- luminosities and core masses
    def l_bgb(self, m):
        """Luminosity at the base of the giant branch (Lsun), eq. 10."""
        a27, a28, a29, a30, a31, a32 = self._lbgb
        return (a27 * m**a31 + a28 * m**_C2) / (a29 + a30 * m**_C3 + m**a32)

    def _lhei_high(self, m):
        h = self._lhei
        return (h["b11"] + h["b12"] * m**3.8) / (h["b13"] + m**2)

    def l_hei(self, m):
        """Luminosity at helium ignition (Lsun), eq. 49."""
        h = self._lhei
        low = h["b9"] * m ** h["b10"] / (1.0 + h["b14"] * np.exp(m * _LHEI_EXP))
        return np.where(m < self.m_hef, low, self._lhei_high(m))

    def _lbagb_high(self, m):
        b = self._lbagb
        return (b["num0"] + b["num1"] * m ** (b["power"] + 1.8)) / (b["den0"] + m ** b["power"])

    def l_bagb(self, m):
        """Luminosity at the base of the AGB (Lsun), eq. 56."""
        b = self._lbagb
        low = b["low_scale"] * m ** b["low_power"] / (1.0 + b["join"] * np.exp(m * _LHEI_EXP))
        return np.where(m < self.m_hef, low, self._lbagb_high(m))

    def mc_bagb(self, m):
        """Core mass at the base of the AGB (Msun), eq. 66."""
        b36, b37, b38 = self._mcbagb
        return (b38 + b36 * m**b37) ** 0.25

    def giant_branch(self, m):
        """Parameters of the core-mass-luminosity relation (eqs. 37-38, 43): A_H, B, D, p, q, Mx, Lx."""
        a_h = 10.0 ** np.maximum(-4.8, np.minimum(-5.7 + 0.8 * m, -4.1 + 0.14 * m))
        big_b = np.maximum(3.0e4, 500.0 + 1.75e4 * m**0.6)
        d0 = self.log_d0
        frac = np.clip((m - self.m_hef) / (2.5 - self.m_hef), 0.0, 1.0)
        log_d_mid = d0 + ((0.975 * d0 - 0.18 * 2.5) - d0) * frac
        log_d_high = np.maximum(-1.0, np.maximum(0.975 * d0 - 0.18 * m, 0.5 * d0 - 0.06 * m))
        low, high = m <= self.m_hef, m >= 2.5
        log_d = np.where(low, d0, np.where(high, log_d_high, log_d_mid))
        p = np.where(low, 6.0, np.where(high, 5.0, 6.0 - frac))
        q = np.where(low, 3.0, np.where(high, 2.0, 3.0 - frac))
        d = 10.0**log_d
        mx = (big_b / d) ** (1.0 / (p - q))
        return {"a_h": a_h, "b": big_b, "d": d, "p": p, "q": q, "mx": mx, "lx": d * mx**p}

    # -------------------------------------------------------------- core-helium burning
    def _the_high_ratio(self, m):
        t = self._the
        return (t["b41"] * m ** t["b42"] + t["b43"] * m**5) / (t["b44"] + m**5)

    @staticmethod
    def helium_star_ms_myr(mc):
        """Main-sequence lifetime of a naked helium star of mass ``mc`` (Myr), eq. 79."""
        return (0.4129 + 18.81 * mc**4 + 1.853 * mc**6) / mc**6.5

    def t_he(self, m, mc_hei):
        """Core-helium-burning lifetime (Myr), eq. 57; ``mc_hei`` is the core mass at ignition."""
        t = self._the
        ratio = np.clip((self.m_hef - m) / (self.m_hef - mc_hei), 1e-12, None)
        low = (t["b39"] + (self.helium_star_ms_myr(mc_hei) - t["b39"]) * ratio ** t["b40"]) * (
            1.0 + t["b45"] * np.exp(_THE_EXP * m))
        return np.where(m <= self.m_hef, low, self._the_high_ratio(m) * self.t_bgb(m))

    # -------------------------------------------------------------- the phases
    @staticmethod
    def _growth(t0, l0, rate, gb):
        """Closed-form core growth at ``rate`` from luminosity ``l0`` at time ``t0`` (eqs. 39-40).

        Returns the times t_inf1, t_x, t_inf2 of the paper's solution.
        """
        p, q, d, big_b, lx = gb["p"], gb["q"], gb["d"], gb["b"], gb["lx"]
        t_inf1 = t0 + (1.0 / ((p - 1.0) * rate * d)) * (d / l0) ** ((p - 1.0) / p)
        t_x = t_inf1 - (t_inf1 - t0) * (l0 / lx) ** ((p - 1.0) / p)
        t_inf2 = t_x + (1.0 / ((q - 1.0) * rate * big_b)) * (big_b / lx) ** ((q - 1.0) / q)
        return t_inf1, t_x, t_inf2

    @staticmethod
    def _time_at_core(mc, rate, gb, t_inf1, t_inf2):
        """Time at which the core reaches ``mc`` on a growth branch (inverse of eq. 39)."""
        p, q, d, big_b = gb["p"], gb["q"], gb["d"], gb["b"]
        first = t_inf1 - (1.0 / ((p - 1.0) * rate * d)) * mc ** (1.0 - p)
        second = t_inf2 - (1.0 / ((q - 1.0) * rate * big_b)) * mc ** (1.0 - q)
        return np.where(mc <= gb["mx"], first, second)

    @staticmethod
    def _core_at_luminosity(lum, gb):
        """Core mass (Msun) on the core-mass-luminosity relation at luminosity ``lum`` (eq. 37)."""
        return np.where(lum <= gb["lx"], (lum / gb["d"]) ** (1.0 / gb["p"]), (lum / gb["b"]) ** (1.0 / gb["q"]))

    def phases(self, mass_msun, final_mass_msun=None):
        """Times (Myr) at the end of each phase for initial masses ``mass_msun``.

        Returns
        -------
        dict of ndarray
            ``t_ms``, ``t_bgb``, ``t_hei``, ``t_bagb``, ``t_tp`` (first thermal pulse) and, when
            ``final_mass_msun`` is given, ``t_agb_end`` (the core has grown to the final mass).
        """
        m = np.asarray(mass_msun, dtype=float)
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            t_ms = self.t_ms(m)
            t_bgb = self.t_bgb(m)
            gb = self.giant_branch(m)
            l_hei = self.l_hei(m)
            # giant branch (M <= M_FGB): growth from L_BGB at the rate A_H
            t1, tx, t2 = self._growth(t_bgb, self.l_bgb(m), gb["a_h"], gb)
            pwr1, pwr2 = (gb["p"] - 1.0) / gb["p"], (gb["q"] - 1.0) / gb["q"]
            t_hei_gb = np.where(l_hei <= gb["lx"],
                                t1 - (1.0 / ((gb["p"] - 1.0) * gb["a_h"] * gb["d"])) * (gb["d"] / l_hei) ** pwr1,
                                t2 - (1.0 / ((gb["q"] - 1.0) * gb["a_h"] * gb["b"])) * (gb["b"] / l_hei) ** pwr2)
            t_hei = np.where(m <= self.m_fgb, t_hei_gb, t_bgb)
            mc_hei = self._core_at_luminosity(l_hei, gb)
            t_bagb = t_hei + self.t_he(m, mc_hei)
            # early AGB: growth from L_BAGB at the helium-burning rate A_He
            a_he, a_hhe = 8.0e-5, 1.27e-5
            e1, _, e2 = self._growth(t_bagb, self.l_bagb(m), a_he, gb)
            mc_bagb = self.mc_bagb(m)
            mc_du = np.where((mc_bagb >= 0.8) & (mc_bagb < 2.25), 0.44 * mc_bagb + 0.448, mc_bagb)   # eq. 69
            t_tp = self._time_at_core(mc_du, a_he, gb, e1, e2)
            out = {"t_ms": t_ms, "t_bgb": t_bgb, "t_hei": t_hei, "t_bagb": t_bagb, "t_tp": t_tp}
            if final_mass_msun is not None:
                mf = np.asarray(final_mass_msun, dtype=float)
                # thermally pulsing AGB: growth from L(Mc,DU) at the rate A_H,He, with third dredge-up
                l_tp = np.where(mc_du <= gb["mx"], gb["d"] * mc_du ** gb["p"], gb["b"] * mc_du ** gb["q"])
                f1, _, f2 = self._growth(t_tp, l_tp, a_hhe, gb)
                f2 = np.where(mc_du <= gb["mx"], f2,
                              t_tp + (1.0 / ((gb["q"] - 1.0) * a_hhe * gb["b"])) * (gb["b"] / l_tp) ** pwr2)
                lam = np.minimum(0.9, 0.3 + 0.001 * m**5)
                mc_eff = (mf - lam * mc_du) / (1.0 - lam)
                t_tpagb = self._time_at_core(mc_eff, a_hhe, gb, f1, f2)
                # a final mass below the core at the first pulse: the AGB ended on its early part
                t_eagb = np.maximum(self._time_at_core(mf, a_he, gb, e1, e2), t_bagb)
                out["t_agb_end"] = np.where(mf > mc_du, t_tpagb, np.minimum(t_eagb, t_tp))
        return out
