"""Independent synthetic photometry for the photometry tests (a helper module, no tests of its own).

Written separately from cinderclock.photometry: the Planck function in frequency, the
photon-counting AB magnitude as an integral over frequency, extinction from the `extinction`
package (Barbary's implementation of F99), and Vega offsets typed from Riello et al. 2021
(Gaia EDR3, A&A 649, A3; reference-values section 8, C2) rather than read from our data file.
"""

import numpy as np
from astropy import constants as c
from astropy import units as u

H = c.h.si.value
K_B = c.k_B.si.value
C = c.c.si.value
JY = u.Jy.to(u.W / u.m**2 / u.Hz)

#: ZP_Vega - ZP_AB of Riello et al. 2021 (G: 25.6874 - 25.8010, BP: 25.3385 - 25.3540,
#: RP: 24.7479 - 25.1040).
VEGA_MINUS_AB = {"gaiadr3-G": 25.6874 - 25.8010, "gaiadr3-BP": 25.3385 - 25.3540,
                 "gaiadr3-RP": 24.7479 - 25.1040}


def passband_curve(name):
    import speclite.filters

    f = speclite.filters.load_filter(name)
    return np.asarray(f.wavelength, float) * 1e-10, np.asarray(f.response, float)


def magnitudes(passbands, systems, teff_k, solid_angle, ebv=0.0, r_v=3.1, n_lambda=3000):
    """Magnitudes of reddened blackbodies of solid-angle factor (R/d)^2, shape (n_star, n_band).

    m_AB = -2.5 log10( int f_nu S dnu/nu / int (3631 Jy) S dnu/nu ),  f_nu = pi B_nu(T) (R/d)^2.
    """
    import extinction

    t = np.atleast_1d(np.asarray(teff_k, float))[:, None]
    theta = np.broadcast_to(np.asarray(solid_angle, float), (t.shape[0],))[:, None]
    e = np.broadcast_to(np.asarray(ebv, float), (t.shape[0],))[:, None]
    out = np.empty((t.shape[0], len(passbands)))
    for j, (name, system) in enumerate(zip(passbands, systems)):
        lam_tab, s_tab = passband_curve(name)
        lam = np.linspace(lam_tab[0], lam_tab[-1], n_lambda)[::-1]       # so nu increases
        s = np.interp(lam, lam_tab, s_tab)
        nu = C / lam
        b_nu = 2 * H * nu**3 / C**2 / np.expm1(H * nu / (K_B * t))          # W m^-2 Hz^-1 sr^-1
        k = extinction.fitzpatrick99(lam * 1e10, 1.0, r_v)                  # A_lambda / A_V
        f_nu = np.pi * b_nu * theta * 10 ** (-0.4 * e * r_v * k[None, :])
        num = np.trapezoid(f_nu * s / nu, nu, axis=1)
        den = np.trapezoid(3631.0 * JY * s / nu, nu)
        out[:, j] = -2.5 * np.log10(num / den) + (VEGA_MINUS_AB[name] if system == "vega" else 0.0)
    return out
