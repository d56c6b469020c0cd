"""The report's uncertainty part: histograms, CDFs and tornado plots, and the statistics tables.

Hooks: :func:`perfchain.study.plots.make_plots` adds the figures of :func:`uncertainty_figures`,
:func:`perfchain.study.report.render_report` the section of :func:`uncertainty_html`. Values
are drawn in the report's units (:mod:`perfchain.study.columns`).
"""

from __future__ import annotations

from html import escape

import numpy as np

from perfchain.study.uncertainty_study import flat_key

__all__ = ["uncertainty_figures", "uncertainty_html", "main_outputs"]

#: what each subject's figures show first, in this order of preference
_PREFERRED = ("delivered.isp_vacuum", "delivered.isp_ambient", "isp_vacuum", "isp_ambient", "cstar",
              "total_delta_v", "payload_fraction")


def main_outputs(p, most: int = 2) -> list:
    """The outputs a subject's figures show: delivered Isp before ideal, delta-v for a vehicle.

    >>> class P: values = {"cstar": 0, "isp_vacuum": 0, "delivered.isp_vacuum": 0}
    >>> main_outputs(P())
    ['delivered.isp_vacuum', 'isp_vacuum']
    """
    keys = [k for k in _PREFERRED if k in p.values]
    return (keys or list(p.values))[:most]


def _scale(key: str, units: str):
    """(factor from SI, unit label) of an output in the report's units."""
    from perfchain.study.columns import column_kind, factor, unit_label

    kind = column_kind(flat_key(key))
    if kind is None:
        return 1.0, ""
    return factor(kind, units), unit_label(kind, units)


def _label(key: str, units: str) -> str:
    unit = _scale(key, units)[1]
    return f"{key} [{unit}]" if unit else key


def uncertainty_figures(plt, res, units: str) -> list:
    """Per subject: histogram and CDF of its main outputs, and a tornado plot of the first.

    Returns
    -------
    list of (figure, file stem, title, caption, report group)
    """
    from perfchain.study.names import slug

    out = []
    for subject, p in res.uncertainty.items():
        keys = main_outputs(p)
        run = p.run_block()
        group, stem = f"uncertainty:{subject}", slug(subject) or "subject"
        fig, axes = plt.subplots(2, len(keys), figsize=(4.2 * len(keys), 5.6), squeeze=False)
        for c, key in enumerate(keys):
            f, _ = _scale(key, units)
            v = p.values[key][np.isfinite(p.values[key])] * f
            s = p.uncertainty_block()[key]
            axes[0][c].hist(v, bins=40, color="tab:blue", alpha=0.8)
            axes[1][c].plot(np.sort(v), (np.arange(v.size) + 0.5) / max(v.size, 1), color="tab:blue")
            for q in ("p5", "p50", "p95"):
                if s[q] is not None:
                    for ax in (axes[0][c], axes[1][c]):
                        ax.axvline(s[q] * f, color="0.3", ls=":" if q != "p50" else "--", lw=1)
            axes[0][c].set_ylabel("samples")
            axes[1][c].set_ylabel("cumulative fraction")
            axes[1][c].set_xlabel(_label(key, units))
        fig.suptitle(subject)
        out.append((fig, f"{stem}-uncertainty", f"{subject}: spread of {', '.join(keys)}",
                    f"{run['samples']} samples (scrambled Sobol, seed {run['seed']}), {run['failed']} failed and left "
                    "out; dotted lines the 5th and 95th percentiles, dashed the median.", group))
        key = keys[0]
        f, _ = _scale(key, units)
        t = p.tornado[key]
        order = sorted(t, key=lambda n: abs(t[n][1] - t[n][0]))
        nominal = p.nominal_values[key] * f
        fig, ax = plt.subplots(figsize=(6.4, 0.6 + 0.45 * len(order)))
        for y, name in enumerate(order):
            lo, hi = t[name][0] * f, t[name][1] * f
            ax.barh(y, lo - nominal, left=nominal, color="tab:blue", alpha=0.8)
            ax.barh(y, hi - nominal, left=nominal, color="tab:orange", alpha=0.8)
        ax.axvline(nominal, color="0.2", lw=1)
        ax.set_yticks(range(len(order)), order)
        ax.set_xlabel(_label(key, units))
        out.append((fig, f"{stem}-tornado", f"{subject}: tornado of {key}",
                    "Each input moved alone to its 5th (blue) and 95th (orange) percentile, the others nominal; "
                    "the line is the nominal value.", group))
    return out


def uncertainty_html(res, units: str, figures, table_html, figures_html) -> str:
    """The report section: per subject its statistics, the variance shares and the figures.

    Parameters
    ----------
    res : perfchain.study.runner.StudyResult
    units : str
    figures : list of perfchain.study.plots.Figure
    table_html, figures_html : callable
        The report's own table and figure writers (so the section looks like the rest).
    """
    import pandas as pd

    parts = ["<h2>Uncertainty and sensitivity</h2><p class=note>Statistics over the samples that solved "
             "(failed samples are counted, never used). Shares: each input's share of the output's variance "
             "(first-order Sobol index, or the linear share of its one-at-a-time slope for the local method). "
             "Values in SI units; Isp in s.</p>"]
    for subject, p in res.uncertainty.items():
        run = p.run_block()
        rows = [{"output": k, **s} for k, s in p.uncertainty_block().items()]
        shares = pd.DataFrame({k: p.first[k] for k in p.values}).T
        shares.insert(0, "output", shares.index)
        inputs = "; ".join(f"{n}: {d['as_typed'] or d['distribution']} ({d['distribution']})"
                           for n, d in run["inputs"].items())
        parts.append(f"<h3>{escape(subject)}</h3><p class=note>Inputs: {escape(inputs)}. {run['samples']} samples, "
                     f"seed {run['seed']}, {run['failed']} failed; sensitivity: {escape(run['sensitivity_method'])}."
                     "</p>")
        for reason, n in run["failure_reasons"].items():
            parts.append(f"<p class=note>{n} failed: {escape(reason)}</p>")
        parts.append(table_html(pd.DataFrame(rows), "si"))
        parts.append("<h4>Share of variance</h4>" + table_html(shares.reset_index(drop=True), "si"))
        parts.append(figures_html(figures, f"uncertainty:{subject}"))
    return "".join(parts)
