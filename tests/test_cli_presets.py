"""Presets and their conditions on the command line (levels, critical, resonances, lines, convert),
held against the Python API (engine and presets) and CODATA's conversion factors."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from scipy import constants as sc

import boundscape as bs
from boundscape.cli.main import main
from boundscape.errors import InputError
from boundscape.physics.presets import Nuclear, Plasma, Semiconductor

BOHR = sc.physical_constants["Bohr radius"][0]
HARTREE_EV = sc.physical_constants["Hartree energy in eV"][0]
HBAR_C = sc.physical_constants["reduced Planck constant times c in MeV fm"][0]
PLASMA = ["--family", "yukawa", "--preset", "plasma", "--nuclear-charge", "2", "--density", "1e22",
          "--temperature", "20"]
GAAS = ["--family", "yukawa", "--preset", "semiconductor", "--effective-mass", "0.067", "--permittivity", "12.9"]
DEUTERON = ["--family", "yukawa", "--preset", "nuclear", "--reduced-mass", "469.4591"]


def run_json(capsys, *argv):
    assert main([*argv, "--format", "json"]) == 0, capsys.readouterr().err
    return json.loads(capsys.readouterr().out)


def fails(capsys, *argv):
    assert main(list(argv)) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1
    return err[0]


def test_levels_in_a_plasma_of_given_density_and_temperature(capsys):
    out = run_json(capsys, "levels", *PLASMA, "--l", "0-1")
    lam = float(Plasma().screening_length_at(1e28, 20.0)) / BOHR  # the ideal Fermi gas at 20 eV
    potential = out["potential"]
    assert potential["screening_length_bohr"] == pytest.approx(lam, rel=1e-15) and potential["strength"] == 2.0
    conditions = potential["conditions"]
    assert conditions["electron_density_cm-3"] == 1e22 and conditions["electron_temperature_eV"] == 20.0
    assert conditions["screening_model"] == "finite_temperature"
    valid = Plasma(temperature_eV=20.0).validity(1e28, 20.0)
    assert conditions["coupling_parameter"] == pytest.approx(float(valid.coupling_parameter), rel=1e-12)
    assert conditions["debye_number"] == pytest.approx(float(valid.debye_number), rel=1e-12)
    assert conditions["degeneracy"] == pytest.approx(float(valid.degeneracy), rel=1e-12)
    for l in (0, 1):
        res = bs.bound_levels(bs.potential("yukawa", 2.0, lam, 1.0), l)
        rows = [row for row in out["levels"] if row["l"] == l]
        assert [row["energy_eV"] for row in rows] == pytest.approx(res.energy * HARTREE_EV, rel=1e-13)
        assert [row["mean_radius_nm"] for row in rows] == pytest.approx(res.mean_radius * BOHR * 1e9, rel=1e-11)
    assert main(["levels", *PLASMA, "--screening", "debye"]) == 0
    text = capsys.readouterr().out
    assert "E (eV)" in text and "screening_model = debye" in text and "coupling_parameter" in text


def test_each_condition_flag_has_one_meaning(capsys):
    assert "--strength does not apply with --preset plasma" in fails(capsys, "levels", *PLASMA, "--strength", "2")
    assert "--density needs --temperature" in fails(capsys, "levels", *PLASMA[:-2])
    assert "not both" in fails(capsys, "levels", *PLASMA, "--screening-length", "3")
    assert "--carrier-density does not apply with --preset plasma" in fails(
        capsys, "levels", *PLASMA, "--carrier-density", "1e16")
    assert "--density does not apply without --preset plasma" in fails(
        capsys, "levels", "--family", "yukawa", "--strength", "1", "--density", "1e20")
    assert "--range does not apply" in fails(capsys, "levels", *GAAS, "--strength", "1", "--range", "2")
    assert "--density must be positive" in fails(capsys, "levels", *PLASMA[:-4], "--density", "-1",
                                                 "--temperature", "20")


def test_critical_densities_of_a_plasma_at_a_temperature(capsys):
    out = run_json(capsys, "critical", "--family", "yukawa", "--preset", "plasma", "--nuclear-charge", "1",
                   "--temperature", "10", "--n-max", "2")
    plasma = Plasma(temperature_eV=10.0)
    for row in out["states"]:
        lam_c = bs.critical_screening_length("yukawa", 1.0, row["l"], row["n_r"])
        assert row["critical_screening_length_nm"] == pytest.approx(lam_c * BOHR * 1e9, rel=1e-12)
        n = float(plasma.loss_density(lam_c * BOHR))
        assert row["loss_electron_density_cm-3"] == pytest.approx(n * 1e-6, rel=1e-12)
        assert row["screening_validity"] in ("ok", "strongly_coupled", "few_carriers_in_screening_sphere")
    # without a temperature no loss density is assumed
    out = run_json(capsys, "critical", "--family", "yukawa", "--preset", "plasma", "--nuclear-charge", "1")
    assert "loss_electron_density_cm-3" not in out["states"][0]


def test_critical_donor_density_beside_motts_criterion(capsys):
    # n_c^{1/3} a*: a* = (ε_r/μ*) a₀ (Yu & Cardona §4.2) and the loss density of 1s; Mott's 0.25
    # (Edwards & Sienko 1978; value from memory) is printed beside it with the reason they differ.
    out = run_json(capsys, "critical", *GAAS, "--strength", "1", "--temperature-K", "4.2", "--n-max", "1")
    (row,) = out["states"]
    a_star = 12.9 / 0.067 * BOHR
    assert row["mott_parameter"] == pytest.approx(math.cbrt(row["loss_carrier_density_cm-3"] * 1e6) * a_star, rel=1e-12)
    assert out["mott_criterion"] == 0.25 and "Thomas-Fermi length equal to a*" in out["note"]
    # In the degenerate limit the Yukawa 1s is lost at λ_TF = 0.8399 a* (Rogers et al. 1970, value from
    # memory), q_TF² = 4k_F/(π a*) (Ashcroft & Mermin ch. 17): n^{1/3} a* = π/(4·0.8399²(3π²)^{1/3}) ≈ 0.36.
    cold = run_json(capsys, "critical", *GAAS, "--strength", "1", "--temperature-K", "4.2", "--screening",
                    "thomas_fermi", "--n-max", "1")["states"][0]
    assert cold["mott_parameter"] == pytest.approx(math.pi / (4 * 0.83990 ** 2 * (3 * math.pi ** 2) ** (1 / 3)),
                                                   rel=2e-4)
    assert main(["critical", *GAAS, "--strength", "1", "--temperature-K", "4.2", "--n-max", "1"]) == 0
    assert "# mott_criterion: 0.25" in capsys.readouterr().out


def test_critical_coupling_at_a_range(capsys):
    out = run_json(capsys, "critical", *DEUTERON, "--range", "1.4", "--n-max", "2", "--l", "0-1")
    nuclear = Nuclear(reduced_mass_MeV=469.4591)
    for row in out["states"]:
        engine = bs.critical_strength("yukawa", 1.4, row["l"], row["n_r"], mass=1.0)
        assert row["critical_coupling_MeV_fm"] == pytest.approx(float(nuclear.coupling_MeV_fm(engine)), rel=1e-12)
    ground = out["states"][0]
    # 2μg²λ/ħ² = 2/1.19061 for the Yukawa ground state (Rogers, Graboske & Harwood 1970; value from memory)
    assert 2 * 469.4591 * ground["critical_coupling_MeV_fm"] * 1.4 / HBAR_C ** 2 == pytest.approx(2 / 1.19061,
                                                                                                rel=5e-6)
    assert out["states"][0]["critical_strength"] == ground["critical_coupling_MeV_fm"]  # the same, two keys
    assert "--coupling does not apply" in fails(capsys, "critical", *DEUTERON, "--range", "1.4", "--coupling", "50")


def test_nuclear_resonances_in_MeV_and_fm(capsys):
    out = run_json(capsys, "resonances", *DEUTERON, "--coupling", "30", "--range", "2", "--l", "0-1")
    assert out["potential"]["conditions"] == {"range_fm": 2.0}
    nuclear = Nuclear(reduced_mass_MeV=469.4591)
    engine = nuclear.to_engine(30.0, 2.0)
    res = bs.resonances(bs.potential("yukawa", engine.strength, engine.screening_length, 1.0), 0)
    row = out["resonances"][0]
    assert set(row) >= {"energy_MeV", "width_MeV", "kappa_per_fm"}
    to_MeV = engine.units.energy_J / (sc.mega * sc.e)
    assert row["energy_MeV"] == pytest.approx(res.energy[0] * to_MeV, rel=1e-12)
    assert row["kappa_per_fm"] == pytest.approx(res.kappa[0] * 1e-15 / engine.units.length_m, rel=1e-12)
    assert not any(key.endswith(("hartree", "bohr")) for row in out["resonances"] for key in row)


def test_semiconductor_lines_in_meV_wavenumbers_and_terahertz(capsys):
    out = run_json(capsys, "lines", *GAAS, "--strength", "1", "--carrier-density", "1e14", "--temperature-K", "10",
                   "--n-max", "2")
    semi = Semiconductor(effective_mass=0.067, permittivity=12.9, temperature_K=10.0)
    engine = semi.to_engine(1e20)
    found = bs.lines(bs.potential("yukawa", 1.0, engine.screening_length, 1.0), 2)
    (row,) = [r for r in out["lines"] if r["lower"] == "1s"]
    energy_J = found.energy[0] * semi.effective.energy_J
    assert row["energy_meV"] == pytest.approx(energy_J / (sc.milli * sc.e), rel=1e-12)
    # 1 meV = 8.065543937 cm⁻¹ = 0.2417989242 THz (CODATA, via scipy.constants: E/(hc), E/h)
    assert row["wavenumber_per_cm"] == pytest.approx(row["energy_meV"] * sc.milli * sc.e / (sc.h * sc.c) / 100,
                                                     rel=1e-12)
    assert row["frequency_THz"] == pytest.approx(row["energy_meV"] * sc.milli * sc.e / sc.h / 1e12, rel=1e-12)
    assert row["radial_integral_nm"] == pytest.approx(found.radial_integral[0] * semi.effective.length_m * 1e9,
                                                      rel=1e-12)
    assert "einstein_A_per_s" not in row and "refractive index" in out["note"]


def test_plasma_lines_keep_the_vacuum_rate(capsys):
    out = run_json(capsys, "lines", *PLASMA, "--n-max", "2")
    lam = float(Plasma().screening_length_at(1e28, 20.0)) / BOHR
    found = bs.lines(bs.potential("yukawa", 2.0, lam, 1.0), 2)
    row = out["lines"][0]
    assert row["energy_eV"] == pytest.approx(found.energy[0] * HARTREE_EV, rel=1e-12)
    assert row["wavelength_nm"] == pytest.approx(found.wavelength_nm[0], rel=1e-12)
    assert row["einstein_A_per_s"] == found.einstein_A[0]


def test_convert_prints_coupling_debye_number_and_degeneracy(capsys):
    rows = run_json(capsys, "convert", "plasma", "--density", "1e22", "--temperature", "20")
    shown = {row["quantity"]: row["value"] for row in rows}
    valid = Plasma(temperature_eV=20.0).validity(1e28, 20.0)
    assert shown["coupling parameter Γ"] == pytest.approx(float(valid.coupling_parameter), rel=1e-12)
    assert shown["Debye number N_D"] == pytest.approx(float(valid.debye_number), rel=1e-12)
    assert shown["degeneracy k_B T/E_F"] == pytest.approx(float(valid.degeneracy), rel=1e-12)
    assert shown["engine screening_length"] == pytest.approx(float(Plasma().screening_length_at(1e28, 20.0)) / BOHR,
                                                             rel=1e-12)
    assert "screening model validity: ok" in shown
    assert main(["convert", "semiconductor", "--effective-mass", "0.067", "--permittivity", "12.9", "--density",
                 "1e16", "--temperature", "4.2"]) == 0
    text = capsys.readouterr().out
    assert "coupling parameter Γ" in text and "# strongly_coupled:" in text
