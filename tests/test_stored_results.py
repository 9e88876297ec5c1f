"""Results kept between runs (core/stored.py): read back only for the same computation, the same
to the bit as computed again, and never a reason for a run to fail."""

import numpy as np
import pytest

from groundcheck.core import stored as store
from groundcheck.physics import plate, plate_grid, plate_paths

MODULES = (plate.__name__,)


@pytest.fixture
def folder(tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    return tmp_path / "cache" / "groundcheck" / store.SUBFOLDER


def counted(result):
    calls = []

    def compute():
        calls.append(1)
        return result

    return compute, calls


def test_read_back_is_the_same_to_the_bit(folder):
    a = np.random.default_rng(1).standard_normal((5, 3)) * 1e-7
    compute, calls = counted((a, 0.1 + 0.2, float("nan")))
    first = store.stored("trial", (1.5, (2.0, 3.0)), MODULES, compute)
    second = store.stored("trial", (1.5, (2.0, 3.0)), MODULES, compute)
    assert len(calls) == 1
    assert second[0].tobytes() == a.tobytes() and second[0].dtype == a.dtype
    assert second[1] == 0.1 + 0.2 and isinstance(second[1], float)
    assert np.isnan(second[2])
    assert first[0] is a
    assert len(list(folder.glob("trial-*.npz"))) == 1


def test_other_arguments_or_code_are_other_entries(folder, monkeypatch):
    compute, calls = counted((np.ones(2),))
    store.stored("trial", (1.0,), MODULES, compute)
    store.stored("trial", (1.0000000000000002,), MODULES, compute)  # the next float
    assert len(calls) == 2
    # the same arguments, the computing module's text changed: computed again
    monkeypatch.setattr(store, "_code", lambda modules: "another text")
    store.stored("trial", (1.0,), MODULES, compute)
    assert len(calls) == 3


def test_a_damaged_or_foreign_entry_is_computed_again(folder):
    compute, calls = counted((np.arange(4.0),))
    store.stored("trial", (7,), MODULES, compute)
    (path,) = folder.glob("trial-*.npz")
    path.write_bytes(path.read_bytes()[:100])  # cut short
    again = store.stored("trial", (7,), MODULES, compute)
    assert len(calls) == 2 and again[0].tolist() == [0.0, 1.0, 2.0, 3.0]
    # an entry whose key is another computation's (a collision of names) is not read
    other, _ = counted((np.zeros(1),))
    store.stored("trial", (8,), MODULES, other)
    (path8,) = set(folder.glob("trial-*.npz")) - {path}
    path8.replace(path)
    store.stored("trial", (7,), MODULES, compute)
    assert len(calls) == 3


def test_no_usable_folder_means_no_store(tmp_path, monkeypatch):
    blocker = tmp_path / "a-file"
    blocker.write_text("not a folder")
    monkeypatch.setenv("XDG_CACHE_HOME", str(blocker))
    compute, calls = counted((np.ones(1),))
    store.stored("trial", (1,), MODULES, compute)
    store.stored("trial", (1,), MODULES, compute)
    assert len(calls) == 2


def test_a_folder_others_may_write_is_not_used(folder):
    compute, calls = counted((np.ones(1),))
    store.stored("trial", (1,), MODULES, compute)
    folder.chmod(0o777)
    store.stored("trial", (1,), MODULES, compute)
    assert len(calls) == 2


def test_the_store_keeps_within_its_budget(folder, monkeypatch):
    monkeypatch.setattr(store, "BUDGET", 40_000)
    for i in range(12):  # about 8 kB each
        store.stored("trial", (i,), MODULES, lambda: (np.zeros(1000),))
    sizes = [p.stat().st_size for p in folder.glob("*.npz")]
    assert sum(sizes) <= 40_000 and len(sizes) >= 3
    assert not list(folder.glob("*.part"))


def test_plate_reduction_and_flow_read_back_alike(folder, monkeypatch):
    """A plate's reduction and current spread read from the store equal those computed, to the
    bit; the second time nothing is factorised."""
    contacts = ((0.02, 0.03), (0.21, 0.05), (0.12, 0.15))
    args = (0.25, 0.18, 0.0015, 2.8e-8, contacts, plate.FASTENER_RADIUS, None, True)
    plate._reduced.cache_clear()
    plate_paths.plate_flow.cache_clear()
    red, used, err = plate._reduced(*args)
    flow = plate_paths.plate_flow(0.25, 0.18, contacts)
    plate._reduced.cache_clear()
    plate_paths.plate_flow.cache_clear()

    def never(*a, **k):
        raise AssertionError("factorised again")

    monkeypatch.setattr(plate, "_reduce", never)
    monkeypatch.setattr(plate_paths, "_plate_flow", never)
    red2, used2, err2 = plate._reduced(*args)
    flow2 = plate_paths.plate_flow(0.25, 0.18, contacts)
    assert red2.tobytes() == red.tobytes() and not red2.flags.writeable
    assert (used2, err2) == (used, err)
    for x, y in zip(flow, flow2):
        assert x.tobytes() == y.tobytes()
    plate._reduced.cache_clear()
    plate_paths.plate_flow.cache_clear()


def test_the_spread_reads_the_reductions_factorisation(monkeypatch):
    """The current spread over a plate whose reduction this process has made factorises nothing
    again, and equals the spread solved directly on the grounded grid (Kirchhoff's laws on the same
    network, SuperLU on the whole Laplacian) to 1e-10 of its largest edge current."""
    import scipy.sparse.linalg as spla

    from groundcheck.physics.plate_mesh import plate_mesh

    monkeypatch.setattr(store, "store_folder", lambda: None)
    width, depth = 0.24, 0.17
    contacts = ((0.02, 0.03), (0.2, 0.04), (0.11, 0.14), (0.04, 0.15))
    plate_grid._GRIDS.clear()
    plate._reduced.cache_clear()
    plate_paths.plate_flow.cache_clear()
    plate.reduce_plate(width, depth, 0.002, 2.8e-8, list(contacts), ["a", "b", "c", "d"])
    calls = []
    real = spla.splu
    monkeypatch.setattr(spla, "splu", lambda *a, **k: calls.append(1) or real(*a, **k))
    w, d, placed = plate.quantised(width, depth, contacts)
    order = plate.canonical_order(w, d, placed)
    ordered = tuple(placed[i] for i in order)
    mids, vecs, flow = plate_paths._plate_flow(w, d, ordered, plate.FASTENER_RADIUS)
    assert calls == []
    # the same grid solved directly: contact 0 grounded, 1 A in at each other contact
    step = plate.grid_step(w, d, plate.FASTENER_RADIUS)
    nx, ny = int(round(w / step)) + 1, int(round(d / step)) + 1
    X, Y = (v.ravel() for v in np.meshgrid(np.linspace(0, w, nx), np.linspace(0, d, ny)))
    group = plate.contact_groups(
        X, Y, ordered, plate.FASTENER_RADIUS, min(w / (nx - 1), d / (ny - 1))
    )
    mesh = plate_mesh(w, d, 1.0, ordered, plate.FASTENER_RADIUS, nx, ny, group)
    rhs = np.zeros((mesh.n - 1, mesh.k))
    rhs[np.arange(mesh.k - 1), np.arange(1, mesh.k)] = 1.0
    phi = np.zeros((mesh.n, mesh.k))
    phi[1:] = real(mesh.laplacian()[1:, 1:].tocsc()).solve(rhs)
    direct = mesh.g[:, None] * (phi[mesh.a] - phi[mesh.b])
    assert np.abs(flow - direct).max() <= 1e-10 * np.abs(direct).max()
    # Kirchhoff: the currents leaving contact j's disc sum to the 1 A injected there
    for j in range(1, mesh.k):
        out = flow[mesh.a == j, j].sum() - flow[mesh.b == j, j].sum()
        assert out == pytest.approx(1.0, rel=1e-9)
    plate_grid._GRIDS.clear()
    plate._reduced.cache_clear()
    plate_paths.plate_flow.cache_clear()


def test_a_module_without_readable_source_stores_nothing(folder, monkeypatch):
    monkeypatch.setattr(store, "_code", lambda modules: None)  # as for a module with no source
    compute, calls = counted((np.ones(1),))
    store.stored("trial", (1,), MODULES, compute)
    store.stored("trial", (1,), MODULES, compute)
    assert len(calls) == 2 and not list(folder.glob("*.npz"))


def test_a_write_that_fails_leaves_no_part_file_and_the_result_stands(folder, monkeypatch):
    def full(*a, **k):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(np, "savez", full)
    out = store.stored("trial", (2,), MODULES, lambda: (np.arange(3.0),))
    assert out[0].tolist() == [0.0, 1.0, 2.0]
    assert not list(folder.glob("*"))


def test_the_grids_kept_stay_within_their_bytes(monkeypatch):
    """Each plate's grid and response are kept for its spread, the latest first, within
    KEPT_BYTES: a large plate with many fastenings does not hold tens of MB per grid for ever."""
    monkeypatch.setattr(store, "store_folder", lambda: None)
    monkeypatch.setattr(plate_grid, "KEPT_BYTES", 3 * 2**20)
    plate_grid._GRIDS.clear()
    for i in range(4):
        contacts = ((0.02, 0.03), (0.2 + 0.005 * i, 0.04), (0.11, 0.14))
        plate_grid.grid_response(0.24, 0.17, contacts, plate.FASTENER_RADIUS, 120, 86)
    sizes = [plate_grid._size(g) for g in plate_grid._GRIDS.values()]
    assert 1 <= len(sizes) < 4 and sum(sizes) <= 3 * 2**20
    assert list(plate_grid._GRIDS)[-1][2] == contacts  # the latest is kept
    plate_grid._GRIDS.clear()


def test_a_part_file_an_interrupted_write_left_is_cleared_later(folder):
    import os
    import time

    store.stored("trial", (3,), MODULES, lambda: (np.ones(1),))
    old, fresh = folder / "gone.part", folder / "writing.part"
    old.write_bytes(b"x")
    fresh.write_bytes(b"x")
    os.utime(old, (time.time() - 7200, time.time() - 7200))
    store.stored("trial", (4,), MODULES, lambda: (np.ones(1),))  # a write trims
    assert not old.exists() and fresh.exists()
