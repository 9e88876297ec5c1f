"""A ring source's fluxes kept for the same points and directions: the repair advisor analyses the
plan once per candidate, and a candidate that leaves a loop's outline and a source as they were
asks for the same fluxes again (the search for a loop's worst direction reads nothing else).

Each entry is the result of one :func:`groundcheck.physics.pickup.ring_fluxes` call, keyed by a
digest of everything the call reads (the ring's size and strength, its quadrature points,
elements and groups, and the directions asked for, in their order): the call is a deterministic
function of those, so a kept result is the one the call would give again, to the last bit (the
directions are keyed as asked, in one batch, since the product that projects the points on them
may round alike only within one batch shape).  The store is bounded (least recently used out) and
lives as long as the process: a ``watch`` session or the advisor's candidates reuse it, and no
result depends on what ran before.

References: none (bookkeeping).
"""

from __future__ import annotations

import hashlib
from collections import OrderedDict

import numpy as np

from .pickup import ring_fluxes, ring_terms

__all__ = [
    "points_digest",
    "loop_digest",
    "parts_digest",
    "derived_digest",
    "memo_ring_fluxes",
    "memo_terms",
    "memo_arrays",
    "MEMO_CALLS",
    "MEMO_POINTS",
]

#: ring_fluxes results kept (each a few directions × loops: a few kB at most)
MEMO_CALLS = 4096
#: ring_terms kept (each about 40 bytes a quadrature point: 1.6 MB for a plate's 40,000)
MEMO_POINTS = 16

_CALLS: OrderedDict = OrderedDict()
_TERMS: OrderedDict = OrderedDict()
_ARRAYS: OrderedDict = OrderedDict()


def _source_bytes(src, count: int) -> bytes:
    return np.array([src.size, src.b_ref, src.r_ref, count], dtype=float).tobytes()


def _arrays_into(h, arrays) -> None:
    for a, kind in arrays:
        a = np.ascontiguousarray(a, dtype=kind)
        h.update(repr(a.shape).encode())
        h.update(a.tobytes())


def points_digest(src, X: np.ndarray, W: np.ndarray, group: np.ndarray, count: int) -> bytes:
    """A digest of everything :func:`ring_fluxes` reads besides the directions.

    Parameters:
        src: the field source (its size, b_ref and r_ref are read).
        X, W, group, count: the quadrature points, elements, groups and group count.
    Returns:
        a 32-byte digest.
    References:
        none (bookkeeping).
    """
    h = hashlib.blake2b(b"points", digest_size=32)
    h.update(_source_bytes(src, count))
    _arrays_into(h, ((X, float), (W, float), (group, np.int64)))
    return h.digest()


def loop_digest(X: np.ndarray, W: np.ndarray) -> bytes:
    """A digest of one loop's quadrature points and elements (the source's centre is in them).

    Parameters:
        X, W: the loop's points and elements.
    Returns:
        a 32-byte digest.
    References:
        none (bookkeeping).
    """
    h = hashlib.blake2b(b"loop", digest_size=32)
    _arrays_into(h, ((X, float), (W, float)))
    return h.digest()


def parts_digest(src, loops: list) -> bytes:
    """A digest of points made loop by loop: each loop's :func:`loop_digest` in column order, the
    points of column k in group k, one after the other, as :func:`points_digest` would read them.

    Parameters:
        src: the field source.
        loops: each column's loop digest.
    Returns:
        a 32-byte digest.
    References:
        none (bookkeeping).
    """
    h = hashlib.blake2b(b"parts", digest_size=32)
    h.update(_source_bytes(src, len(loops)))
    for d in loops:
        h.update(d)
    return h.digest()


def derived_digest(parent: bytes, how: str, index: int) -> bytes:
    """The digest of points taken from others by a deterministic rule (a loop's own points, the
    merged points of a search): the parent's digest with the rule's name and argument.

    Parameters:
        parent: the digest of the points they are taken from.
        how: the rule's name.
        index: its argument (a loop's column).
    Returns:
        a 32-byte digest.
    References:
        none (bookkeeping).
    """
    h = hashlib.blake2b(parent, digest_size=32)
    h.update(f"{how}:{index}".encode())
    return h.digest()


def memo_arrays(digest: bytes, make) -> tuple:
    """Arrays derived from points (:meth:`groundcheck.physics.orient.LoopFluxes.coarse`), kept by
    their digest.

    Parameters:
        digest: the derived points' digest (:func:`derived_digest`).
        make: computes them when not kept.
    Returns:
        make()'s value (arrays made read-only).
    References:
        none (bookkeeping).
    """

    def made():
        value = make()
        for a in value:
            a.setflags(write=False)
        return value

    return _kept(_ARRAYS, digest, MEMO_POINTS, made)


def _kept(store: OrderedDict, key, limit: int, make):
    value = store.get(key)
    if value is None:
        value = make()
        store[key] = value
        while len(store) > limit:
            store.popitem(last=False)
    else:
        store.move_to_end(key)
    return value


def memo_terms(digest: bytes, X, W, group, count: int) -> tuple:
    """:func:`ring_terms` of the points, kept by their digest.

    Parameters:
        digest: :func:`points_digest` of the same points.
        X, W, group, count: as :func:`ring_terms`.
    Returns:
        the terms.
    References:
        none (bookkeeping).
    """
    return _kept(_TERMS, digest, MEMO_POINTS, lambda: ring_terms(X, W, group, count))


def memo_ring_fluxes(digest: bytes, src, X, W, M: np.ndarray, group, count: int) -> np.ndarray:
    """:func:`ring_fluxes` for the directions M (one batch), kept by the points' digest and the
    directions.

    Parameters:
        digest: :func:`points_digest` of the points.
        src, X, W, group, count: as :func:`ring_fluxes`.
        M: the unit directions, n × 3.
    Returns:
        n × count fluxes, Wb rms (a read-only array).
    References:
        none (bookkeeping).
    """
    M = np.ascontiguousarray(M, dtype=float)
    key = (digest, M.shape, M.tobytes())

    def make():
        terms = memo_terms(digest, X, W, group, count)
        out = ring_fluxes(src, X, W, M, group, count, terms)
        out.setflags(write=False)
        return out

    return _kept(_CALLS, key, MEMO_CALLS, make)
