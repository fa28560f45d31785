"""Nuclear collision and interaction lengths, lambda_T and lambda_I (g/cm2): high-energy approximations.

Power laws in the mass number for the hadron-nucleus cross sections at high energy (>~ 100 GeV):
    sigma_I = sigma_I0 A^0.71   (absorption; exponent after Denisov et al., Nucl. Phys. B61 (1973) 62, from memory)
    sigma_T = sigma_T0 A^0.77   (total; exponent after Murthy et al., Nucl. Phys. B92 (1975) 269, from memory)
    lambda = A / (N_A sigma)
The normalisations sigma_I0 = 40.26 mb and sigma_T0 = 51.48 mb make iron (A = 55.845) give the Review of
Particle Physics values lambda_I = 132.1 and lambda_T = 81.7 g/cm2. Hydrogen, where no nucleus-size law
applies, takes the Review's values (52.0 and 42.8 g/cm2). Compounds: 1/lambda = sum_j w_j / lambda_j.
Accuracy: a few percent for A >= 9 (see the tests); these are approximations for energetic hadrons only.
"""
from __future__ import annotations

from .. import datafiles

SIGMA_I0_MB = 40.26
SIGMA_T0_MB = 51.48
ALPHA_I = 0.71
ALPHA_T = 0.77
HYDROGEN = {"interaction": 52.0, "collision": 42.8}  # Review of Particle Physics, atomic and nuclear properties
MB = 1e-27  # cm2


def element_nuclear_length(z: int, a: float, kind: str) -> float:
    """lambda_I (kind='interaction') or lambda_T (kind='collision') of one element, g/cm2."""
    if z == 1:
        return HYDROGEN[kind]
    sigma0, alpha = (SIGMA_I0_MB, ALPHA_I) if kind == "interaction" else (SIGMA_T0_MB, ALPHA_T)
    return a / (datafiles.constant("avogadro") * sigma0 * MB * a ** alpha)


def nuclear_length(Z, A, w, kind: str) -> float:
    """lambda of a compound or mixture by mass-fraction sum of 1/lambda, g/cm2."""
    return 1.0 / sum(wj / element_nuclear_length(int(zj), float(aj), kind) for zj, aj, wj in zip(Z, A, w))
