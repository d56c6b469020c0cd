"""The one validation layer: every input of perfchain, checked and normalised here.

The command line, the study file, :func:`perfchain.point`, :func:`perfchain.sweep` and the
grid builder all call these functions, so a field has the same bounds, the same
accepted forms and the same one-line error wherever it is typed. Each value
becomes SI: a quantity a float in Pa, m, kg, s..., a grid a 1-D float array, a
name an :class:`~perfchain.propellants.ingredients.Ingredient`.

- A quantity is text with a unit (``"70 bar"``), a pint Quantity (any registry),
  or a plain number taken as SI (from Python only: an int, a float or a numpy scalar).
- A propellant is an oxidizer and a fuel at one mixture, or a formulation by mass fraction
  (``"AP=0.68, Al=0.18, HTPB=0.14"``, a mapping, or one monopropellant name such as
  ``"H2O2-98"``); ingredient names resolve with aliases and conditioning (``"LOX @ 80 K"``).
- A ratio is a number or text (``"2.6"``); a fraction also ``"85 %"``.
- A grid is one of those, a list or numpy array of them, or text: comma-separated
  values and ranges, ``START to STOP step STEP`` or ``start:stop:step`` with the stop
  included (``"2.6 to 4.0 step 0.2"``, ``"1.6:3.6:0.1"``, ``"20 bar,50 bar"``,
  ``"20:100:20 bar"``); a unit on every value or once at the end (``"30, 60, 100 bar"``,
  ``"30 to 100 bar step 10"``).

Every refusal is one :class:`~perfchain.errors.InputError` line naming the field, the
value *as it was typed* (never its SI conversion) and what is allowed.

Modules: :mod:`.fields` (one value of a named field), :mod:`.grids` (grid axes),
:mod:`.point` (a whole operating point with its cross-field rules), :mod:`.chamber` (a
thrust-chamber design: the point plus geometry, contour and wall temperature).

May import the base modules (errors, units, constants) at import time, and the
ingredient records, flow models and atmosphere when a check needs them; never the
solvers, so checking inputs stays cheap.
"""

from perfchain.inputs.fields import (FIELDS, Field, choice, count, exactly_one, fraction, ingredient,
                                     number, pair, propellant, typed, value)
from perfchain.inputs.grids import LIST_FORMS, grid, grid_texts
from perfchain.inputs.point import loss_args, nozzle_args, point_args, propellant_args
from perfchain.inputs.chamber import chamber_args

__all__ = ["Field", "FIELDS", "value", "number", "fraction", "count", "choice", "ingredient", "propellant", "pair",
           "exactly_one", "typed", "grid", "grid_texts", "LIST_FORMS", "point_args", "propellant_args", "nozzle_args",
           "loss_args", "chamber_args"]
