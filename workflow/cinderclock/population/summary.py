"""The run summary page of the report: stage counts, population results, models and references,
and the configuration, as one self-contained HTML file (no scripts, no external resources)."""

from __future__ import annotations

import html
import json

_CSS = """
body { font-family: "DejaVu Sans", Helvetica, Arial, sans-serif; color: #22313f; margin: 1.5em 2em;
       max-width: 62em; line-height: 1.4; }
h1 { font-size: 1.45em; border-bottom: 3px solid #1f7a8c; padding-bottom: 0.2em; }
h2 { font-size: 1.15em; color: #1f7a8c; margin-top: 1.6em; }
table { border-collapse: collapse; margin: 0.4em 0 1em 0; font-size: 0.92em; }
th, td { border: 1px solid #c9d6df; padding: 0.25em 0.7em; text-align: left; vertical-align: top; }
th { background: #eef3f6; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
.caution { background: #fbf3e6; border-left: 4px solid #e09f3e; padding: 0.4em 0.8em; margin: 0.4em 0; }
.warning { background: #f8e8e8; border-left: 4px solid #9e2a2b; padding: 0.4em 0.8em; margin: 0.4em 0; }
pre { background: #f4f6f8; border: 1px solid #c9d6df; padding: 0.8em; font-size: 0.85em; overflow-x: auto; }
"""


def _e(x):
    return html.escape(str(x))


def _table(header, rows, numeric=()):
    out = ["<table>", "<tr>" + "".join(f"<th>{_e(h)}</th>" for h in header) + "</tr>"]
    for r in rows:
        cells = []
        for i, v in enumerate(r):
            cls = ' class="num"' if i in numeric else ""
            cells.append(f"<td{cls}>{_e(v)}</td>")
        out.append("<tr>" + "".join(cells) + "</tr>")
    out.append("</table>")
    return "\n".join(out)


def collect_models(provenance, extra=()):
    """Model entries of every stage in a provenance block plus ``extra``, without duplicates.

    Returns
    -------
    list of (stage, dict)
    """
    seen = set()
    out = []
    for stage, entry in sorted((provenance or {}).get("stages", {}).items()):
        for m in entry.get("models", []):
            key = (m.get("name"), m.get("reference"))
            if key not in seen:
                seen.add(key)
                out.append((stage, m))
    for m in extra:
        key = (m.get("name"), m.get("reference"))
        if key not in seen:
            seen.add(key)
            out.append(("population", m))
    return out


_BOOK_KEEPING = {"name", "reference", "caution", "cautions", "note", "kind", "valid_range", "source_location",
                 "verified", "verification", "bibtex"}


def split_entries(entries):
    """Split ``(stage, entry)`` pairs into models (with a reference), settings (no reference, not a
    caution) and cautions ``(stage, text)``; no row is empty."""
    models, settings_rows, cautions = [], [], []
    for stage, m in entries:
        for c in ([m["caution"]] if m.get("caution") else []) + list(m.get("cautions") or []):
            if c and (stage, c) not in cautions:
                cautions.append((stage, c))
        if m.get("reference"):
            models.append((stage, m))
        elif m.get("kind") != "caution" and any(k not in _BOOK_KEEPING for k in m):
            settings_rows.append((stage, m))
    return models, settings_rows, cautions


def _verified_text(m):
    if m.get("verified") is True:
        return "yes" + (f" ({m['source_location']})" if m.get("source_location") else "")
    if m.get("verified") is False:
        return "UNVERIFIED: " + m.get("verification", "")
    return ""


def _settings_text(m):
    return ", ".join(f"{k} = {v}" for k, v in sorted(m.items()) if k not in _BOOK_KEEPING)


def _pair(v):
    """'a - b' for a two-number interval (None shown as n/a)."""
    v = list(v or [None, None])
    return " - ".join("n/a" if x is None else f"{x:.3f}" for x in v[:2])


def _fmt(v, digits=3):
    if v is None:
        return "n/a"
    if isinstance(v, float):
        return f"{v:.{digits}g}" if abs(v) < 1e-2 or abs(v) >= 1e5 else f"{v:.{digits}f}"
    return v


def _warnings_html(warnings):
    return [f"<div class='warning'><b>warning {_e(w['code'])}</b>: {_e(w['message'])}</div>" for w in warnings or []]


def _goodness_rows(g):
    if not g:
        return []
    return [("Poisson deviance / degrees of freedom (floored model, as in the likelihood)",
             f"{_fmt(g.get('deviance'))} / {g.get('dof')}"),
            ("goodness-of-fit p-value (parametric bootstrap, {} simulated samples)".format(g.get("simulations")),
             _fmt(g.get("p_value"))),
            ("p-value, chi-square approximation", _fmt(g.get("p_value_chi2")))]


def _sfh_html(sfh_summary):
    """The star-formation-history section."""
    parts = ["<h2>Star-formation history</h2>"]
    if not sfh_summary:
        return parts + ["<p>No star-formation history in this run.</p>"]
    if not sfh_summary.get("fitted"):
        return parts + [f"<p>{_e(sfh_summary.get('not_fitted', 'not fitted'))}.</p>"]
    unit = sfh_summary.get("rate_unit", "")
    edges = sfh_summary["lookback_edges_gyr"]
    for method in sfh_summary.get("methods", []):
        f = sfh_summary[method]
        label = {"luminosity_function": "From the luminosity function (Poisson likelihood, smoothness prior of "
                                        f"{f.get('smoothing_dex')} dex between bins; posterior by "
                                        f"{(f.get('sampling') or {}).get('chains', '?')} Markov chains, "
                                        f"{f.get('draws')} draws, smallest bulk effective sample size "
                                        f"{f.get('effective_samples', 0):.0f}, largest split R-hat "
                                        f"{(f.get('sampling') or {}).get('rhat_max', float('nan')):.3f})",
                 "total_ages": "From the per-star total ages (bootstrap over stars; "
                               f"{f.get('stars_used')} stars)"}.get(method, method)
        parts.append(f"<p>{_e(label)}. Rates in {_e(unit)} ({_e(sfh_summary.get('rate_meaning', ''))}).</p>")
        corr = f.get("correlation") or []
        rows = []
        for b in range(len(edges) - 1):
            nxt = corr[b][b + 1] if b + 1 < len(corr) else None
            rows.append((f"{edges[b]:g} - {edges[b + 1]:g}", _fmt(f["rate_p50"][b], 3), _fmt(f["rate_p16"][b], 3),
                         _fmt(f["rate_p84"][b], 3), _fmt(f["rate_sd"][b], 3),
                         "" if nxt is None else f"{nxt:+.2f}"))
        parts.append(_table(["lookback (Gyr)", "median", "16 %", "84 %", "sd", "correlation with the next bin"], rows,
                            numeric=(1, 2, 3, 4, 5)))
    const = sfh_summary.get("constant_rate")
    if const:
        parts.append(f"<p>For comparison, a constant rate back to the fitted age {const['age_gyr']:.2f} Gyr: "
                     f"{_fmt(const['rate'])} {_e(unit)}.</p>")
    parts += _warnings_html(sfh_summary.get("warnings"))
    parts += [f"<div class='caution'>{_e(c)}</div>" for c in sfh_summary.get("cautions", [])]
    return parts


def render(counts, provenance, config, lf_summary, fit_summary, sfh_summary=None, draws_summary=None,
           title="cinderclock run summary"):
    """HTML text of the run summary.

    Parameters
    ----------
    counts : dict
        ``results/final/stage_counts.json``.
    provenance : dict
        Provenance block of the final per-star table.
    config : dict
        The validated configuration.
    lf_summary, fit_summary : dict
        Summaries written by the luminosity-function and population-age rules.
    sfh_summary, draws_summary : dict, optional
        Summaries of the star-formation-history and posterior-draws rules.
    """
    import yaml

    reasons = (provenance or {}).get("reasons", {})
    parts = [f"<!doctype html><html lang='en'><head><meta charset='utf-8'><title>{_e(title)}</title>",
             f"<style>{_CSS}</style></head><body>", f"<h1>{_e(title)}</h1>"]
    parts.append("<p>Catalogue <code>{}</code> (SHA-256 <code>{}</code>), cinderclock {}, configuration hash "
                 "<code>{}</code>.</p>".format(_e(provenance.get("catalogue", config.get("catalogue", {}).get("path"))),
                                               _e(str(provenance.get("catalogue_sha256", ""))[:16] + "\u2026"),
                                               _e(provenance.get("package_version", "?")),
                                               _e(str(provenance.get("config_hash", ""))[:16] + "\u2026")))

    parts.append("<h2>Stage counts</h2>")
    rows = [("rows read", counts.get("rows_read")), ("rows in the results", counts.get("rows_in_results")),
            ("rows rejected", counts.get("rows_rejected")), ("shards", counts.get("shards"))]
    parts.append(_table(["quantity", "rows"], rows, numeric=(1,)))
    kept = counts.get("kept_after_stage", {})
    rej = counts.get("rejected_by_stage", {})
    parts.append(_table(["stage", "kept after the stage", "rejected by the stage"],
                        [(s, kept[s], rej.get(s, 0)) for s in kept], numeric=(1, 2)))
    by_reason = counts.get("rejected_by_reason", {})
    if by_reason:
        parts.append("<p>Rejected rows by reason:</p>")
        rows = []
        for key, n in sorted(by_reason.items()):
            stage, _, reason = key.partition("/")
            rows.append((stage, reason, n, reasons.get(reason, "")))
        parts.append(_table(["stage", "reason", "rows", "meaning"], rows, numeric=(2,)))

    parts.append("<h2>Luminosity function</h2>")
    if lf_summary.get("empty"):
        parts.append(f"<div class='warning'>{_e(lf_summary['empty'])}.</div>")
    st = lf_summary.get("status_counts", {})
    parts.append(_table(["stars", "number"], [(k.replace("_", " "), v) for k, v in st.items()], numeric=(1,)))
    vv = lf_summary.get("v_over_vmax", {})
    nan = float("nan")
    parts.append("<p>&lt;V/V<sub>max</sub>&gt; = {:.4f} over {} stars; a complete sample spread uniformly through "
                 "its volume gives 0.5 &plusmn; {:.4f} (1/&radic;(12N)), so the deviation is {:+.1f} &sigma;. Space "
                 "density in the binned range: {:.3g} pc<sup>-3</sup>.</p>".format(
                     vv.get("mean") if vv.get("mean") is not None else nan, vv.get("n", 0),
                     vv.get("sigma") if vv.get("sigma") is not None else nan,
                     vv.get("z") if vv.get("z") is not None else nan,
                     lf_summary.get("space_density_pc3") or nan))
    lim = lf_summary.get("limits", {})
    parts.append(_table(["survey limit", "value"], [(k, "none" if v is None else v) for k, v in lim.items()]))

    parts.append("<h2>Population age</h2>")
    if fit_summary:
        edges = fit_summary.get("fit_edges_mbol") or []
        rows = [("best-fit age (Gyr)", _fmt(fit_summary.get("age_gyr"))),
                ("68 % bootstrap interval (Gyr)", _pair(fit_summary.get("interval68_gyr"))),
                ("95 % bootstrap interval (Gyr)", _pair(fit_summary.get("interval95_gyr"))),
                ("profile-likelihood interval, delta ln L = 0.5 (Gyr)",
                 _pair(fit_summary.get("likelihood_interval_gyr"))),
                ("profile-likelihood interval, delta ln L = 1.92 (Gyr)",
                 _pair(fit_summary.get("likelihood_interval95_gyr"))),
                ("modes of the bootstrap ages", fit_summary.get("bootstrap_modes")),
                ("bootstrap resamples", fit_summary.get("bootstrap_resamples")),
                ("stars in the fitted range", fit_summary.get("n_stars_in_fit")),
                ("fitted M_bol range (mag)", f"{edges[0]:g} - {edges[-1]:g}" if edges else ""),
                *_goodness_rows(fit_summary.get("goodness_of_fit")),
                ("M_bol errors folded into the model", "yes" if fit_summary.get("measurement_errors_folded") else "no"),
                ("progenitor birth rate (pc^-3 Gyr^-1)", _fmt(fit_summary.get("amplitude_per_pc3_per_gyr"))),
                ("white-dwarf density of the model (pc^-3)", _fmt(fit_summary.get("white_dwarf_density_pc3"))),
                ("star-formation history", fit_summary.get("sfh", {}).get("name")),
                ("cooling model", fit_summary.get("cooling_model"))]
        parts.append(_table(["quantity", "value"], rows))
        warns = fit_summary.get("warnings") or []
        parts.append(f"<p>Warnings: {len(warns)}" + (" (none raised)." if not warns else ":") + "</p>")
        parts += _warnings_html(warns)
        if fit_summary.get("interval_coverage"):
            parts.append(f"<div class='caution'><b>Interval coverage.</b> {_e(fit_summary['interval_coverage'])}</div>")
        for c in fit_summary.get("cautions", []):
            parts.append(f"<div class='caution'>{_e(c)}</div>")
    else:
        parts.append("<p>No population-age fit in this run.</p>")

    parts += _sfh_html(sfh_summary)
    if draws_summary:
        parts.append("<h2>Posterior draws</h2>")
        parts.append(f"<p><code>{_e(draws_summary.get('path'))}</code>: {draws_summary.get('rows')} rows, "
                     f"{draws_summary.get('stars')} stars, every {draws_summary.get('thin')}-th of "
                     f"{draws_summary.get('draws_per_star')} Monte Carlo draws per star; columns described in "
                     "posterior_draws.md.</p>")

    parts.append("<h2>Models and references</h2>")
    entries = collect_models(provenance, (fit_summary or {}).get("models", []))
    models, settings_rows, cautions = split_entries(entries)
    rows = [(i, stage, m.get("name", ""), m.get("reference", ""), _verified_text(m))
            for i, (stage, m) in enumerate(models, start=1)]
    parts.append(_table(["#", "stage", "model", "reference", "checked against the source"], rows, numeric=(0,)))
    if settings_rows:
        parts.append("<h2>Model settings</h2>")
        parts.append(_table(["stage", "setting group", "values"],
                            [(stage, m.get("name", ""), _settings_text(m)) for stage, m in settings_rows]))
    if cautions:
        parts.append("<h2>Cautions of the models used</h2>")
        parts += [f"<div class='caution'>{_e(stage)}: {_e(c)}</div>" for stage, c in cautions]

    parts.append("<h2>Configuration</h2>")
    parts.append(f"<pre>{_e(yaml.safe_dump(json.loads(json.dumps(config, default=str)), sort_keys=False))}</pre>")
    parts.append("</body></html>")
    return "\n".join(parts)
