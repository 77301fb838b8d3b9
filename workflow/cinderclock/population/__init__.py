"""Population results: luminosity function, population age, figures and the run summary.

Modules
-------
vmax
    Per-star maximum volumes from the survey limits (1/Vmax method, Schmidt 1968), optional
    exponential-disk effective volumes, and the <V/Vmax> completeness statistic.
lf
    Binned luminosity function in M_bol with Poisson and bootstrap errors.
imf, sfh
    Initial mass functions (Salpeter 1955, Kroupa 2001) and star-formation histories (constant,
    constant plus a burst, a single burst) as cumulative functions.
cooling_link
    Adapter from a run's cooling-model table to the callables the forward model needs.
model
    Forward-modelled luminosity function of a white-dwarf population (IMF, SFH, progenitor
    lifetimes, IFMR, cooling), by quadrature over a tabulated grid.
agefit
    Maximum-likelihood population age from the faint end, with a bootstrap interval.
simulate
    Monte Carlo white-dwarf populations of known age (for tests and benchmarks).
figures, summary
    Matplotlib figures (PNG and PDF) and the run summary page of the report.
"""
