"""Potential families, tabulated potentials, and bad input.

Bad input must raise boundscape.InputError with a one-line message naming the problem.
"""


import numpy as np
import pytest

import boundscape as bs
from boundscape import InputError

KNOWN = ["coulomb", "yukawa", "ecsc", "hulthen", "square_well", "harmonic", "tabulated", "woods_saxon", "ion_sphere",
         "two_yukawa"]


def message_of(call):
    with pytest.raises(InputError) as info:
        call()
    text = str(info.value)
    assert "\n" not in text and text.strip(), repr(text)
    return text


# ---------------------------------------------------------------------------------------------
# The families follow their formulas.

def test_family_values_follow_their_formulas():
    r = np.array([0.05, 0.7, 3.0, 11.0])
    Z, lam, mu = 1.7, 2.5, 0.8
    x = r / lam
    expected = {
        "coulomb": -Z / r,
        "yukawa": -Z * np.exp(-x) / r,
        "ecsc": -Z * np.exp(-x) * np.cos(x) / r,
        "hulthen": -(Z / lam) * np.exp(-x) / (1 - np.exp(-x)),
        "square_well": np.where(r < lam, -Z, 0.0),
        "harmonic": 0.5 * mu * Z * Z * r * r,
    }
    for family, v in expected.items():
        pot = bs.potential(family, Z, lam if bs.FAMILIES[family].uses_screening_length({}) else None, mass=mu)
        np.testing.assert_allclose(pot(r), v, rtol=1e-14, err_msg=family)


def test_hulthen_keeps_its_coulomb_limit_at_small_r():
    # (Z/λ)e^{-x}/(1 − e^{-x}) = Z/r − Z/(2λ) + O(r) as r → 0 (series of x/(e^x − 1),
    # Abramowitz & Stegun 23.1.1): the naive form would lose digits to cancellation here.
    Z, lam, r = 1.0, 10.0, 1e-9
    v = bs.potential("hulthen", Z, lam)(np.array([r]))[0]
    assert v == pytest.approx(-Z / r + Z / (2 * lam), rel=1e-14)


def test_families_declare_screening_length_use():
    for family in ("yukawa", "ecsc", "hulthen", "square_well"):
        assert bs.FAMILIES[family].uses_screening_length({})
        assert bs.potential(family, 1.0, 2.0).uses_screening_length
    for family in ("coulomb", "harmonic"):
        assert not bs.FAMILIES[family].uses_screening_length({})
        assert not bs.potential(family, 1.0).uses_screening_length
    # a table has a screening length only where it is screened: a question of the potential
    r = np.geomspace(1e-3, 30.0, 200)
    table = (r, -np.exp(-r) / r)
    assert bs.potential("tabulated", 1.0, 2.0, table=table, screened=True).uses_screening_length
    assert not bs.potential("tabulated", 1.0, table=table).uses_screening_length


def test_family_parameters_are_declared_by_the_family():
    assert [q.name for q in bs.family_parameters("tabulated")] == ["table", "screened", "coulomb_tail"]
    assert bs.family_parameters("yukawa") == ()
    message = message_of(lambda: bs.potential("yukawa", 1.0, 2.0, diffuseness=0.5))
    assert "'diffuseness'" in message and "yukawa" in message and "\n" not in message


def test_the_new_families_declare_their_parameters():
    # names, units, long names and defaults as README's family table gives them
    (a,) = bs.family_parameters("woods_saxon")
    assert (a.name, a.unit, a.default) == ("diffuseness", "bohr", None) and "diffuseness" in a.long_name
    c, rho = bs.family_parameters("two_yukawa")
    assert (c.name, c.unit, rho.name, rho.unit) == ("core_strength", "1", "core_range", "1")
    # the defaults are Malfliet–Tjon III's ratios V_R/V_A and μ_A/μ_R (Malfliet & Tjon 1969; value from memory)
    assert c.default == pytest.approx(1438.720 / 626.885) and rho.default == pytest.approx(1.55 / 3.11)
    assert bs.family_parameters("ion_sphere") == ()
    assert bs.potential("two_yukawa", 1.0, 2.0).params == {"core_strength": c.default, "core_range": rho.default}
    assert bs.potential("two_yukawa", 1.0, 2.0, core_strength=0).params["core_strength"] == 0.0


@pytest.mark.parametrize("family, params, name", [
    ("woods_saxon", {}, "diffuseness"), ("woods_saxon", {"diffuseness": 0.0}, "diffuseness"),
    ("woods_saxon", {"diffuseness": float("inf")}, "diffuseness"), ("woods_saxon", {"diffuseness": "thin"}, "diffuseness"),
    ("woods_saxon", {"diffuseness": True}, "diffuseness"), ("two_yukawa", {"core_strength": -0.1}, "core_strength"),
    ("two_yukawa", {"core_range": 0.0}, "core_range"), ("two_yukawa", {"core_range": float("nan")}, "core_range"),
    ("ion_sphere", {"diffuseness": 0.5}, "diffuseness"), ("two_yukawa", {"radius": 1.0}, "radius")])
def test_bad_family_parameters_are_one_line_naming_them(family, params, name):
    text = message_of(lambda: bs.potential(family, 1.0, 2.0, **params))
    assert f"{name}" in text and family in text, text


def test_the_new_families_follow_their_formulas():
    r = np.array([0.05, 0.7, 2.9, 3.0, 3.2, 11.0])
    V0, R, a = 1.7, 3.0, 0.4
    # Woods & Saxon, Phys. Rev. 95, 577 (1954)
    np.testing.assert_allclose(bs.potential("woods_saxon", V0, R, diffuseness=a)(r), -V0 / (1 + np.exp((r - R) / a)),
                               rtol=1e-14)
    # Malfliet & Tjon, Nucl. Phys. A127, 161 (1969)
    g, lam, c, rho = 1.3, 2.5, 2.0, 0.4
    np.testing.assert_allclose(bs.potential("two_yukawa", g, lam, core_strength=c, core_range=rho)(r),
                               (-g * np.exp(-r / lam) + c * g * np.exp(-r / (rho * lam))) / r, rtol=1e-14)
    # the ion sphere (Gauss's law for a uniform sphere): compared away from R, where the stated sum
    # keeps its digits (test_families_ion_sphere checks the rest in 50 digits)
    Z = 2.0
    inside = r < 2.9
    np.testing.assert_allclose(bs.potential("ion_sphere", Z, R)(r)[inside],
                               (-Z / r + Z * (3 - r * r / R**2) / (2 * R))[inside], rtol=1e-13)
    assert np.all(bs.potential("ion_sphere", Z, R)(r[r >= R]) == 0.0)
    # a Woods–Saxon well far beyond its radius does not overflow (e^{(r−R)/a} = e^{2500})
    assert bs.potential("woods_saxon", V0, R, diffuseness=a)(np.array([1000.0]))[0] == 0.0


# ---------------------------------------------------------------------------------------------
# Bad parameters

@pytest.mark.parametrize("family", ["yukawa", "ecsc", "hulthen", "square_well"])
@pytest.mark.parametrize("lam", [0.0, -2.0, float("nan"), float("inf")])
def test_screening_length_must_be_positive(family, lam):
    assert "screening_length" in message_of(lambda: bs.potential(family, 1.0, lam))


def test_screening_length_is_required_where_used():
    assert "screening_length" in message_of(lambda: bs.potential("yukawa", 1.0))


@pytest.mark.parametrize("family", ["coulomb", "yukawa", "hulthen", "square_well", "harmonic"])
@pytest.mark.parametrize("mass", [0.0, -1.0, float("nan")])
def test_mass_must_be_positive(family, mass):
    text = message_of(lambda: bs.potential(family, 1.0, 2.0, mass=mass))
    assert "mass" in text


@pytest.mark.parametrize("family", ["coulomb", "yukawa", "ecsc", "hulthen", "square_well", "harmonic"])
@pytest.mark.parametrize("strength", [0.0, -1.0, float("nan"), "one"])
def test_strength_must_be_positive(family, strength):
    assert "strength" in message_of(lambda: bs.potential(family, strength, 2.0))


def test_unknown_family_lists_the_known_ones():
    for call in (lambda: bs.potential("debye", 1.0, 2.0),
                 lambda: bs.critical_screening_length("debye", 1.0, 0, 0)):
        text = message_of(call)
        assert "debye" in text
        for name in KNOWN:
            assert name in text, (name, text)


@pytest.mark.parametrize("l", [-1, 1.5, "1", None])
def test_angular_momentum_must_be_a_non_negative_integer(l):
    pot = bs.potential("yukawa", 1.0, 10.0)
    for call in (lambda: bs.bound_levels(pot, l), lambda: bs.count_bound(pot, l),
                 lambda: bs.critical_screening_length("yukawa", 1.0, l, 0),
                 lambda: bs.critical_strength("yukawa", 10.0, l, 0)):
        text = message_of(call)
        assert text.startswith("l ") or " l " in text, text


@pytest.mark.parametrize("n_r", [-1, 0.5])
def test_radial_quantum_number_must_be_a_non_negative_integer(n_r):
    # the message must name n_r, not l (item 6: "naming what is wrong")
    for call in (lambda: bs.critical_screening_length("yukawa", 1.0, 0, n_r),
                 lambda: bs.critical_strength("yukawa", 10.0, 0, n_r)):
        assert "n_r" in message_of(call)


def test_critical_parameters_need_a_screened_family():
    for family in ("coulomb", "harmonic"):
        assert family in message_of(lambda: bs.critical_screening_length(family, 1.0, 0, 0))
        assert family in message_of(lambda: bs.critical_strength(family, 1.0, 0, 0))


def test_critical_parameters_check_their_numbers():
    assert "strength" in message_of(lambda: bs.critical_screening_length("yukawa", 0.0, 0, 0))
    assert "screening_length" in message_of(lambda: bs.critical_strength("yukawa", -1.0, 0, 0))
    assert "mass" in message_of(lambda: bs.critical_screening_length("yukawa", 1.0, 0, 0, mass=0.0))


# ---------------------------------------------------------------------------------------------
# Bad tables

def yukawa_table(lam=2.0, r_max=60.0, points=400):
    r = np.geomspace(1e-6, r_max, points)
    return r, -np.exp(-r / lam) / r


def tabulated(r, v, **kw):
    return bs.potential("tabulated", 1.0, table=(r, v), **kw)


def test_table_with_nan():
    r, v = yukawa_table()
    v[17] = np.nan
    assert "NaN" in message_of(lambda: tabulated(r, v))


def test_table_with_unsorted_radii():
    r, v = yukawa_table()
    r[[20, 21]] = r[[21, 20]]
    assert "sorted" in message_of(lambda: tabulated(r, v))


def test_table_with_repeated_radius():
    r, v = yukawa_table()
    r[31] = r[30]
    assert "repeated" in message_of(lambda: tabulated(r, v))


def test_table_with_too_few_points():
    r, v = yukawa_table(points=4)
    assert "too few points" in message_of(lambda: tabulated(r, v))


@pytest.mark.parametrize("v_of_r", [lambda r: -1.0 / r, lambda r: -1.0 / r**2, lambda r: -np.exp(-r / 2) / r])
def test_table_whose_tail_does_not_fall_off(v_of_r):
    # −1/r without a declared Coulomb tail, −1/r² (not faster than 1/r², as a short-range table must),
    # and a Yukawa table cut at 10 bohr where |V|r² is still 0.07.
    r = np.geomspace(1e-6, 10.0, 200)
    assert "tail" in message_of(lambda: tabulated(r, v_of_r(r)))


def test_declared_coulomb_tail_must_join_the_table():
    r, v = yukawa_table()
    assert "Coulomb tail" in message_of(lambda: tabulated(r, v, coulomb_tail=1.0))


def test_table_file_problems(tmp_path):
    assert "does not exist" in message_of(lambda: bs.potential("tabulated", 1.0, table=tmp_path / "none.csv"))
    bad = tmp_path / "bad.csv"
    bad.write_text("r,V\n0.1,-10\nabc,-1\n")
    assert "bad.csv" in message_of(lambda: bs.potential("tabulated", 1.0, table=bad))
    r, v = yukawa_table()
    v[5] = np.nan
    nan_file = tmp_path / "nan.csv"
    np.savetxt(nan_file, np.column_stack([r, v]), delimiter=",", header="r,V")
    assert "NaN" in message_of(lambda: bs.potential("tabulated", 1.0, table=nan_file))


def test_tabulated_needs_a_table_and_a_screening_length_when_screened():
    assert "table" in message_of(lambda: bs.potential("tabulated", 1.0))
    r, v = yukawa_table()
    assert "screening_length" in message_of(lambda: tabulated(r, v, screening_length=0.0, screened=True))


# ---------------------------------------------------------------------------------------------
# Tabulated potentials reproduce the family they were made from.  The spline in r·V on 400
# log-spaced points is accurate to ~1e-6 relative in the levels (cubic spline error ∝ h⁴;
# common practice, no source), which is the tolerance used.

def compare_levels(tab_pot, ref_pot, ls=(0, 1, 2)):
    compared = 0
    for l in ls:
        a = bs.bound_levels(tab_pot, l)
        b = bs.bound_levels(ref_pot, l)
        assert a.num_bound == b.num_bound, (l, a.energy, b.energy)
        assert len(a.energy) == len(b.energy)
        if len(a.energy):
            assert np.max(np.abs(a.energy / b.energy - 1)) <= 1e-6, (l, a.energy, b.energy)
        compared += len(a.energy)
    assert compared > 0


@pytest.mark.parametrize("scale", [1.0, 3.0])
def test_unscreened_yukawa_table_reproduces_yukawa(scale):
    r, v = yukawa_table(lam=2.0)
    compare_levels(bs.potential("tabulated", scale, table=(r, v), screened=False),
                   bs.potential("yukawa", scale, 2.0))


def test_table_from_csv_and_netcdf_files(tmp_path):
    import xarray as xr

    r, v = yukawa_table(lam=2.0)
    csv = tmp_path / "yukawa.csv"
    np.savetxt(csv, np.column_stack([r, v]), delimiter=",", header="r,V", comments="")
    nc = tmp_path / "yukawa.nc"
    xr.Dataset({"V": ("r", v)}, coords={"r": r}).to_netcdf(nc)
    for path in (csv, nc):
        compare_levels(bs.potential("tabulated", 3.0, table=path), bs.potential("yukawa", 3.0, 2.0), ls=(0, 1))


def test_screened_short_range_table():
    # a Yukawa λ = 4 table times e^{−r/4} is Yukawa λ = 2
    r, v = yukawa_table(lam=4.0, r_max=250.0, points=600)
    compare_levels(bs.potential("tabulated", 3.0, 4.0, table=(r, v), screened=True), bs.potential("yukawa", 3.0, 2.0))


@pytest.mark.parametrize("lam", [2.0, 10.0])
def test_screened_coulomb_tail_table(lam):
    # −1/r on 1e-6..60 bohr with its Coulomb tail declared, times e^{−r/λ}: Yukawa λ at every r,
    # also beyond the table's end (at λ = 10 the potential is still 4e-5 hartree at 60 bohr).
    r = np.geomspace(1e-6, 60.0, 400)
    pot = bs.potential("tabulated", 1.0, lam, table=(r, -1.0 / r), coulomb_tail=1.0, screened=True)
    far = np.array([30.0, 59.0, 61.0, 200.0])
    np.testing.assert_allclose(pot(far), bs.potential("yukawa", 1.0, lam)(far), rtol=1e-6)
    compare_levels(pot, bs.potential("yukawa", 1.0, lam))


def test_unscreened_coulomb_tail_table_is_hydrogen():
    # −1/r with a declared tail and no screening is hydrogen: E = −1/(2n²) (Bethe & Salpeter 1957).
    r = np.geomspace(1e-6, 60.0, 400)
    pot = bs.potential("tabulated", 1.0, table=(r, -1.0 / r), coulomb_tail=1.0)
    res = bs.bound_levels(pot, 1, n_r_max=4)
    assert np.max(np.abs(res.energy * 2 * res.n**2 + 1)) <= 1e-6, res.energy


def test_screened_coulomb_tail_table_has_the_yukawa_critical_length(tmp_path):
    # A table of −1/r with a declared Coulomb tail, screened, is the Yukawa potential with Z = 1:
    # its 1s state is lost at 1/λ_c = 1.19061 (Rogers, Graboske & Harwood, Phys. Rev. A 1, 1577
    # (1970); value from memory), to the spline's accuracy (~1e-6 here), so to the digits given.
    r = np.linspace(1e-3, 60.0, 600)
    path = tmp_path / "coulomb.csv"
    np.savetxt(path, np.column_stack([r, -1.0 / r]), delimiter=",")
    lam = bs.critical_screening_length("tabulated", 1.0, 0, 0, table=str(path), coulomb_tail=1.0)
    assert round(1.0 / lam, 5) == 1.19061
