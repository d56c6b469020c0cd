"""The ``jit`` decorator of the compiled kernels: numba by default, plain Python on request.

Every compiled function of the thermo floor (:mod:`.kernel`, :mod:`.newton`,
:mod:`.derivatives`, :mod:`.perfect_gas`, :mod:`.predictor`, the row pruning of
:mod:`.pruning`) is written once, in the subset of Python that numba compiles, and decorated
with :data:`jit`. By default that is ``numba.njit`` (cached on disk, so a machine compiles
once, ~10 s). With ``PERFCHAIN_NO_JIT=1`` in the environment (or numba's own
``NUMBA_DISABLE_JIT=1``) the decorator is the identity and the very same source runs as
ordinary Python: slower, but it can be stepped through in a debugger, and the test suite runs
both ways.

numba caches a compiled function per source file, so a kernel that calls a kernel of another
module would keep its compiled copy of the callee when only the callee's file changes. On
import, one stamp over all :data:`KERNEL_MODULES` is compared with the one the cache was built
from; when they differ, the cached kernels are dropped and compiled afresh (once, ~10 s).
"""

from __future__ import annotations

import math
import os
import pathlib

__all__ = ["COMPILED", "KERNEL_MODULES", "exp", "jit", "jit_inline", "log"]

#: the modules of the thermo floor that hold compiled kernels
KERNEL_MODULES = ("jit", "kernel", "newton_system", "newton", "derivatives", "perfect_gas", "pruning", "phases",
                  "predictor")


def _drop_stale_caches():
    """Delete numba's cached kernels of this package when any kernel source changed since."""
    here = pathlib.Path(__file__).parent
    cache = here / "__pycache__"
    try:
        stamp = ";".join(f"{m}:{(here / (m + '.py')).stat().st_mtime_ns}:{(here / (m + '.py')).stat().st_size}"
                         for m in KERNEL_MODULES)
        mark = cache / "kernels.stamp"
        if mark.is_file() and mark.read_text() == stamp:
            return
        for m in KERNEL_MODULES:
            for f in cache.glob(f"{m}.*.nb[ic]"):
                f.unlink(missing_ok=True)
        cache.mkdir(exist_ok=True)
        mark.write_text(stamp)
    except OSError:     # a read-only install: its sources do not change either
        pass


#: True when the kernels are compiled by numba (False under ``PERFCHAIN_NO_JIT=1``)
COMPILED = os.environ.get("PERFCHAIN_NO_JIT", "").strip().lower() not in ("1", "true", "yes")

if COMPILED:
    import numba

    COMPILED = not numba.config.DISABLE_JIT
    jit = numba.njit(cache=True, nogil=True)
    #: for the few-line helpers called per species (the NASA-7 fit, an element-pair update):
    #: numba inlines them into the caller, where a call per species would cost more than its work
    jit_inline = numba.njit(cache=True, nogil=True, inline="always")
    if COMPILED:
        _drop_stale_caches()
else:
    def jit(function):
        """The identity: the kernels run as plain Python (``PERFCHAIN_NO_JIT=1``).

        >>> jit(abs)(-2.0)
        2.0
        """
        return function

    jit_inline = jit


if COMPILED:
    #: ``math.exp`` itself in compiled kernels (numba returns inf past 709.78)
    exp = math.exp
    #: ``math.log`` itself in compiled kernels (numba returns -inf at 0 and nan below)
    log = math.log
else:
    def exp(x):
        """``math.exp`` as compiled code has it: inf past the largest double, not OverflowError.

        Plain Python raises where numba returns inf, so without this a kernel run uncompiled
        would stop on a trial step the compiled kernel rejects as not finite.

        >>> exp(0.0), exp(1000.0)
        (1.0, inf)
        """
        try:
            return math.exp(x)
        except OverflowError:
            return math.inf

    def log(x):
        """``math.log`` as compiled code has it: -inf at 0 and nan below, not ValueError.

        >>> log(1.0), log(0.0), log(-1.0)
        (0.0, -inf, nan)
        """
        if x > 0.0 or x != x:
            return math.log(x)
        return -math.inf if x == 0.0 else math.nan
