"""The ``--vary`` options of ``perfchain point`` and ``perfchain deltav``: parse -> call -> print.

No physics and no checks here: the distributions are read and checked by
:mod:`perfchain.inputs.uncertainty`, the samples solved by :mod:`perfchain.study.uncertainty`.
"""

from __future__ import annotations

import click

from perfchain.cli.edges import json_text

__all__ = ["uncertainty_options", "print_uncertain"]


def uncertainty_options(default_sensitivity: str):
    """The options that give inputs distributions and say how to sample them."""
    def wrap(f):
        opts = [
            click.option("--vary", "vary", multiple=True, metavar="NAME=SPEC",
                         help="Give an input a distribution (repeat the option): a tolerance '+/-2%' or "
                              "'+/-0.1 bar' (normal, 2 sigma; 'at 3 sigma' or 'uniform' after it), a range "
                              "'0.95..0.98', or normal(mean, std), uniform(low, high), "
                              "triangular(low, mode, high). Adds uncertainty and sensitivity blocks."),
            click.option("--samples", default=None, help="Samples behind the statistics [default: 4000]."),
            click.option("--seed", default=None, help="Seed of the scrambled Sobol sequence [default: 0]."),
            click.option("--sensitivity", default=default_sensitivity, show_default=True,
                         help="local (one-at-a-time slopes, cheap) or sobol (first-order and total indices, "
                              "samples x (inputs + 2) solves)."),
            click.option("--samples-out", default=None, metavar="PATH",
                         help="Also write the samples (inputs, outputs, failures) to this Parquet file."),
        ]
        for opt in reversed(opts):
            f = opt(f)
        return f
    return wrap


def print_uncertain(result, as_json: bool, samples_out, plain_text) -> None:
    """Print an :class:`~perfchain.api.uncertainty.Uncertain` as JSON or as the nominal table plus the
    statistics; write the samples first if asked (nothing computed is lost on a bad path)."""
    from perfchain.api.uncertainty import format_uncertainty

    data = result.to_dict()
    if samples_out:
        from perfchain.errors import InputError

        try:
            result.to_parquet(samples_out)
        except OSError as exc:
            click.echo(json_text(data) if as_json else plain_text + "\n\n" + format_uncertainty(data))
            raise InputError("--samples-out", samples_out, f"a writable file path ({exc.strerror})") from None
    if as_json:
        click.echo(json_text(data))
    else:
        click.echo(plain_text + "\n\n" + format_uncertainty(data))
