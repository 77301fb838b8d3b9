"""Physical constants as plain floats, taken once from :mod:`astropy.constants`.

Hot paths work on numpy arrays of floats; converting astropy quantities there would cost time on
every call. Each name carries its unit in the suffix. Values follow the CODATA and IAU versions of
the installed astropy (IAU 2015 Resolutions B2 and B3 for the solar and bolometric constants).
"""

from astropy import constants as _c
from astropy import units as _u

G_SI = _c.G.si.value                    # m^3 kg^-1 s^-2
C_SI = _c.c.si.value                    # m s^-1
H_SI = _c.h.si.value                    # J s
HBAR_SI = _c.hbar.si.value              # J s
K_B_SI = _c.k_B.si.value                # J K^-1
SIGMA_SB_SI = _c.sigma_sb.si.value      # W m^-2 K^-4
M_E_SI = _c.m_e.si.value                # kg
M_U_SI = _c.u.si.value                  # kg (atomic mass constant)
E_CHARGE_SI = _c.e.si.value             # C
EPS0_SI = _c.eps0.si.value              # F m^-1

M_SUN_KG = _c.M_sun.si.value            # kg (IAU 2015 B3 nominal GM_sun / G)
R_SUN_M = _c.R_sun.si.value             # m (IAU 2015 B3 nominal)
L_SUN_W = _c.L_sun.si.value             # W (IAU 2015 B3 nominal)
L_BOL0_W = _c.L_bol0.si.value           # W, zero point of absolute bolometric magnitude (IAU 2015 B2)
PC_M = _u.pc.to(_u.m)                   # m
YR_S = _u.yr.to(_u.s)                   # s (Julian year)
GYR_S = 1e9 * YR_S                      # s
JY_SI = _u.Jy.to(_u.W / _u.m**2 / _u.Hz)  # W m^-2 Hz^-1
ANGSTROM_M = _u.AA.to(_u.m)             # m
