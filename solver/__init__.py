"""traystack: rigorous tray-by-tray distillation column simulation.

The engine solves the MESH equations (material balances, equilibrium relations, summations,
enthalpy balances) of every stage at once by Newton's method on a sparse Jacobian built from
the column's stage graph, and sets the result beside the shortcut (operating-line) design.
"""

__version__ = "0.1.0"

from .case import load_case, loads_case  # noqa: E402
from .results import Result  # noqa: E402
from .simulate import simulate  # noqa: E402

__all__ = ["Result", "load_case", "loads_case", "simulate", "__version__"]
