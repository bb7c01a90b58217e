"""Each family's inputs in its trade's units: the nuclear preset reads a depth V0 in MeV
(square_well, woods_saxon), a coupling in MeV fm (yukawa's g², two_yukawa's g) and lengths, the
Woods–Saxon diffuseness included, in fm; the plasma preset sets the ion sphere's radius from the
electron density.  Checked against outside sources named beside each check: the square well's
transcendental equation (scipy brentq), its critical depths at Bessel-function zeros, CODATA
conversions (scipy.constants), Malfliet–Tjon III's deuteron, and the Wigner–Seitz radius."""

from __future__ import annotations

import json
import math

import pytest
from scipy import constants as sc
from scipy.constants import physical_constants as pc
from scipy.optimize import brentq

import boundscape as bs
from boundscape.cli import main as cli_main
from cli_calls import message, run_json

HBAR_C = pc["reduced Planck constant times c in MeV fm"][0]  # CODATA, scipy.constants
BOHR_M = pc["Bohr radius"][0]
HARTREE_EV = pc["Hartree energy in eV"][0]
ELECTRON_MEV = pc["electron mass energy equivalent in MeV"][0]
MU = 469.4591  # MeV/c², about half a nucleon mass
NUCLEAR = ["--preset", "nuclear", "--reduced-mass", str(MU), "--length-unit", "fm"]




# -- the nuclear preset: depths in MeV, lengths in fm --------------------------------------------
def square_well_s_levels(depth_MeV, radius_fm, mu_MeV):
    """s-wave bound energies (MeV) of a square well from the matching condition
    k cot(kR) = −κ, k² + κ² = 2μV0/(ħc)² (any quantum-mechanics text, e.g. Griffiths §4.1 problem;
    common practice), each root bracketed between the zeros of cot and solved by scipy's brentq."""
    k0 = math.sqrt(2 * mu_MeV * depth_MeV) / HBAR_C
    levels = []
    # x = kR runs over (π(n − ½), πn): one root of x cot x = −√(k0²R² − x²) in each while x < k0R
    n = 1
    while math.pi * (n - 0.5) < k0 * radius_fm:
        lo, hi = math.pi * (n - 0.5), min(math.pi * n, k0 * radius_fm)
        f = lambda x: x / math.tan(x) + math.sqrt(max((k0 * radius_fm) ** 2 - x * x, 0.0))
        x = brentq(f, lo + 1e-14, hi - 1e-14 if hi == math.pi * n else hi, xtol=1e-15, rtol=1e-15)
        levels.append((HBAR_C * x / radius_fm) ** 2 / (2 * mu_MeV) - depth_MeV)  # E = ħ²k²/2μ − V0
        n += 1
    return levels


def test_square_well_levels_in_MeV_against_the_transcendental_equation(capsys):
    depth, radius = 200.0, 4.0  # MeV, fm: three s levels (k0 R = 8.78, between 5π/2 and 7π/2)
    out = run_json(capsys, "levels", "--family", "square_well", "--strength", str(depth), "--screening-length",
                   str(radius), *NUCLEAR)
    assert out["potential"]["input"] == "V0 = 200 MeV"
    found = [row["energy_MeV"] for row in out["levels"]]
    expected = square_well_s_levels(depth, radius, MU)
    assert len(found) == len(expected) == 3
    for e, ref in zip(found, expected):
        assert e == pytest.approx(ref, rel=1e-9, abs=1e-9 * depth)


def test_square_well_critical_depths_in_MeV_at_bessel_zeros(capsys):
    # a state of (l, n_r) appears as kR reaches the (n_r+1)-th zero of j_{l−1} (j_{−1} = cos):
    # 1s at π/2, 2s at 3π/2, 1p at π (zeros of cos and j₀ = sin x/x; common practice), so
    # V_c = (ħc x/R)²/(2μ)
    radius = 2.0
    out = run_json(capsys, "critical", "--vary", "strength", "--family", "square_well", "--screening-length",
                   str(radius), *NUCLEAR, "--l", "0-1", "--n-max", "2")
    assert out["critical_strength_meaning"] == "well depth, MeV"
    zeros = {"1s": math.pi / 2, "2s": 3 * math.pi / 2, "2p": math.pi}
    for row in out["states"]:
        exact = (HBAR_C * zeros[row["state"]] / radius) ** 2 / (2 * MU)
        assert row["critical_strength"] == pytest.approx(exact, rel=1e-9)
        assert row["critical_depth_MeV"] == row["critical_strength"]  # the unit-carrying key, same number
        assert "critical_coupling_MeV_fm" not in row


def test_woods_saxon_depth_and_lengths_round_trip_through_atomic_units(capsys):
    # the same well given in MeV and fm (nuclear preset) and in hartree and bohr (no preset), the
    # conversions from CODATA (scipy.constants): the levels agree, in MeV, to the engine's promise
    depth, radius, a = 50.0, 4.0, 0.65
    out = run_json(capsys, "levels", "--family", "woods_saxon", "--strength", str(depth), "--screening-length",
                   str(radius), "--param", f"diffuseness={a}", *NUCLEAR, "--l", "0-1")
    assert out["potential"]["input"] == "V0 = 50 MeV"
    assert out["potential"]["parameters"]["diffuseness_fm"] == pytest.approx(a, rel=1e-13)
    bohr_fm = BOHR_M / sc.femto
    atomic = bs.potential("woods_saxon", depth / (HARTREE_EV * 1e-6), radius / bohr_fm, mass=MU / ELECTRON_MEV,
                          diffuseness=a / bohr_fm)
    for l in (0, 1):
        ref = bs.bound_levels(atomic, l)
        found = [row["energy_MeV"] for row in out["levels"] if row["l"] == l]
        assert len(found) == ref.num_bound >= 1
        for e, e_ref in zip(found, ref.energy * HARTREE_EV * 1e-6):
            assert e == pytest.approx(e_ref, rel=2e-9, abs=2e-9 * depth)
    # the title names the diffuseness in fm, not bohr
    assert cli_main(["levels", "--family", "woods_saxon", "--strength", str(depth), "--screening-length",
                     str(radius), "--param", f"diffuseness={a}", *NUCLEAR]) == 0
    assert "diffuseness 0.65 fm" in capsys.readouterr().out.splitlines()[0]


def test_woods_saxon_critical_depth_is_where_the_count_steps(capsys):
    radius, a = 4.0, 0.65
    out = run_json(capsys, "critical", "--vary", "strength", "--family", "woods_saxon", "--screening-length",
                   str(radius), "--param", f"diffuseness={a}", *NUCLEAR, "--n-max", "2")
    assert out["critical_strength_meaning"] == "well depth V0, MeV"
    for row in out["states"]:
        v_c = row["critical_depth_MeV"]
        counts = []
        for factor in (1 - 1e-6, 1 + 1e-6):
            levels = run_json(capsys, "levels", "--family", "woods_saxon", "--strength", repr(v_c * factor),
                              "--screening-length", str(radius), "--param", f"diffuseness={a}", *NUCLEAR)
            counts.append(levels["num_bound"]["0"])
        assert counts == [row["n_r"], row["n_r"] + 1], row
    # the table says what and in which unit
    assert cli_main(["critical", "--vary", "strength", "--family", "woods_saxon", "--screening-length", str(radius),
                     "--param", f"diffuseness={a}", *NUCLEAR, "--n-max", "1"]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert "well depth V0, MeV" in lines[0] and "critical depth (MeV)" in lines[1]


def test_woods_saxon_sharp_surface_tends_to_the_square_well(capsys):
    # a → 0: the square well of the same depth and radius (transcendental equation above).  The
    # Fermi function's step is odd about R, so the shift is O(a²) (common practice, no source):
    # halving a divides it by about 4 (higher orders make it 3.6–3.9 here), and the Richardson limit
    # of two diffusenesses lands closer to the square well than either
    depth, radius = 200.0, 4.0
    shifts = []
    for a in (0.02, 0.01):
        out = run_json(capsys, "levels", "--family", "woods_saxon", "--strength", str(depth), "--screening-length",
                       str(radius), "--param", f"diffuseness={a}", *NUCLEAR)
        shifts.append([row["energy_MeV"] for row in out["levels"]])
    expected = square_well_s_levels(depth, radius, MU)
    for k, ref in enumerate(expected):
        wide, sharp = shifts[0][k] - ref, shifts[1][k] - ref
        assert 3.5 < wide / sharp < 4.2, (k, wide, sharp)
        limit = (4 * shifts[1][k] - shifts[0][k]) / 3
        assert limit == pytest.approx(ref, rel=1e-4) and abs(limit - ref) < abs(sharp) / 5


def test_fit_solves_for_a_depth_in_MeV(capsys):
    # the depth V0 that puts a Woods–Saxon 1s at −20 MeV; the square well's closed-form condition
    # is the check where the surface is sharp (transcendental equation above, same depth)
    ws = ["--family", "woods_saxon", "--screening-length", "4", "--param", "diffuseness=0.65", *NUCLEAR]
    out = run_json(capsys, "fit", *ws, "--vary", "strength", "--state", "1s", "--energy", "-20")
    depth = out["depth_MeV"]
    assert out["depth_error_MeV"] < 1e-6 and out["potential"]["parameters"]["diffuseness_fm"] == pytest.approx(0.65)
    levels = run_json(capsys, "levels", *ws, "--strength", repr(depth))
    assert levels["levels"][0]["energy_MeV"] == pytest.approx(-20.0, rel=1e-8)
    out = run_json(capsys, "fit", "--family", "square_well", "--screening-length", "4", *NUCLEAR, "--vary", "strength",
                   "--state", "1s", "--energy", "-20")
    assert square_well_s_levels(out["depth_MeV"], 4.0, MU)[0] == pytest.approx(-20.0, rel=1e-8)
    assert "use --vary strength" in message(capsys, "fit", *ws, "--vary", "coupling", "--state", "1s", "--energy", "-20")


def test_two_yukawa_coupling_in_MeV_fm_binds_the_deuteron(capsys):
    # Malfliet–Tjon III: V = (−626.885 e^{−1.55 r} + 1438.720 e^{−3.11 r})/r MeV (r in fm), ħ²/m =
    # 41.47 MeV fm² (μc² = (ħc)²/(2·41.47 MeV)): the deuteron bound by about 2.23 MeV (Malfliet & Tjon,
    # Nucl. Phys. A127, 161 (1969); value from memory)
    mu = HBAR_C ** 2 / (2 * 41.47)
    out = run_json(capsys, "levels", "--family", "two_yukawa", "--preset", "nuclear", "--reduced-mass", repr(mu),
                   "--coupling", "626.885", "--screening-length", repr(1 / 1.55), "--length-unit", "fm",
                   "--param", f"core_strength={1438.720 / 626.885!r}", "--param", f"core_range={1.55 / 3.11!r}")
    assert out["potential"]["input"] == "g = 626.885 MeV fm"
    assert out["levels"][0]["energy_MeV"] == pytest.approx(-2.23, abs=0.01)
    # and its critical coupling at that range carries its unit, named as the family's g
    out = run_json(capsys, "critical", "--vary", "strength", "--family", "two_yukawa", "--preset", "nuclear",
                   "--reduced-mass", repr(mu), "--screening-length", repr(1 / 1.55), "--length-unit", "fm",
                   "--n-max", "1")
    assert out["critical_strength_meaning"] == "g, MeV fm"
    assert 0 < out["states"][0]["critical_coupling_MeV_fm"] < 626.885


def test_nuclear_refusals_name_the_flag_that_applies(capsys):
    ws = ["levels", "--family", "woods_saxon", "--screening-length", "4", "--param", "diffuseness=0.65", *NUCLEAR]
    text = message(capsys, *ws, "--coupling", "50")
    assert "--coupling does not apply" in text and "give --strength (well depth V0, MeV)" in text
    text = message(capsys, "levels", "--family", "yukawa", "--strength", "50", "--screening-length", "2", *NUCLEAR)
    assert "give --coupling (g², MeV fm)" in text


# -- the plasma preset: the ion sphere's radius from the electron density -----------------------
def wigner_seitz_bohr(charge, density_cm3):
    """(3Z_i/(4π n_e))^{1/3}: the radius of the sphere holding one ion of charge Z_i in a
    quasi-neutral plasma of electron density n_e (Wigner–Seitz radius, common practice)."""
    return (3 * charge / (4 * math.pi * density_cm3 * 1e6)) ** (1 / 3) / BOHR_M


def test_ion_sphere_radius_is_the_wigner_seitz_radius(capsys):
    z, density, temperature = 2.0, 1e23, 20.0
    base = ["levels", "--family", "ion_sphere", "--preset", "plasma", "--nuclear-charge", "2", "--density",
            "1e23", "--temperature", "20"]
    out = run_json(capsys, *base)
    conditions = out["potential"]["conditions"]
    radius = wigner_seitz_bohr(z, density)
    assert conditions["ion_sphere_radius_bohr"] == pytest.approx(radius, rel=1e-12)
    assert out["potential"]["screening_length_bohr"] == pytest.approx(radius, rel=1e-12)
    assert conditions["screening_model"] == "ion_sphere" and conditions["ion_sphere_charge"] == z
    # Γ_i = Z_i² e²/(4πε₀ R k_B T) (Ichimaru 1982), by hand from scipy.constants: 1.71 here, strongly coupled
    gamma = z ** 2 * sc.e ** 2 / (4 * math.pi * sc.epsilon_0 * radius * BOHR_M * temperature * sc.electron_volt)
    assert conditions["ion_coupling_parameter"] == pytest.approx(gamma, rel=1e-12)
    assert gamma > 1 and conditions["screening_validity"] == "ok"
    # the levels are the family's at that R, in eV
    ref = bs.bound_levels(bs.potential("ion_sphere", z, radius), 0)
    assert [row["energy_eV"] for row in out["levels"]] == pytest.approx(list(ref.energy * HARTREE_EV), rel=1e-12)
    # ions of charge 1 instead: R shrinks by 2^{-1/3}, the cloud is twice as dense as n_e, Γ_i < 1
    out = run_json(capsys, *base, "--ion-sphere-charge", "1")
    conditions = out["potential"]["conditions"]
    assert conditions["ion_sphere_radius_bohr"] == pytest.approx(wigner_seitz_bohr(1.0, density), rel=1e-12)
    assert conditions["cloud_electron_density_cm-3"] == pytest.approx(2e23, rel=1e-12)
    assert conditions["screening_validity"] == "weakly_coupled"
    # the table prints R and warns where the strong-coupling model fails
    assert cli_main([*base, "--ion-sphere-charge", "1"]) == 0
    head = capsys.readouterr().out.splitlines()
    assert "ion_sphere_radius_nm = 0.13365" in head[1] and head[2].startswith("# WARNING: weakly coupled ions")


def test_ion_sphere_loss_density_inverts_the_wigner_seitz_radius(capsys):
    # critical at --temperature: each state is lost above n_e = 3Z/(4π R_c³), R_c the family's
    # critical radius (bs.critical_screening_length)
    out = run_json(capsys, "critical", "--family", "ion_sphere", "--preset", "plasma", "--nuclear-charge", "2",
                   "--temperature", "20", "--n-max", "2")
    for row in out["states"]:
        r_c = bs.critical_screening_length("ion_sphere", 2.0, row["l"], row["n_r"]) * BOHR_M
        assert row["loss_electron_density_cm-3"] == pytest.approx(3 * 2 / (4 * math.pi * r_c ** 3) / 1e6, rel=1e-12)
    # at a fixed density the critical charge needs Z_i fixed (R would move with Z otherwise)
    fixed = ["critical", "--vary", "strength", "--family", "ion_sphere", "--preset", "plasma", "--density", "1e23",
             "--temperature", "20", "--n-max", "1"]
    assert "--ion-sphere-charge" in message(capsys, *fixed)
    out = run_json(capsys, *fixed, "--ion-sphere-charge", "2")
    radius = wigner_seitz_bohr(2.0, 1e23)
    assert out["states"][0]["critical_strength"] == pytest.approx(
        bs.critical_strength("ion_sphere", radius, 0, 0), rel=1e-12)


def test_plasma_refusals_for_lengths_no_density_sets(capsys):
    text = message(capsys, "levels", "--family", "square_well", "--preset", "plasma", "--strength", "2", "--density",
                   "1e23", "--temperature", "20")
    assert "--density sets a screening length" in text and "radius of the well" in text
    text = message(capsys, "levels", "--family", "yukawa", "--preset", "plasma", "--nuclear-charge", "2", "--density",
                   "1e23", "--temperature", "20", "--ion-sphere-charge", "1")
    assert "--ion-sphere-charge applies to family ion_sphere only" in text


# -- sweeps under the nuclear preset: depths in MeV over radii in fm ------------------------------
def test_a_nuclear_sweep_of_woods_saxon_reads_depths_in_MeV(tmp_path):
    import numpy as np

    from boundscape import sweep
    from boundscape.cube.physical import preset_of
    from boundscape.errors import InputError
    from test_conditions import build

    config = {"sweep": "ws", "potential": {"family": "woods_saxon", "diffuseness": 0.65},
              "grid": {"depth_MeV": [40.0, 50.0], "screening_length": [3.0, 4.0], "l": [0, 1], "n_r_max": 2},
              "tiles": {"cells": 8}, "preset": {"kind": "nuclear", "reduced_mass_MeV": MU}}
    ds, plan = build(tmp_path, config)
    assert ds["depth"].attrs["units"] == "MeV"
    assert ds["depth"].values.tolist() == pytest.approx([40.0, 50.0], rel=1e-13)
    # each cell is the CLI's well in MeV and fm (itself checked above against atomic units)
    out = json.loads(_cli_json(["levels", "--family", "woods_saxon", "--strength", "50", "--screening-length", "4",
                                "--param", "diffuseness=0.65", *NUCLEAR]))
    found = ds["energy"].isel(strength=1).sel(screening_length=4.0, l=0).values
    factor = float(ds.attrs["energy_unit_in_eV"]) / 1e6
    assert [row["energy_MeV"] for row in out["levels"]] == pytest.approx(
        list(found[np.isfinite(found)] * factor), rel=1e-12)
    # critical depths in MeV at each radius: the CLI's critical --vary strength
    assert ds["critical_depth"].attrs["units"] == "MeV"
    crit = json.loads(_cli_json(["critical", "--vary", "strength", "--family", "woods_saxon", "--screening-length",
                                 "4", "--param", "diffuseness=0.65", *NUCLEAR, "--n-max", "1"]))
    assert float(ds["critical_depth"].sel(screening_length=4.0, l=0, n_r=0)) == pytest.approx(
        crit["states"][0]["critical_depth_MeV"], rel=1e-9)
    preset, _ = preset_of(ds)
    assert preset.strength_label({}) == "well depth V0 (MeV)"
    # the figures and the loss table render from it, the table's strength column in MeV
    from boundscape.plots.render import render_all

    written = render_all(ds, tmp_path / "figures")
    table = [line for line in (tmp_path / "figures" / "critical_screening_lengths.csv").read_text().splitlines()
             if not line.startswith("#")]  # after the commented header
    assert written and "depth_MeV" in table[0] and "two_mu_g2" not in table[0]
    # a coupling is not a depth, and a depth is not a coupling
    with pytest.raises(InputError, match="grid.coupling_MeV_fm.*grid.depth_MeV"):
        grid = {key: value for key, value in config["grid"].items() if key != "depth_MeV"}
        sweep.validate_config({**config, "grid": {**grid, "coupling_MeV_fm": [50.0]}})
    yukawa = {**config, "potential": {"family": "yukawa"}}
    with pytest.raises(InputError, match="grid.depth_MeV"):
        sweep.validate_config(yukawa)


def _cli_json(argv):
    import contextlib
    import io

    buffer = io.StringIO()
    with contextlib.redirect_stdout(buffer):
        assert cli_main([*argv, "--format", "json"]) == 0
    return buffer.getvalue()


def test_depths_and_frequencies_in_each_trades_energy_unit(capsys):
    # ħω of the harmonic oscillator in MeV: E = (2n_r + l + 3/2)ħω exactly (any QM text, common practice)
    out = run_json(capsys, "levels", "--family", "harmonic", "--preset", "nuclear", "--reduced-mass", "938",
                   "--strength", "10", "--l", "1", "--n-r-max", "2")
    assert [row["energy_MeV"] for row in out["levels"]] == pytest.approx([25.0, 45.0], rel=1e-10)
    # a square well in a semiconductor, V0 in meV and R in nm, for μ* = 0.067: the transcendental
    # equation with ħ²/(2μ) from scipy.constants (in MeV and fm through the same helper)
    mu_MeV = 0.067 * ELECTRON_MEV
    out = run_json(capsys, "levels", "--family", "square_well", "--preset", "semiconductor", "--effective-mass",
                   "0.067", "--permittivity", "12.9", "--strength", "100", "--screening-length", "5",
                   "--length-unit", "nm")
    assert out["potential"]["input"] == "V0 = 100 meV"
    expected = [e * 1e9 for e in square_well_s_levels(100e-9, 5e6, mu_MeV)]  # meV → MeV, nm → fm, back to meV
    assert [row["energy_meV"] for row in out["levels"]] == pytest.approx(expected, rel=1e-9)
