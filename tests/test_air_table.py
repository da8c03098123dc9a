"""The air table shipped with the package (convlib/data/air_101325Pa.*) against CoolProp, regenerated here.

Reference: CoolProp called directly (I. H. Bell et al. (2014), Ind. Eng. Chem. Res. 53:2498,
doi:10.1021/ie4033999; air after Lemmon et al. (2000), J. Phys. Chem. Ref. Data 29:331, transport after
Lemmon & Jacobsen (2004), Int. J. Thermophys. 25:21). The tolerance 1e-12 relative allows only the last
bits of a float to differ (another platform's CoolProp build); a new CoolProp version or grid that moves
any number fails here: regenerate with ``python -m convlib.air_table`` and note it in CHANGELOG.md.
"""
import json
import shutil
import subprocess
import sys
import warnings

import numpy as np
import pytest
from CoolProp import CoolProp as CP

from convlib import air_table, properties
from convlib.properties import PropertyTable, air

RTOL = 1e-12


@pytest.fixture(scope="module")
def fresh():
    return air_table.build()  # every number from CoolProp, by the code that builds any other table


def test_shipped_table_loads_without_warning_and_is_the_one_air_uses():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        shipped = air_table.load()
    assert shipped is not None
    assert shipped.table.values.shape == (shipped.table.values.shape[0], 5)
    assert PropertyTable.get("Air", 101325.0) is air_table.shipped().table


def test_shipped_table_regenerated_from_coolprop_is_the_same(fresh):
    shipped = air_table.load()
    assert air_table.differences(shipped, fresh, rtol=RTOL) == [], (
        f"the shipped table (CoolProp {shipped.coolprop_version}) differs from CoolProp "
        f"{fresh.coolprop_version}: regenerate it with `python -m convlib.air_table`")


def test_recorded_sha256_is_the_table_values():
    with open(f"{air_table.DATA_DIR}/{air_table.STEM}.json", encoding="utf-8") as f:
        meta = json.load(f)
    values = np.load(f"{air_table.DATA_DIR}/{air_table.STEM}.npy")
    assert air_table.table_sha256(values) == meta["sha256"]
    assert len(meta["sha256"]) == 64
    assert meta["coolprop_version"].split()[0] == air_table.shipped().coolprop_version.split()[0]


def test_shipped_facts_are_coolprops(fresh):
    # CoolProp PropsSI called directly: dew and bubble temperatures of air at 1 atm, Tmin, Tmax
    shipped = air_table.shipped()
    bubble, dew = shipped.saturation
    assert bubble == pytest.approx(CP.PropsSI("T", "P", 101325.0, "Q", 0, "Air"), rel=1e-9)
    assert dew == pytest.approx(CP.PropsSI("T", "P", 101325.0, "Q", 1, "Air"), rel=1e-9)
    assert shipped.fluid.T_max == pytest.approx(CP.PropsSI("Tmax", "Air"), rel=1e-12)
    assert shipped.temperature_range[0] == pytest.approx(dew + properties.SATURATION_MARGIN, rel=1e-12)
    T = shipped.table.temperature[[0, 300, 1000, -1]]
    for column, key in enumerate("DVLC"):
        expected = [CP.PropsSI(key, "T", t, "P", 101325.0, "Air") for t in T]
        np.testing.assert_allclose(shipped.table.values[[0, 300, 1000, -1], column], expected, rtol=RTOL)


@pytest.mark.parametrize("damage", ["value", "grid", "missing"])
def test_altered_or_missing_table_is_refused_with_a_warning(tmp_path, damage):
    for ext in (".npy", ".json"):
        shutil.copy(f"{air_table.DATA_DIR}/{air_table.STEM}{ext}", tmp_path)
    npy, meta = tmp_path / (air_table.STEM + ".npy"), tmp_path / (air_table.STEM + ".json")
    if damage == "value":
        values = np.load(npy)
        values[100, 2] *= 1.0 + 1e-6
        np.save(npy, values)
    elif damage == "grid":
        data = json.loads(meta.read_text())
        data["grid_step"] = 0.5
        meta.write_text(json.dumps(data))
    else:
        npy.unlink()
    with pytest.warns(RuntimeWarning, match="shipped air table"):
        assert air_table.load(str(tmp_path)) is None


@pytest.fixture
def without_shipped_table(monkeypatch):
    caches = (properties._fluid, properties._saturation, properties._temperature_range, properties._table)

    def clear():
        for cache in caches:
            cache.cache_clear()

    clear()
    monkeypatch.setattr(air_table, "shipped", lambda: None)
    yield
    monkeypatch.undo()
    clear()


def test_without_the_shipped_table_coolprop_gives_the_same_numbers(without_shipped_table):
    T = np.array([250.0, 300.0, 345.67, 800.0])
    via_coolprop = air(T)
    assert PropertyTable.get("Air", 101325.0) is not air_table.load().table
    shipped = air_table.load().table
    np.testing.assert_allclose(PropertyTable.get("Air", 101325.0).values, shipped.values, rtol=RTOL)
    lookup = shipped.lookup(T)
    np.testing.assert_allclose(via_coolprop.rho, lookup[:, 0], rtol=RTOL)
    np.testing.assert_allclose(via_coolprop.k, lookup[:, 2], rtol=RTOL)


def _imports_after(code: str) -> set[str]:
    probe = f"import sys\n{code}\nprint(' '.join(sorted({{m.split('.')[0] for m in sys.modules}})))"
    out = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, timeout=120)
    assert out.returncode == 0, out.stderr
    return set(out.stdout.split())


def test_air_at_standard_pressure_does_not_import_coolprop():
    modules = _imports_after("import convlib\np = convlib.air([300.0, 350.0])\nassert 1.17 < p.rho[0] < 1.18")
    assert "CoolProp" not in modules
    assert "numpy" in modules  # the probe did run the physics


def test_other_pressures_and_fluids_import_coolprop_on_first_use():
    modules = _imports_after("import convlib\np = convlib.air(300.0, pressure=79500.0)\n"
                             "assert 0.92 < float(p.rho) < 0.93")
    assert "CoolProp" in modules


def test_regenerate_command_checks_the_shipped_table():
    out = subprocess.run([sys.executable, "-m", "convlib.air_table", "--check", "--rtol", str(RTOL)],
                         capture_output=True, text=True, timeout=120)
    assert out.returncode == 0, out.stdout + out.stderr
    assert "matches CoolProp" in out.stdout
