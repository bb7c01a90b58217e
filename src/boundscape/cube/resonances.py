"""The cube past the threshold (``resonances: true``): what each lost state becomes.

Per level (strength, screening_length, l, n_r): ``resonance_energy``, ``resonance_width``,
``virtual_state_kappa`` and the flag ``resonance_status``; per state (strength, l, n_r):
``dissolution_screening_length`` and its flag.  Units as the levels' (hartree, bohr, and bohr⁻¹
for κ_v); a preset rewrites them as it does the levels' (:mod:`.physical`).
"""

from __future__ import annotations

import numpy as np

from ..physics.units import BOHR_M, BOHR_UDUNITS, HARTREE_EV, HARTREE_J, HARTREE_UDUNITS, udunits_scaled
from ..sweep.resonance_tiles import DISSOLUTION_FLAGS, NOT_SOLVED, RESONANCE_FLAGS, RESONANCE_VARS
from .model import flag_attrs, listing

__all__ = ["RESONANCE_VARS", "ENERGY_VARS", "LENGTH_VARS", "INVERSE_LENGTH_VARS", "placeholders",
           "add_resonances", "inverse_length_attrs"]

ENERGY_VARS = ("resonance_energy", "resonance_width")
LENGTH_VARS = ("dissolution_screening_length",)
INVERSE_LENGTH_VARS = ("virtual_state_kappa",)


def inverse_length_attrs(length_m: float) -> dict:
    """Units of a wavenumber in a system whose length unit is ``length_m`` metres: ``1/(L m)``
    keeps L's digits (1/L written out can read ``999999999999999.9 m-1`` for L = 1 fm)."""
    # The factor to 15 digits: 1/1e-15 is 999999999999999.9 in binary floating point.
    return {"units": f"1/({udunits_scaled(length_m, 'm')})", "wavenumber_unit_in_per_m": float(f"{1.0 / length_m:.15g}")}


def placeholders(shape) -> dict:
    """Zero-stride stand-ins for the per-level variables, filled tile by tile in the written file."""
    out = {name: np.broadcast_to(np.float64(np.nan), shape) for name in RESONANCE_VARS[:-1]}
    out["resonance_status"] = np.broadcast_to(np.int8(NOT_SOLVED), shape)
    return out


def add_resonances(ds, levels: dict, dissolution: dict):
    """``ds`` with the variables past the threshold.

    Parameters
    ----------
    levels : dict
        The four per-level arrays (:data:`RESONANCE_VARS`, placeholders or values) and
        ``reasons``, one line per state not converged.
    dissolution : dict
        ``dissolution_screening_length`` and ``dissolution_flag`` (strength, l, n_r), ``reasons``.
    """
    energy = {"units": HARTREE_UDUNITS, "energy_unit_in_J": HARTREE_J, "energy_unit_in_eV": HARTREE_EV}
    length = {"units": BOHR_UDUNITS, "length_unit_in_m": BOHR_M}
    wavenumber = inverse_length_attrs(BOHR_M)
    status = levels["resonance_status"]
    level_dims, critical_dims = ds["energy"].dims, ds["critical_screening_length"].dims
    variables = {
        "resonance_energy": (level_dims, levels["resonance_energy"], {
            "long_name": "energy of the state past its threshold (shape resonance E_r, l >= 1; virtual state on "
                         "the unphysical sheet, negative, l = 0)", **energy,
            "ancillary_variables": "resonance_status",
            "comment": "l >= 1: E_r of the shape resonance, the S-matrix pole E_r - i Gamma/2 continued from the "
                       "bound state (n_r, l); l = 0: the virtual state's E_v = -kappa_v^2/(2 mu), on the "
                       "unphysical sheet (not a bound state); NaN where the state is bound, not found or out "
                       "of reach (see resonance_status)"}),
        "resonance_width": (level_dims, levels["resonance_width"], {
            "long_name": "width of the shape resonance", **energy, "ancillary_variables": "resonance_status",
            "comment": "Gamma of the pole E_r - i Gamma/2 (l >= 1); NaN for l = 0 (a virtual state has no width), "
                       "where the state is bound, and where it is not found"}),
        "virtual_state_kappa": (level_dims, levels["virtual_state_kappa"], {
            "long_name": "momentum kappa_v of the virtual state", **wavenumber,
            "ancillary_variables": "resonance_status",
            "comment": "l = 0 only: the pole k = -i kappa_v on the negative imaginary axis; its energy "
                       "E_v = -kappa_v^2/(2 mu) lies on the unphysical sheet and is stored in resonance_energy; "
                       "NaN for l >= 1, where the state is bound, and where it is not found"}),
        "resonance_status": (level_dims, status, {
            "long_name": "status of the state past its threshold",
            **flag_attrs(RESONANCE_FLAGS),
            "comment": "ok: found, Gamma <= E_r; dissolved: Gamma > E_r (values given) or the pole out of reach "
                       "(NaN); not_converged: error estimate above tolerance (NaN); bound: a bound state (see "
                       "energy); not_solved: the cell's bound states were not solved (see status)",
            "flagged_states": listing(levels["reasons"])}),
        "dissolution_screening_length": (critical_dims, dissolution["dissolution_screening_length"], {
            "long_name": "dissolution screening length", **length,
            "ancillary_variables": "dissolution_screening_length_flag",
            "comment": "l >= 1: the screening length below which the resonance (n_r, l) is broader than its "
                       "energy (Gamma > E_r); between it and critical_screening_length the state lives on as a "
                       "resonance narrower than its energy; NaN where there is none (see the flag)"}),
        "dissolution_screening_length_flag": (critical_dims, dissolution["dissolution_flag"].astype(np.int8), {
            "long_name": "why a dissolution screening length is or is not given",
            **flag_attrs(DISSOLUTION_FLAGS),
            "comment": "out_of_reach: the pole leaves the solver's reach (or the state is never bound) before "
                       "Gamma reaches E_r; virtual_state: l = 0; not_applicable: computed for one-scale families "
                       "only",
            "flagged_states": listing(dissolution["reasons"])}),
    }
    out = ds.assign(variables)
    out.attrs["source"] = out.attrs.get("source", "").rstrip(")") + ", resonances, dissolution_screening_length)"
    out.attrs["resonances"] = np.int8(1)
    return out
