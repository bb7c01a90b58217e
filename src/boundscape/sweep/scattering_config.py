"""The config key ``scattering``: ``true`` (a_l, 1/a_l and r_e of every cell and l) or
``{energies: [...]}`` (also δ_l and σ_l at those collision energies, given in the preset's energy
unit: eV under ``plasma``, meV under ``semiconductor``, MeV under ``nuclear``; hartree without a
preset).  The checks run at validation, before any job, from the raw config (the schema has
checked the types and that every energy is positive).
"""

from __future__ import annotations

import math

import numpy as np

from ..engine import potential
from ..errors import InputError
from .limits import axis_size

__all__ = ["MAX_SCATTERING_ENERGIES", "check_scattering"]

# Energies a sweep's phase shifts may ask for: each cell solves and stores every one (five
# values each), as it stores at most 200 levels per l (common practice, no source).
MAX_SCATTERING_ENERGIES = 200


def check_scattering(section, family: str, own: dict, top_l: int) -> None:
    """Refuse, in one line naming the key and the value, a ``scattering`` section the sweep
    cannot honour: a family with a long-range tail, an l above what the engine's scattering
    computes, too many energies, energies that are not finite or repeat.

    Parameters
    ----------
    section : bool or dict
        The config's ``scattering`` value (``False`` is not passed here).
    family, own : str, dict
        The potential family and its own parameters (checked already).
    top_l : int
        The largest l of the sweep's grid.
    """
    from ..engine.continuum.scattering import MAX_L  # the solver's own limit (loads it: only when asked)

    probe = potential(family, 1.0, 1.0, **own)
    if probe.tail != "short":
        raise InputError(f"config key scattering: family {family} has a {probe.tail} tail; scattering lengths and "
                         "phase shifts need a short-range potential (a Coulomb tail needs Coulomb functions); "
                         "remove the key")
    if top_l > MAX_L:
        raise InputError(f"config key scattering: grid.l reaches {top_l}, above {MAX_L}, the largest l scattering "
                         "computes (δ_l falls like (kR)^(2l+1)); lower grid.l or remove the key")
    if section is True:
        return
    spec = section["energies"]
    size = axis_size(spec, "energies")  # before building: num may be huge
    if size is not None and size > MAX_SCATTERING_ENERGIES:
        raise InputError(f"config key scattering.energies: {size:,} energies, over the limit of "
                         f"{MAX_SCATTERING_ENERGIES} (every cell solves and stores each); split them over sweeps")
    given = [spec["start"], spec["stop"]] if isinstance(spec, dict) else list(spec)
    if not all(math.isfinite(value) for value in given):
        raise InputError(f"config key scattering.energies: values must be finite, got {spec!r}")
    if isinstance(spec, dict):
        if spec["num"] > 1 and spec["start"] == spec["stop"]:
            raise InputError(f"config key scattering.energies: start equals stop but num is {spec['num']}")
    elif np.unique(given).size != len(given):
        raise InputError(f"config key scattering.energies: repeated values in {spec!r}")
