"""``python -m solver.cli``: the ``traystack`` command."""

import sys

from . import main

sys.exit(main())
