"""Plain-language cautions written into the metadata of photometric results."""

#: How a blackbody misrepresents white-dwarf spectra; goes into the output metadata whenever the
#: blackbody is the model spectrum. Qualitative on purpose: we quote no size of the bias because
#: we have no model-atmosphere comparison of our own to source a number from.
BLACKBODY_CAUTION = (
    "Model spectra are blackbodies. White dwarfs are not: hydrogen-atmosphere (DA) stars show "
    "strong Balmer absorption lines and, below about 20,000 K, a Balmer jump near 365 nm, so they "
    "emit less than a blackbody of the same Teff in blue and ultraviolet bands (u, g, Gaia BP, "
    "GALEX) and relatively more in red bands. The bias is largest where the Balmer lines are "
    "strongest (Teff of roughly 10,000-15,000 K for DA stars; common practice) and is not a "
    "constant offset. A blackbody fit to DA photometry therefore returns a colour temperature "
    "that can differ from the spectroscopic Teff by more than the quoted error, and the radius "
    "and luminosity inherit that bias (L scales as Teff^4 at fixed flux). Helium-atmosphere and "
    "cool featureless (DC) stars are closer to, but still not, blackbodies; collision-induced "
    "absorption makes the coolest hydrogen-rich stars fainter in red and infrared bands. The "
    "quoted errors are statistical only. Supply a synthetic-photometry table from model "
    "atmospheres for results free of this bias."
)

#: Caution for user-supplied synthetic-photometry tables when extinction is applied.
USER_GRID_EXTINCTION_CAUTION = (
    "The user table gives unreddened magnitudes only; band extinction is taken from a blackbody "
    "of the same Teff reddened through the same law. Band extinction depends on the shape of the "
    "spectrum within the band, so where the model spectrum departs from a blackbody (Balmer "
    "lines in broad blue bands) this is an approximation whose error grows with E(B-V)."
)

#: Caution attached to luminosities when the distance came from the EDSD prior.
EDSD_CAUTION = (
    "Distances below the parallax S/N threshold are modes of a posterior with an exponentially "
    "decreasing space-density prior (Bailer-Jones 2015); they depend on the prior's length scale "
    "and are uncertain by more than the 16-84 percent bounds suggest when the posterior is "
    "bimodal."
)


def output_cautions(grid_metadata, any_edsd_distance=False):
    """Cautions to write into the metadata of a luminosity table.

    Parameters
    ----------
    grid_metadata : dict
        ``PhotometryGrid.metadata`` of the grid used in the fit.
    any_edsd_distance : bool
        True if any distance came from the EDSD prior.

    Returns
    -------
    list of str
    """
    out = []
    if grid_metadata.get("spectra") == "blackbody":
        out.append(BLACKBODY_CAUTION)
    elif grid_metadata.get("caution"):
        out.append(grid_metadata["caution"])
    if any_edsd_distance:
        out.append(EDSD_CAUTION)
    out.append("Errors of Teff, radius and luminosity are statistical (photometric errors, error floor and "
               "distance bounds), not scaled by the reduced chi-square.")
    return out
