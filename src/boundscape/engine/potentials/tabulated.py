"""Your own V(r): a table (:mod:`.tables`) scaled by the strength and optionally screened,
strength × V_table(r) [× exp(−r/λ)], as one family class (see :mod:`.family`)."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np

from ...errors import InputError
from .family import TAIL_EXPONENT, Family, Parameter, ParameterError, register
from .tables import Table, load_table, validate_table

__all__ = ["Tabulated"]


def _flag(name, value):
    if not isinstance(value, (bool, np.bool_)):
        raise InputError(f"{name} must be true or false, got {value!r}")
    return bool(value)


@register
class Tabulated(Family):
    """strength × V_table(r), optionally screened by exp(−r/λ).

    Parameters of its own: ``table`` (a CSV/NetCDF path, an (r, V) pair in bohr and hartree, or
    a :class:`~.tables.Table`), ``screened`` (multiply by exp(−r/λ)) and ``coulomb_tail`` (a
    declared −Z/r tail beyond the last point; it becomes part of the table)."""

    name, formula_text = "tabulated", "strength × V_table(r) [× exp(-r/λ)]"
    display_name = "tabulated"
    parameters = (Parameter("table", "", "tabulated potential V(r) (bohr, hartree)", numeric=False),
                  Parameter("screened", "1", "whether the table is multiplied by exp(-r/λ)", False, _flag),
                  Parameter("coulomb_tail", "1", "charge of a declared -Z/r tail beyond the table", None,
                            numeric=False))
    default_strength = 1.0
    strength_meaning = "scale factor on the table"
    length_meaning = "screening length λ (bohr), if screened"
    strength_long_name = "scale factor on the tabulated potential"

    @staticmethod
    def formula(r, p, x, c, continued):
        # p = (scale, λ, μ, screened, Coulomb charge of the tail); (x, c) the spline of r·V:
        # Horner's rule on the interval x[i] ≤ r < x[i+1], r·V held below the first point.
        # ``continued`` (the solver's ghost nodes past a box that ends at the table's end):
        # the last cubic continued, so that V stays smooth across the box's end as the
        # Richardson error series assumes (zero beyond the end would put a kink in V″ there:
        # shallow levels of an ion-sphere profile came out 2e-9 off with 8x too small estimates)
        if r > x[-1] and (p[4] != 0.0 or not continued):
            v = -p[4] / r  # the declared Coulomb tail, or zero beyond a short-range table
        else:
            rr = max(r, x[0])
            lo, hi = 0, x.size - 2
            while lo < hi:
                mid = (lo + hi + 1) // 2
                if x[mid] <= rr:
                    lo = mid
                else:
                    hi = mid - 1
            d = rr - x[lo]
            v = (((c[0, lo] * d + c[1, lo]) * d + c[2, lo]) * d + c[3, lo]) / r
        v = p[0] * v
        if p[3] != 0.0:
            v *= math.exp(-r / p[1])
        return v

    def prepare(self, params, where=""):
        unknown = sorted(set(params) - {q.name for q in self.parameters})
        if unknown:
            raise self.unknown(unknown[0], where)
        table, tail = params.get("table"), params.get("coulomb_tail")
        try:
            if table is None:
                raise InputError(f"family 'tabulated' needs a table (a CSV/NetCDF path or an (r, V) pair){where}")
            if isinstance(table, Table):
                if tail is not None and tail != table.coulomb_charge:
                    raise InputError(f"coulomb_tail {tail!r} differs from the table's declared tail{where}")
            elif isinstance(table, (str, Path)):
                table = load_table(table, coulomb_tail=tail)
            else:
                r, v = table
                table = validate_table(r, v, coulomb_tail=tail)
        except ParameterError:
            raise
        except InputError as exc:
            raise ParameterError("table", str(exc)) from None
        try:
            screened = _flag("screened", params.get("screened", False))
        except InputError as exc:
            raise ParameterError("screened", f"{exc}{where}") from None
        return {"table": table, "screened": screened}

    def kernel_inputs(self, pot):
        table = pot.params["table"]
        lam = pot.screening_length if math.isfinite(pot.screening_length) else 1e300
        x, c = table.spline
        p = np.array([pot.strength, lam, pot.mass, float(pot.params["screened"]), table.coulomb_charge])
        return p, x, c

    def uses_screening_length(self, params):
        return bool(params.get("screened", False))

    def screened_parameters(self, params):
        return {**params, "screened": True}

    def tail(self, pot):
        return "coulomb" if (pot.params["table"].coulomb_charge > 0 and not pot.params["screened"]) else "short"

    def coulomb_charge(self, pot):
        return pot.strength * pot.params["table"].coulomb_charge if self.tail(pot) == "coulomb" else 0.0

    def support(self, pot):
        table = pot.params["table"]
        end = float(table.r[-1])
        if self.tail(pot) == "coulomb":
            return math.inf
        if pot.params["screened"]:
            if table.coulomb_charge > 0:  # a screened Coulomb tail runs past the table
                return TAIL_EXPONENT * pot.screening_length
            return min(end, TAIL_EXPONENT * pot.screening_length)
        return end

    def energy_scale(self, pot):
        return max(abs(pot.strength) * pot.mass, 1e-300)

    def unscreened(self, pot):
        from .cell_potential import Potential

        if not pot.params["screened"]:
            return pot
        return Potential("tabulated", pot.strength, math.inf, pot.mass, (("screened", False),
                                                                          ("table", pot.params["table"])))
