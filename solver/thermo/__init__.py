"""Thermodynamics: pure-component properties, liquid activity models, K-values, mixture
enthalpies and flashes, all vectorized over stages with analytic derivatives. The modules are
imported by name (``solver.thermo.package``, ``solver.thermo.activity``, ...)."""

__all__: list[str] = []
