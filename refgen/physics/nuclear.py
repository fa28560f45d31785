"""Nuclear collision and interaction lengths, lambda_T and lambda_I (g/cm2), for any element, compound or mixture.

Per element, lambda = A / (N_A sigma) with sigma the total (collision) or inelastic (interaction) cross section of
high-energy hadrons, as tabulated in the Review of Particle Physics (2024), atomic and nuclear properties
(refgen/data/nuclear_lengths.csv, from memory). The tabulated values are not a smooth function of A (local
exponents of sigma ~ A^alpha run from about 0.72 for C-Fe to 0.67 for Pb-U, and oxygen sits about 2 % above the
carbon trend), so no single power law is used: an element that is not tabulated is interpolated linearly in
(ln A, ln lambda) between its tabulated neighbours in A, i.e. with the local power law of that A range (beyond
uranium the Pb-U law is continued), and is reported as interpolated.
Compounds and mixtures: 1/lambda = sum_j w_j / lambda_j (w_j mass fractions).
Validity: energetic hadrons (tens of GeV and above), where the cross sections are nearly constant; the lengths
are the usual calorimetry scales, not an absorption law for a particular hadron at low energy.
"""
from __future__ import annotations

import numpy as np

from .. import datafiles

KINDS = {"interaction": "interaction_length_g_cm2", "collision": "collision_length_g_cm2"}


def is_tabulated(z: int) -> bool:
    """True if element Z has its own tabulated nuclear lengths (else they are interpolated)."""
    return int(z) in datafiles.nuclear_lengths()


def element_nuclear_length(z: int, a: float, kind: str) -> float:
    """lambda_I (kind='interaction') or lambda_T (kind='collision') of one element, g/cm2.

    The tabulated value for element Z; otherwise the local power law in A between the tabulated neighbours
    (interpolation in ln A, ln lambda), evaluated at the element's atomic weight a (g/mol).
    """
    table = datafiles.nuclear_lengths()
    if int(z) in table:
        return table[int(z)][KINDS[kind]]
    rows = sorted(table.values(), key=lambda r: r["A"])
    ln_a = np.log([r["A"] for r in rows])
    ln_lam = np.log([r[KINDS[kind]] for r in rows])
    x = float(np.log(a))
    if x >= ln_a[-1]:  # beyond the heaviest tabulated element: continue its local law
        slope = (ln_lam[-1] - ln_lam[-2]) / (ln_a[-1] - ln_a[-2])
        return float(np.exp(ln_lam[-1] + slope * (x - ln_a[-1])))
    return float(np.exp(np.interp(x, ln_a, ln_lam)))


def nuclear_length(Z, A, w, kind: str) -> float:
    """lambda of a compound or mixture by mass-fraction sum of 1/lambda, g/cm2."""
    return 1.0 / sum(wj / element_nuclear_length(int(zj), float(aj), kind) for zj, aj, wj in zip(Z, A, w))


def interpolated_elements(Z) -> list[int]:
    """The elements of a material whose nuclear lengths are interpolated rather than tabulated."""
    return sorted({int(z) for z in Z if not is_tabulated(int(z))})
