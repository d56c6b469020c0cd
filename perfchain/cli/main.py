"""The ``perfchain`` command line: parse -> call -> print/write. No physics here."""

from __future__ import annotations

import sys

import click

from perfchain.errors import PerfchainError

__all__ = ["main"]


class _Group(click.Group):
    """A click group whose every error is one line on stderr and exit code 2."""

    def main(self, *args, **kwargs):  # noqa: D401 - click API
        kwargs.setdefault("standalone_mode", False)
        try:
            return super().main(*args, **kwargs)
        except PerfchainError as exc:
            click.echo(f"error: {exc}", err=True)
            sys.exit(2)
        except click.exceptions.Exit as exc:
            sys.exit(exc.exit_code)
        except click.exceptions.Abort:
            click.echo("error: aborted", err=True)
            sys.exit(130)
        except click.ClickException as exc:
            msg = " ".join(exc.format_message().split())
            click.echo(f"error: {msg}", err=True)
            sys.exit(2)


@click.group(cls=_Group, context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(package_name="perfchain")
def main():
    """perfchain: propellant performance from ingredients to vehicle delta-v.

    Results are theoretical estimates. Propellants and hot-fire work can kill:
    follow local codes, range safety and licensed practice.
    """


def _register():
    """Attach the sub-commands that live in their own modules."""
    import importlib

    for module, name in (
        ("perfchain.cli.point", "point"),
        ("perfchain.cli.point", "ingredients"),
        ("perfchain.cli.vehicle", "deltav"),
        ("perfchain.cli.sweep", "sweep"),
        ("perfchain.cli.sweep", "compare"),
        ("perfchain.cli.study", "run"),
        ("perfchain.cli.study", "new_study"),
    ):
        try:
            mod = importlib.import_module(module)
        except ModuleNotFoundError as exc:
            if exc.name != module:
                raise
            continue
        main.add_command(getattr(mod, name))


_register()
