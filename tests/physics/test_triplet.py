"""Triplet production on a free electron (refgen.physics.triplet, tabulated in triplet_free_electron.csv):
the lowest-order QED amplitude is gauge invariant, the committed table is what the integration gives, and the
cross section reaches the analytic high-energy limit of Borsellino and Ghizzetti."""
import numpy as np
import pytest

from refgen import datafiles
from refgen.physics.triplet import TABLE_NODES, borsellino_ghizzetti, cross_section


def test_amplitude_is_gauge_invariant():
    # replacing the photon polarisation by its momentum must give zero (Ward identity), here relative to the
    # physical |M|^2 on a coarse phase-space grid at k = 20 m_e c^2
    assert cross_section(20.0, nodes=(4, 6, 4, 4), gauge_check=True) < 1e-20


def test_committed_table_is_what_the_integration_gives():
    k, sigma = datafiles.triplet_free_electron()
    row = k.index(10.0)
    assert cross_section(10.0, TABLE_NODES) == pytest.approx(sigma[row], rel=1e-5)


def test_high_energy_limit_is_borsellino_ghizzetti():
    # Borsellino, Nuovo Cimento 4 (1947) 112 and Ghizzetti (1947): per free electron at k >> 1,
    # alpha r_e^2 [(28/9) ln 2k - 218/27]; the corrections fall as (ln k)^3 / k
    k, sigma = (np.asarray(v) for v in datafiles.triplet_free_electron())
    assert sigma[-1] == pytest.approx(borsellino_ghizzetti(k[-1]), rel=0.002)  # k = 2e5 (100 GeV)
    gap = np.abs(sigma / borsellino_ghizzetti(k) - 1.0)[k >= 1000]
    assert np.all(np.diff(gap) < 0)  # the approach is monotonic


def test_table_rises_from_threshold():
    k, sigma = (np.asarray(v) for v in datafiles.triplet_free_electron())
    assert k[0] > 4.0 and np.all(np.diff(sigma) > 0) and np.all(sigma > 0)

