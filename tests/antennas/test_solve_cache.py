"""The disk cache of NEC solutions: the same answer as NEC, and never trusted more than that."""

from __future__ import annotations

import io
import os

import numpy as np
import pytest

from planpack.antennas import geometry, solvecache, solver

FREQS = (3000.0, 4500.0)


@pytest.fixture()
def cache_root(tmp_path, monkeypatch):
    root = tmp_path / "cache"
    monkeypatch.setenv("PLANPACK_CACHE_DIR", str(root))
    return root


def _model():
    return geometry.dipole(30.0, 8.0, 0.001, 1.0)


def _entry_path(root, model=None, soil="medium-dry", freqs=FREQS, pattern=True):
    t, e, s = solver.nec_ground_args(soil)
    key = solvecache.key(solver.describe(model or _model(), t, e, s, False, freqs, pattern))
    return root / "nec" / f"{key[:48]}.npz", key


class _NoNec:
    def __init__(self, *a, **k):
        raise AssertionError("NEC was run")


def test_a_second_solve_comes_from_disk_and_equals_nec(cache_root, monkeypatch):
    z1, g1 = solver.solve(_model(), "medium-dry", FREQS)
    path, _ = _entry_path(cache_root)
    assert path.is_file()
    monkeypatch.setattr(solver, "nec_context", _NoNec)
    z2, g2 = solver.solve(_model(), "medium-dry", FREQS)
    np.testing.assert_array_equal(z1, z2)
    np.testing.assert_array_equal(g1, g2)


def test_anything_that_changes_the_model_or_ground_is_a_new_entry(cache_root):
    solver.solve(_model(), "medium-dry", FREQS)
    others = [(geometry.dipole(30.001, 8.0, 0.001, 1.0), "medium-dry", FREQS),
              (_model(), "wet", FREQS), (_model(), "medium-dry", (3000.0, 4500.5))]
    names = {_entry_path(cache_root, m, s, f)[0].name for m, s, f in others}
    assert len(names) == 3 and _entry_path(cache_root)[0].name not in names


def _planted(path, **arrays):
    buf = io.BytesIO()
    np.savez(buf, **arrays)
    path.parent.mkdir(parents=True, exist_ok=True, mode=0o700)
    path.write_bytes(buf.getvalue())


@pytest.mark.parametrize("kind", ["wrong-shape", "nan", "other-key", "object", "garbage", "extra-array"])
def test_a_damaged_or_planted_entry_is_solved_afresh(cache_root, kind):
    want_z, want_g = solver.solve(_model(), "medium-dry", FREQS)
    path, key = _entry_path(cache_root)
    z = np.full(2, 50 + 0j)
    g = np.zeros((2, solver.N_THETA, solver.N_PHI))
    if kind == "wrong-shape":
        _planted(path, key=np.array(key), z=np.full(3, 50 + 0j), g=g)
    elif kind == "nan":
        _planted(path, key=np.array(key), z=np.array([np.nan, 50]) + 0j, g=g)
    elif kind == "other-key":
        _planted(path, key=np.array("0" * 64), z=z, g=g)
    elif kind == "object":
        buf = io.BytesIO()
        np.savez(buf, key=np.array(key), z=np.array([{"a": 1}, None], dtype=object), g=g)
        path.write_bytes(buf.getvalue())
    elif kind == "garbage":
        path.write_bytes(b"PK\x03\x04 not a zip at all")
    else:
        _planted(path, key=np.array(key), z=z, g=g, extra=np.zeros(1))
    got_z, got_g = solver.solve(_model(), "medium-dry", FREQS)
    np.testing.assert_array_equal(got_z, want_z)
    np.testing.assert_array_equal(got_g, want_g)


def test_an_entry_that_is_a_link_is_not_followed(cache_root, tmp_path):
    solver.solve(_model(), "medium-dry", FREQS)
    path, _ = _entry_path(cache_root)
    target = tmp_path / "owner.npz"
    target.write_bytes(path.read_bytes())
    path.unlink()
    path.symlink_to(target)
    before = target.read_bytes()
    solver.solve(_model(), "medium-dry", FREQS)
    assert target.read_bytes() == before and not path.is_symlink()


def test_disabled_neither_reads_nor_writes(cache_root):
    with solvecache.disabled():
        solver.solve(_model(), "medium-dry", FREQS)
    assert not (cache_root / "nec").exists() or not os.listdir(cache_root / "nec")


def test_clear_removes_every_entry(cache_root):
    solver.solve(_model(), "medium-dry", FREQS)
    solver.solve(_model(), "wet", FREQS)
    assert len(list((cache_root / "nec").glob("*.npz"))) == 2
    solvecache.clear()
    assert list((cache_root / "nec").glob("*.npz")) == []
