"""The ``perfchain`` command line: parse -> call -> print/write. No physics here.

Every failure a user can meet ends in one line on stderr and exit code 2, never a
traceback: a bad input (:class:`~perfchain.errors.PerfchainError`), a missing
dependency (the line names what to install, with the extra where there is one), and
a file that cannot be read or written (bundled data included).
"""

from __future__ import annotations

import importlib
import os
import re
import sys

import click

from perfchain.errors import PerfchainError

__all__ = ["main"]

#: command name -> (module, attribute); a command's module is imported when the command is
#: first looked up, inside :meth:`_Group.main`, so that an import failure is reported too.
_COMMANDS = {
    "point": ("perfchain.cli.point", "point"),
    "ingredients": ("perfchain.cli.point", "ingredients"),
    "chamber": ("perfchain.cli.chamber", "chamber"),
    "deltav": ("perfchain.cli.vehicle", "deltav"),
    "sweep": ("perfchain.cli.sweep", "sweep"),
    "compare": ("perfchain.cli.sweep", "compare"),
    "run": ("perfchain.cli.study", "run"),
    "new-study": ("perfchain.cli.study", "new_study"),
}

#: import name -> distribution name, where the two differ
_DISTRIBUTIONS = {"distributed": "dask", "yaml": "PyYAML", "PIL": "pillow"}
#: distribution -> extra of perfchain that installs it (used when the metadata is not at hand)
_EXTRAS = {"dask": "cluster"}


def _install_hint(module: str) -> str:
    """``pip install ...`` text for a missing import, naming perfchain's extra where one has it.

    >>> _install_hint("distributed")
    'pip install "perfchain[cluster]"'
    >>> _install_hint("cantera")
    'pip install cantera'
    """
    top = module.split(".")[0]
    dist = _DISTRIBUTIONS.get(top, top)
    extras = {}
    try:
        from importlib.metadata import requires

        for req in requires("perfchain") or ():
            name = re.match(r"[A-Za-z0-9._-]+", req)
            extra = re.search(r"""extra\s*==\s*["']([^"']+)["']""", req)
            if name and extra and extra.group(1) != "test":
                extras.setdefault(_normal(name.group(0)), extra.group(1))
    except Exception:  # no metadata (a bare checkout on sys.path): fall back to the table
        extras = {}
    extras = extras or {_normal(k): v for k, v in _EXTRAS.items()}
    extra = extras.get(_normal(dist))
    return f'pip install "perfchain[{extra}]"' if extra else f"pip install {dist}"


def _normal(name: str) -> str:
    """A distribution name in its normal form (PEP 503)."""
    return re.sub(r"[-_.]+", "-", name).lower()


def _one_line(text: str) -> str:
    return " ".join(str(text).split())


class _Group(click.Group):
    """A click group whose every error is one line on stderr and exit code 2."""

    def list_commands(self, ctx):
        return sorted(set(super().list_commands(ctx)) | set(_COMMANDS))

    def get_command(self, ctx, cmd_name):
        command = super().get_command(ctx, cmd_name)
        if command is None and cmd_name in _COMMANDS:
            module, attr = _COMMANDS[cmd_name]
            try:
                mod = importlib.import_module(module)
            except ModuleNotFoundError as exc:
                if exc.name != module:
                    raise
                return None  # that command family is not part of this build
            command = getattr(mod, attr)
            self.add_command(command, cmd_name)
        return command

    def main(self, *args, **kwargs):  # noqa: D401 - click API
        kwargs.setdefault("standalone_mode", False)
        try:
            return super().main(*args, **kwargs)
        except PerfchainError as exc:
            _fail(str(exc))
        except ImportError as exc:  # ModuleNotFoundError included
            name = exc.name or ""
            if name.split(".")[0] == "perfchain" or (not name and "perfchain" in str(exc)):
                raise  # perfchain's own code is broken: a bug, not the user's environment
            if isinstance(exc, ModuleNotFoundError) and name:
                _fail(f"missing dependency '{name.split('.')[0]}': install it with {_install_hint(name)}")
            what = f"'{name.split('.')[0]}' " if name else ""
            _fail(f"dependency {what}cannot be imported ({exc}): reinstall it"
                  + (f" with {_install_hint(name)}" if name else ""))
        except BrokenPipeError:   # `perfchain sweep ... | head`: the reader is gone; say nothing
            os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
            sys.exit(1)
        except OSError as exc:
            where = f"{exc.filename}: " if exc.filename else ""
            _fail(f"{where}{exc.strerror or exc}")
        except click.exceptions.Exit as exc:
            sys.exit(exc.exit_code)
        except click.exceptions.Abort:
            click.echo("error: aborted", err=True)
            sys.exit(130)
        except click.ClickException as exc:
            _fail(exc.format_message())


def _fail(message: str):
    """Print ``error: MESSAGE`` as one line on stderr and exit with code 2."""
    click.echo(f"error: {_one_line(message)}", err=True)
    sys.exit(2)


@click.group(cls=_Group, context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(package_name="perfchain")
def main():
    """perfchain: propellant performance from ingredients to vehicle delta-v.

    Results are theoretical estimates. Propellants and hot-fire work can kill:
    follow local codes, range safety and licensed practice.
    """
