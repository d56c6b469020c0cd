"""The ``perfchain`` command line: parse -> call -> print or write. No physics here.

Owns: the click group and its error handling (:mod:`.main`) and one module per command family
(:mod:`.point`, :mod:`.sweep`, :mod:`.study`, :mod:`.vehicle`).

May import everything below it; nothing imports it.
"""

from perfchain.cli.main import main

__all__ = ["main"]
