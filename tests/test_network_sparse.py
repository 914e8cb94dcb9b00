"""Large networks: Newton's linear systems go sparse from SPARSE_FROM free nodes
(engine/network/solver.py).  The sparse route must give the dense route's answer and obey the
physical laws; the grids are invented demo data."""

from __future__ import annotations

import numpy as np
import pytest

import stillair
from stillair.network import solver


def plate_grid(side: int):
    """A heat-spreading plate: a side x side grid joined by conduction, every node with a
    vertical-plate film to the air and radiation to the room, heat in at two corners."""
    branches = []
    for i in range(side):
        for j in range(side):
            node = f"n{i}_{j}"
            if i + 1 < side:
                branches.append([f"x{i}_{j}", node, f"n{i + 1}_{j}", "conduction", 0.01, 200.0, 2e-4])
            if j + 1 < side:
                branches.append([f"y{i}_{j}", node, f"n{i}_{j + 1}", "conduction", 0.01, 200.0, 2e-4])
            branches.append([f"c{i}_{j}", node, "air", "vplate", 0.3, 1e-4])
            branches.append([f"r{i}_{j}", node, "room", "radiation", 0.9, None, 1e-4])
    boundaries = [["room", "T", 25.0], ["air", "T", 20.0], ["n0_0", "Q", 5.0],
                  [f"n{side - 1}_{side - 1}", "Q", 3.0]]
    return branches, boundaries


def test_the_sparse_route_gives_the_dense_answer(monkeypatch):
    branches, boundaries = plate_grid(12)          # 144 free nodes
    assert 144 >= solver.SPARSE_FROM
    sparse = stillair.solve_network(branches, boundaries, use_cache=False)
    monkeypatch.setattr(solver, "SPARSE_FROM", 10**9)
    dense = stillair.solve_network(branches, boundaries, use_cache=False)
    worst = max(abs(sparse.temperatures[n] - dense.temperatures[n]) for n in dense.temperatures)
    assert worst < 1e-9
    # first law: what goes in at the corners leaves through the films and the radiation
    out = sum(sparse.heat[b[0]] for b in branches if b[3] in ("vplate", "radiation"))
    assert out == pytest.approx(8.0, rel=1e-9)


def test_a_long_conduction_chain_is_linear_between_its_fixed_ends():
    # Fourier's law in series: equal resistances share the difference equally (exact).
    count = 2000
    branches = [[f"k{i}", f"n{i}", f"n{i + 1}", "conduction", 0.01, 1.0, 1.0] for i in range(count)]
    result = stillair.solve_network(branches, [["n0", "T", 100.0], [f"n{count}", "T", 0.0]],
                                    use_cache=False)
    expected = 100.0 * (1.0 - np.arange(count + 1) / count)
    got = np.array([result.temperatures[f"n{i}"] for i in range(count + 1)])
    assert np.max(np.abs(got - expected)) < 1e-9
    assert result.heat["k0"] == pytest.approx(100.0 / (count * 0.01), rel=1e-9)  # the acceptance



def test_the_collector_is_paused_for_a_large_network_only_and_always_resumed(monkeypatch):
    import gc

    import stillair.network as network

    seen = []
    real_compile = network.compile_network

    def compile_and_look(*args, **kwargs):
        seen.append(gc.isenabled())
        return real_compile(*args, **kwargs)

    monkeypatch.setattr(network, "compile_network", compile_and_look)
    monkeypatch.setattr(network, "LARGE_NETWORK", 500)
    small, large = plate_grid(5), plate_grid(12)      # 90 and 552 branch rows
    assert gc.isenabled()
    stillair.solve_network(*small, use_cache=False)
    stillair.solve_network(*large, use_cache=False)
    assert seen == [True, False] and gc.isenabled()
    broken = [row[:] for row in large[0]]
    broken[-1][4] = -1.0                                # a bad emissivity in the last row
    with pytest.raises(stillair.NetworkError, match="emissivity"):
        stillair.solve_network(broken, large[1], use_cache=False)
    assert gc.isenabled()
