"""The shipped gas property tables (engine/data/gas_tables.npz) and the lazy CoolProp import.

Checks against CoolProp itself (CoolProp.AbstractState, the reference the tables are made from):
the shipped file equals a fresh tabulation, its values equal direct CoolProp calls, and the
fallback without the file gives the same numbers.  Import checks run in fresh subprocesses.
"""

import json
import os
import subprocess
import sys

import CoolProp
import numpy as np
import pytest
from CoolProp.CoolProp import PT_INPUTS

from stillair import gases
from stillair.gases import GAS_NAMES, GASES, TABLE_FILE, TABLE_FILE_VARIABLE


@pytest.fixture(scope="module")
def shipped():
    with np.load(TABLE_FILE, allow_pickle=False) as data:
        return {key: data[key] for key in data.files}


@pytest.fixture(scope="module")
def fresh():
    """The file's arrays computed now from the installed CoolProp (about 1 s for all gases)."""
    return gases.table_file_arrays()


@pytest.fixture
def same_version(shipped):
    recorded = str(shipped["coolprop_version"])
    if recorded != CoolProp.__version__:
        # Policy (stillair.gases docstring): the file stays the reference until rebuilt on purpose;
        # it can only be compared number for number with the CoolProp that made it.
        pytest.skip(f"installed CoolProp {CoolProp.__version__}, table file made with {recorded}")


@pytest.fixture
def reset_tables(monkeypatch):
    """Let a test switch the table file in this process; restore everything afterwards."""
    monkeypatch.delenv(TABLE_FILE_VARIABLE, raising=False)
    gases._reset_tables()
    yield monkeypatch
    monkeypatch.undo()
    gases._reset_tables()


def run_python(code, **environment):
    env = {key: value for key, value in os.environ.items() if key != TABLE_FILE_VARIABLE}
    env.update(environment)
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          env=env, check=True)
    return json.loads(done.stdout.strip().splitlines()[-1])


# States spread over each gas's range and the pressure band (and off the grid points).
SAMPLE_T = {name: (np.linspace(GASES[name].t_range.low, GASES[name].t_range.high, 7) + 0.37).tolist()
            for name in GAS_NAMES}
for _name in GAS_NAMES:
    SAMPLE_T[_name][-1] = GASES[_name].t_range.high
SAMPLE_P = [1.0e3, 4.7e4, 101325.0, 2.0e5]
SAMPLE_CODE = """
import json, sys, stillair
out = {}
for gas, ts in %r.items():
    s = stillair.gas_properties(gas, [[t] for t in ts], %r)
    out[gas] = [s.density.tolist(), s.viscosity.tolist(), s.conductivity.tolist(), s.cp.tolist(),
                s.expansion.tolist(), s.molar_mass]
mix = stillair.gas_properties("argon:0.9, air:0.1", %r, 101325.0)
out["mixture"] = [mix.density.tolist(), mix.conductivity.tolist(), mix.viscosity.tolist()]
out["coolprop_imported"] = "CoolProp" in sys.modules
out["provenance"] = stillair.gas_table_provenance()
print(json.dumps(out))
""" % (SAMPLE_T, SAMPLE_P, SAMPLE_T["krypton"])


# --------------------------------------------------------------------------------------------
# The file against CoolProp
# --------------------------------------------------------------------------------------------

def test_shipped_file_equals_a_fresh_tabulation(shipped, fresh, same_version):
    """Tabulation is deterministic: the same CoolProp gives exactly the shipped arrays."""
    assert sorted(shipped) == sorted(fresh)
    for key in fresh:
        assert shipped[key].dtype == fresh[key].dtype, key
        assert np.array_equal(shipped[key], fresh[key]), key


def test_rewriting_the_file_gives_the_same_bytes(fresh, same_version, tmp_path):
    first = gases.write_table_file(tmp_path / "a.npz", fresh)
    second = gases.write_table_file(tmp_path / "b.npz", fresh)
    assert first.read_bytes() == second.read_bytes() == TABLE_FILE.read_bytes()


def test_rebuild_command_writes_the_file(fresh, same_version, tmp_path, monkeypatch):
    monkeypatch.setattr(gases, "table_file_arrays", lambda: fresh)  # no second tabulation
    target = tmp_path / "rebuilt.npz"
    assert gases.main(["--rebuild-tables", "--output", str(target)]) == 0
    assert target.read_bytes() == TABLE_FILE.read_bytes()


@pytest.mark.parametrize("name", GAS_NAMES)
def test_shipped_values_are_direct_coolprop_values(shipped, same_version, name):
    """Sampled grid points against plain CoolProp.AbstractState PT calls (no phase hint)."""
    data = GASES[name]
    state = CoolProp.AbstractState("HEOS", data.coolprop_fluid)
    t_kelvin, values = shipped[f"{name}.t_kelvin"], shipped[f"{name}.values"]
    pressures = gases._PRESSURE_NODE_VALUES
    rows = np.unique(np.linspace(0, len(t_kelvin) - 1, 9).astype(int))
    for i in rows:
        for j, p in enumerate(pressures):
            t = t_kelvin[i]
            state.update(PT_INPUTS, p, t)
            mu = data.viscosity_fit(t) if data.viscosity_fit else state.viscosity()
            k = data.conductivity_fit(t) if data.conductivity_fit else state.conductivity()
            reference = [state.rhomass() / p, mu, k, state.cpmass(),
                         state.isobaric_expansion_coefficient()]
            # The table is made with a vapour-phase hint, these calls without: CoolProp's
            # density iteration then ends a few ulps elsewhere (1e-12 seen in air cp).
            np.testing.assert_allclose(values[i, j], reference, rtol=1e-10, atol=0)
    assert float(shipped[f"{name}.molar_mass"]) == state.molar_mass()


def test_file_records_its_source_and_grid(shipped):
    assert str(shipped["coolprop_version"]).count(".") >= 1
    assert len(str(shipped["coolprop_gitrevision"])) == 40
    assert shipped["grid"].tolist() == [1.0, 6.0, 1.0e3, 2.0e5]  # K step, nodes, Pa band
    assert tuple(shipped["primaries"].tolist()) == gases._PRIMARY
    assert tuple(shipped["gases"].tolist()) == GAS_NAMES
    for name in GAS_NAMES:
        n = len(shipped[f"{name}.t_kelvin"])
        assert shipped[f"{name}.values"].shape == (n, 6, 5)
        assert shipped[f"{name}.values"].dtype == np.float64
        assert str(shipped[f"{name}.definition"]) == gases._definition(GASES[name])


def test_file_is_small():
    # the tabulated values (1 MB) and their spline coefficients (4 per interval: 4.4 MB, which
    # deflate hardly shrinks), read per gas as it is first used
    assert TABLE_FILE.stat().st_size < 6_000_000


# --------------------------------------------------------------------------------------------
# The stored spline coefficients: numpy evaluates them, scipy fitted them
# --------------------------------------------------------------------------------------------

@pytest.mark.parametrize("name", GAS_NAMES)
def test_stored_splines_reproduce_the_scipy_spline(shipped, name):
    """Each gas's ``<gas>.spline`` against scipy's CubicSpline fitted now from the file's values
    (the Chebyshev series in pressure first), evaluated by scipy's PPoly, to 1e-12."""
    from scipy.interpolate import CubicSpline

    from stillair.gases.tables import chebyshev_columns, piecewise_cubic

    t, values, stored = shipped[f"{name}.t_kelvin"], shipped[f"{name}.values"], shipped[f"{name}.spline"]
    spline = CubicSpline(t, chebyshev_columns(values), axis=0)
    assert stored.shape == spline.c.shape
    scale = np.abs(spline.c).max(axis=1, keepdims=True)   # per power, pressure term and primary
    assert np.all(np.abs(stored - spline.c) <= 1e-12 * scale)
    points = np.concatenate([t, np.random.default_rng(5).uniform(t[0], t[-1], 2000)])
    np.testing.assert_allclose(piecewise_cubic(t, stored, points), spline(points), rtol=1e-12, atol=0)


def test_the_numpy_evaluation_gives_scipys_bits(shipped):
    """piecewise_cubic sums as PPoly does: equal bit for bit, at breaks, between them and at the ends."""
    from scipy.interpolate import PPoly

    from stillair.gases.tables import piecewise_cubic

    t, stored = shipped["air.t_kelvin"], shipped["air.spline"]
    points = np.concatenate([t, np.random.default_rng(6).uniform(t[0], t[-1], 5000), [t[0], t[-1]]])
    assert np.array_equal(piecewise_cubic(t, stored, points), PPoly(stored, t)(points))


def test_first_property_call_imports_no_scipy_interpolate():
    code = ("import stillair, json, sys\n"
            "stillair.air_conductivity(20.0)\n"
            "stillair.gas_properties('krypton', [0.0, 30.0], [5.0e4, 1.0e5])\n"
            "print(json.dumps(sorted(m for m in sys.modules if m.startswith('scipy'))))")
    assert run_python(code) == []


def test_a_file_without_splines_gives_the_same_values(shipped, reset_tables, tmp_path):
    """A table file written before the splines were stored: scipy fits them, the same numbers."""
    t = [-20.0, 0.37, 55.5]
    expected = gases.gas_properties("argon", t, 4.7e4)
    gases._reset_tables()
    older = tmp_path / "older.npz"
    np.savez(older, **{key: value for key, value in shipped.items() if not key.endswith(".spline")})
    reset_tables.setenv(TABLE_FILE_VARIABLE, str(older))
    got = gases.gas_properties("argon", t, 4.7e4)
    for field in ("density", "viscosity", "conductivity", "cp", "expansion"):
        np.testing.assert_allclose(getattr(got, field), getattr(expected, field), rtol=1e-12, atol=0)


def test_a_spline_that_does_not_fit_its_values_is_fitted_again(shipped, reset_tables, tmp_path):
    expected = gases.air_viscosity([0.0, 40.0])
    gases._reset_tables()
    spline = shipped["air.spline"].copy()
    spline[3] *= 1.0 + 1e-9     # no longer the values' own spline
    foreign = write_modified(shipped, tmp_path / "foreign.npz", **{"air.spline": spline})
    reset_tables.setenv(TABLE_FILE_VARIABLE, str(foreign))
    with pytest.warns(RuntimeWarning, match=r"the spline of air in gas table file .*foreign\.npz does "
                                            r"not fit its values; fitted again"):
        got = gases.air_viscosity([0.0, 40.0])
    np.testing.assert_allclose(got, expected, rtol=1e-12, atol=0)


# --------------------------------------------------------------------------------------------
# CoolProp is imported only when a table must be computed
# --------------------------------------------------------------------------------------------

def test_importing_the_engine_does_not_import_coolprop():
    code = "import stillair, json, sys; print(json.dumps('CoolProp' in sys.modules))"
    assert run_python(code) is False


def test_property_calls_with_the_shipped_table_do_not_import_coolprop():
    code = ("import stillair, json, sys\n"
            "stillair.air_conductivity(20.0)\n"
            "stillair.gas_viscosity('argon:0.9, air:0.1', [0.0, 10.0], 5.0e4)\n"
            "stillair.h_cavity(20.0, 0.0, 0.012, 1.2, gas='krypton')\n"
            "print(json.dumps(['CoolProp' in sys.modules, stillair.gas_table_provenance()]))")
    imported, provenance = run_python(code)
    assert imported is False
    assert provenance["installed_coolprop"] is None
    assert set(provenance["gases"]) == {"air", "argon", "krypton"}
    assert all(source.startswith("shipped table") for source in provenance["gases"].values())


# --------------------------------------------------------------------------------------------
# The fallback: no file, a stale file, a broken file
# --------------------------------------------------------------------------------------------

@pytest.mark.slow  # tabulates every gas from CoolProp
def test_without_the_file_values_are_the_same(same_version):
    with_file = run_python(SAMPLE_CODE)
    without = run_python(SAMPLE_CODE, **{TABLE_FILE_VARIABLE: "off"})
    assert with_file["coolprop_imported"] is False
    assert without["coolprop_imported"] is True
    assert without["provenance"]["file"] is None
    assert all(source.startswith("computed with the installed CoolProp")
               for source in without["provenance"]["gases"].values())
    for key in [*GAS_NAMES, "mixture"]:
        for got, expected in zip(without[key], with_file[key]):
            np.testing.assert_allclose(got, expected, rtol=1e-12, atol=0)


def write_modified(shipped, path, **changes):
    arrays = dict(shipped)
    arrays.update({key: np.array(value) for key, value in changes.items()})
    np.savez(path, **arrays)
    return path


def test_a_gas_whose_definition_changed_is_recomputed(shipped, same_version, reset_tables,
                                                      tmp_path):
    expected_krypton = gases.gas_conductivity("krypton", [0.0, 55.5], 3.0e4)
    expected_air = gases.air_density([0.0, 55.5], 3.0e4)
    gases._reset_tables()
    stale = write_modified(shipped, tmp_path / "stale.npz",
                           **{"krypton.definition": "Krypton t=-100.0..150.0 degC"})
    reset_tables.setenv(TABLE_FILE_VARIABLE, str(stale))
    with pytest.warns(RuntimeWarning, match=r"krypton in gas table file .*stale\.npz: made for "
                                            r"'Krypton t=-100\.0\.\.150\.0 degC'"):
        got_krypton = gases.gas_conductivity("krypton", [0.0, 55.5], 3.0e4)
    np.testing.assert_allclose(got_krypton, expected_krypton, rtol=1e-12, atol=0)
    np.testing.assert_allclose(gases.air_density([0.0, 55.5], 3.0e4), expected_air,
                               rtol=1e-12, atol=0)
    sources = gases.gas_table_provenance()["gases"]
    assert sources["krypton"].startswith("computed with the installed CoolProp")
    assert sources["air"].startswith("shipped table stale.npz")


def test_a_file_on_another_grid_is_not_used(shipped, same_version, reset_tables, tmp_path):
    expected = gases.air_conductivity(20.0)
    gases._reset_tables()
    other = write_modified(shipped, tmp_path / "other.npz", grid=[2.0, 6.0, 1.0e3, 2.0e5])
    reset_tables.setenv(TABLE_FILE_VARIABLE, str(other))
    with pytest.warns(RuntimeWarning, match=r"other\.npz not used: grid .* \[2\.0, 6\.0, "
                                            r"1000\.0, 200000\.0\], expected \[1\.0, 6\.0, "
                                            r"1000\.0, 200000\.0\]"):
        value = gases.air_conductivity(20.0)
    assert value == pytest.approx(expected, rel=1e-12)
    assert gases.gas_table_provenance()["file"] is None


def test_a_missing_file_warns_and_falls_back(same_version, reset_tables, tmp_path):
    expected = gases.gas_cp("air", 20.0)
    gases._reset_tables()
    reset_tables.setenv(TABLE_FILE_VARIABLE, str(tmp_path / "absent.npz"))
    with pytest.warns(RuntimeWarning, match=r"absent\.npz not used: .*No such file"):
        assert gases.gas_cp("air", 20.0) == pytest.approx(expected, rel=1e-12)


def test_turning_the_file_off_does_not_warn(reset_tables, recwarn):
    reset_tables.setenv(TABLE_FILE_VARIABLE, "off")
    gases.gas_density("air", 20.0)
    assert not [w for w in recwarn if issubclass(w.category, RuntimeWarning)]
    assert gases.gas_table_provenance()["gases"]["air"] == (
        f"computed with the installed CoolProp ({TABLE_FILE_VARIABLE} is off)")
