"""The hum budget's choice of each source's largest conductor shares (physics/hum_shares.py): it
must pick what a search of every column in canonical order picks, equal shares past the eighteenth
included."""

import numpy as np
import pytest

from groundcheck.physics.hum_shares import TOP_SHARES, _largest


def _full(mags, rank):
    """The choice written out plainly: every column's magnitude rounded to 1e-9 of the row's
    largest, sorted by it (largest first), equal ones by rank; the first TOP_SHARES."""
    out = []
    for row in mags:
        q = np.round(row / row.max(), 9)
        out.append(sorted(range(len(row)), key=lambda j: (-q[j], rank[j]))[:TOP_SHARES])
    return np.array(out)


@pytest.mark.parametrize("nb", [200, 1500])
def test_the_largest_are_those_of_a_search_of_every_column(nb):
    rng = np.random.default_rng(7)
    mags = rng.lognormal(0.0, 3.0, size=(40, nb))
    mags[:5, :] = rng.uniform(0.0, 1.0, size=(5, nb))  # flat rows
    mags[5:10, :] = rng.lognormal(0.0, 8.0, size=(5, nb))  # steep rows
    mags[10:12, :] = 0.0
    mags[10:12, :3] = [4.0, 2.0, 1.0]  # three entries, the rest zero
    mags[3, 100:140] = 5.0  # forty equal largest: ranks decide
    mags[20, 50:75] = mags[20].max() * 2  # twenty-five equal largest
    rank = rng.permutation(nb)
    # the ones named: a share under a thousandth of the row's largest never is, whichever it is
    for row, ours, full in zip(mags, _largest(mags, rank), _full(mags, rank)):
        named = row > 1e-3 * row.max()
        assert [j for j in ours if named[j]] == [j for j in full if named[j]]
