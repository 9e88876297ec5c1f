"""The hum budget's choice of each source's largest conductor shares on a wide network
(physics/hum_shares.py): sought first among the columns of the largest maxima, it must pick what a
full search of every column picks."""

import numpy as np
import pytest

from groundcheck.physics.hum_shares import CANDIDATES, TOP_SHARES, _largest, _near


def _full(mags, rank):
    """The choice written out plainly: every column's magnitude rounded to 1e-9 of the row's
    largest, sorted by it (largest first), equal ones by rank; the first TOP_SHARES."""
    out = []
    for row in mags:
        q = np.round(row / row.max(), 9)
        out.append(sorted(range(len(row)), key=lambda j: (-q[j], rank[j]))[:TOP_SHARES])
    return np.array(out)


@pytest.mark.parametrize("nb", [300, 6 * CANDIDATES])
def test_the_candidates_give_what_a_search_of_every_column_gives(nb):
    # 300 columns are searched whole; 1,536 first among the candidates
    rng = np.random.default_rng(7)
    mags = rng.lognormal(0.0, 3.0, size=(40, nb))
    # rows whose largest lie outside the columns of the largest maxima: one huge column elsewhere
    # lifts the maxima of a few columns while the row's own ten largest are modest
    mags[:5, :] = rng.uniform(0.0, 1.0, size=(5, nb))
    mags[5:, 7] *= 1e6
    # a row of equal shares: ranks decide
    mags[3, 100:140] = 5.0
    rank = rng.permutation(nb)
    assert (_largest(mags, rank) == _full(mags, rank)).all()


def test_a_row_whose_kth_largest_is_not_above_the_others_is_searched_whole():
    nb = 5 * CANDIDATES
    mags = np.zeros((2, nb))
    mags[0, : CANDIDATES + 50] = 1.0  # the column maxima tie: no row can be settled among them
    mags[1, -3:] = [3.0, 2.0, 1.0]
    near = _near(mags, TOP_SHARES + 8)
    assert set(near[1]) >= {nb - 3, nb - 2, nb - 1}
    assert (mags[0, near[0]] == 1.0).all()
