"""Thermodynamics: pure-component properties, liquid activity models, K-values, mixture
enthalpies and flashes, all vectorized over stages with analytic derivatives."""
