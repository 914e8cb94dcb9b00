"""Branch kinds as data: generated from the correlation registry, printed by the reference.

Checks are agreement with the one-call coefficient at the solution (the same physics by another
path), energy balance, and exact texts of the kind table and messages.
"""

from __future__ import annotations

import pytest

from stillair.convection import surface_convection
from stillair.correlations import GEOMETRIES, PLATE_CASES, Geometry
from stillair.network import BRANCH_KINDS, NetworkError, kind_reference, solve_network
from stillair.network.kinds import SKIPPED_GEOMETRIES, ConvectionKind, NoBranchKind, _convection_kind


def test_every_registered_geometry_is_a_branch_kind_or_skipped_with_its_reason():
    generated = [name for name in GEOMETRIES if name not in SKIPPED_GEOMETRIES]
    for name in generated:
        kind = BRANCH_KINDS[name]
        assert isinstance(kind, ConvectionKind) and kind.geometry == name
    assert list(BRANCH_KINDS) == ["conduction", "resistance", "film", *generated, "radiation", "vent", "airflow"]
    assert {"vplate", "hplate", "tplate", "hcyl", "sphere", "vcyl", "cavity"} <= set(generated)
    for name, reason in SKIPPED_GEOMETRIES.items():
        assert name not in BRANCH_KINDS and reason


def test_a_vertical_cylinder_branch_is_the_one_call_coefficient_at_the_solution():
    # a 0.8 m high, 60 mm pipe stub losing 25 W to still air at 15 °C (demo data)
    branches = [["stub", "s", "air", "vcyl", 0.8, 0.06, 0.15]]
    result = solve_network(branches, [["s", "Q", 25.0], ["air", "T", 15.0]])
    t = result.temperatures["s"]
    one_call = surface_convection("vcyl", t, 15.0, 0.8, diameter=0.06).scalar()
    record = result.branches["stub"]
    assert record.h == pytest.approx(one_call.h, rel=1e-12)
    assert record.method == one_call.method
    assert record.heat == pytest.approx(25.0, rel=1e-9)
    assert record.heat == pytest.approx(one_call.h * 0.15 * (t - 15.0), rel=1e-9)


def test_kind_columns_follow_the_geometry_inputs():
    shapes = {name: [p.describe() for p in kind.params] for name, kind in BRANCH_KINDS.items()}
    wind = "wind m/s (horizontal wind speed; mixed convection) (blank: 0, still air)"
    assert shapes["vcyl"] == ["height m (cylinder height)", "diameter m", "area m²", wind]
    assert shapes["tplate"][2:] == ["tilt ° from vertical", "facing (up or down)", wind]
    assert shapes["cavity"] == ["gap m (gap L between the two faces)", "height m", "area m²", "tilt ° from horizontal (blank: 90)",
                                "gas (blank: the network's)"]
    # a geometry registered later gets its columns by the same rules, without network code
    fin = Geometry(name="fin", inputs=("ra", "pr", "tilt"), description="", cases=PLATE_CASES,
                   tilt_range=(0.0, 45.0), length="height", length_doc="fin height, m")
    kind = _convection_kind(fin)
    assert [p.describe() for p in kind.params] == ["height m (fin height)", "area m²", "tilt ° from vertical",
                                                   "facing (up or down)"]
    assert kind.params[2].limits == (0.0, 45.0)
    with pytest.raises(NoBranchKind) as caught:
        _convection_kind(Geometry(name="fin", inputs=("ra", "pr", "roughness"), description=""))
    assert str(caught.value) == "no column rule for its input(s) roughness"
    # cases other than the plate cases are a column of their own, required where the geometry
    # gives no default case
    wet = _convection_kind(Geometry(name="fin", inputs=("ra", "pr"), description="", cases=("wet", "dry")))
    assert [p.describe() for p in wet.params] == ["length m", "area m²", "case (one of wet, dry)"]
    assert not wet.params[2].optional
    with pytest.raises(NetworkError) as caught:
        wet.read_params([0.2, 1.0, None, None, None], "branch row 1 (w)")
    assert str(caught.value) == ('solve_network: branch row 1 (w), column p3 (case) must be one of "wet", "dry", '
                                 'got blank')
    assert shapes["channel"] == ["spacing m (spacing S between the plates)", "height m", "area m²",
                                 "case (one of isothermal, isothermal-adiabatic, flux, flux-adiabatic) "
                                 "(blank: isothermal)"]


def test_the_kind_reference_is_one_row_per_kind_with_its_heat_flow():
    rows = {row["kind"]: row for row in kind_reference()}
    assert set(rows) == set(BRANCH_KINDS)
    assert rows["conduction"] == {"kind": "conduction", "p1": "thickness m", "p2": "conductivity W/(m·K)",
                                  "p3": "area m²", "p4": "", "p5": "", "q": "k A (T1 - T2) / L",
                                  "from": "either way round (q > 0 from from to to)"}
    assert rows["vcyl"]["from"] == "from: the solid surface; to: the fluid far from it (still, or moving at the wind speed)"
    assert rows["cavity"]["from"] == "from: the surface on the layer's underside; to: the other face"
    from stillair.addin.cells.reference import network_markdown
    assert ("| `vcyl` | q = h(T1, T2) A (T1 - T2), h = Nu k / height; in a wind h = (h_N^3 + h_F^3)^(1/3), "
            "h_F forced; from: the solid surface; to: the fluid far from it (still, or moving at the wind speed) "
            "| height m (cylinder height) | diameter m "
            "| area m² | wind m/s (horizontal wind speed; mixed convection) (blank: 0, still air) |  |") \
        in network_markdown()


def test_a_tilt_outside_the_geometry_range_names_the_range():
    with pytest.raises(NetworkError) as caught:
        solve_network([["t", "a", "b", "tplate", 0.2, 1.0, 95, "up"]], [["b", "T", 0], ["a", "Q", 1]])
    assert str(caught.value) == "solve_network: branch row 1 (t), column p3 (tilt) must be in [0, 90]°, got 95"
