"""refgen: an offline handbook of particle-matter interactions for one experiment's detector description.

Internal unit system (used by every physics function): energy, mass and momentum in MeV (momentum MeV/c,
mass MeV/c^2), length in cm, mass in g, density in g/cm3, areal density in g/cm2, temperature in K,
pressure in Pa.
"""
__version__ = "0.1.0"
