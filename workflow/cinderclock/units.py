"""Unit conversion at the catalogue boundary, done once per column."""

from __future__ import annotations

from .errors import InputError

_LOG_GRAVITY_UNITS = {"", "dex", "dex(cm / s2)", "dex(cm/s2)", "log(cm.s**-2)", "log(cm.s-2)", "[cm/s2]",
                      "log(cgs)", "dex(cgs)"}


def conversion_factor(from_unit, to_unit, path=None, column=None):
    """Factor that converts values in ``from_unit`` to ``to_unit`` (1.0 if the same).

    Logarithmic gravities and magnitudes are accepted only in their canonical form; other units go
    through :mod:`astropy.units`. Raises :class:`InputError` naming the column for an unknown or
    incompatible unit.
    """
    if from_unit is None:
        return 1.0
    src = str(from_unit).strip()
    if src == to_unit or (to_unit.startswith("dex") and src.lower() in _LOG_GRAVITY_UNITS):
        return 1.0
    if to_unit.startswith("dex"):
        raise InputError(f"unit '{src}' is not a logarithmic gravity (expected dex of cm s^-2)", path, column=column)
    from astropy import units as u

    try:
        unit = u.Unit(src, parse_strict="raise")
    except (ValueError, TypeError):
        raise InputError(f"unknown unit '{src}'", path, column=column) from None
    if to_unit == "":
        if unit.physical_type == "dimensionless":
            return float(unit.to(u.dimensionless_unscaled))
        raise InputError(f"unit '{src}' where a dimensionless number is expected", path, column=column)
    try:
        return float(unit.to(u.Unit(to_unit)))
    except u.UnitConversionError:
        raise InputError(f"unit '{src}' cannot be converted to '{to_unit}'", path, column=column) from None
