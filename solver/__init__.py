"""traystack: rigorous tray-by-tray distillation column simulation.

The engine solves the MESH equations (material balances, equilibrium relations, summations,
enthalpy balances) of every stage at once by Newton's method on a sparse Jacobian built from
the column's stage graph, and sets the result beside the shortcut (operating-line) design.

``solver.simulate(case) -> Result`` and ``solver.load_case(path) -> Case`` are the entry
points; they are imported on first use, so that ``import solver`` (and the command line's
start) does not pay for CoolProp and scipy until they are needed.
"""

from __future__ import annotations

import importlib

__version__ = "0.1.0"

_LAZY = {
    "simulate": ("engine", "simulate"),
    "load_case": ("case", "load_case"),
    "loads_case": ("case", "loads_case"),
    "Result": ("results", "Result"),
}

__all__ = ["Result", "load_case", "loads_case", "simulate", "__version__"]


def __getattr__(name: str):
    if name in _LAZY:
        module, attribute = _LAZY[name]
        value = getattr(importlib.import_module(f".{module}", __name__), attribute)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'solver' has no attribute {name!r}")
