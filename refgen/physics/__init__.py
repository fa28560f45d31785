"""Pure, vectorised physics functions in refgen's internal units (MeV, cm, g; see the package docstring).

One module per family: kinematics, density_effect, stopping (heavy charged particles and electrons),
bremsstrahlung (electron and positron radiative stopping),
radlen (radiation length), ranges (CSDA range and reach), straggling (Landau-Vavilov), scattering
(Highland). No I/O and no plotting here.
"""
